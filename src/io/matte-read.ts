// Reading matte files: per-frame images of what covers the lights, as coverage (alpha: 1 =
// covered) or scene depth. Formats plug in by file extension: PNG (8/16 bit) and OpenEXR (any
// channel, half/float).

import { closeSync, openSync, readFileSync, readSync, statSync } from 'node:fs';
import path from 'node:path';
import pngjs from 'pngjs';
import { decodeExr, ExrFormatError, readExrHeader } from '../format/exr-read.js';
import type { MatteImage } from '../occlusion/matte.js';
import { InputError, whyNotReadable } from '../errors.js';
import { readFrameLinear } from './read-frame.js';

const { PNG } = pngjs;

/** r, g, b, a for PNG; any channel name for OpenEXR (r/g/b/a stand for R/G/B/A); undefined: the
 * format's default for the kind of matte */
export type MatteChannel = string | undefined;

export type MatteDecoder = (file: string, channel: MatteChannel, kind: 'alpha' | 'depth') => MatteImage;

const decoders = new Map<string, MatteDecoder>();

/** Register a decoder for a file extension (lower case, with the dot). */
export function registerMatteFormat(ext: string, decode: MatteDecoder): void {
  decoders.set(ext, decode);
}

export function matteFormats(): string[] {
  return [...decoders.keys()];
}

/** A matte file that cannot be used, said in our words (never a decoder library's message). */
export class MatteFileError extends Error {}

/** A file-system error while reading, in plain words; undefined when it is not one. */
function fsProblem(e: unknown): string | undefined {
  return (e as NodeJS.ErrnoException).code ? whyNotReadable(e) : undefined;
}

export function decodeMatte(file: string, channel: MatteChannel, kind: 'alpha' | 'depth' | 'plate'): MatteImage {
  const ext = path.extname(file).toLowerCase();
  const decode = kind === 'plate' && decoders.has(ext) ? plateLuminance : decoders.get(ext);
  if (!decode) throw new MatteFileError(`no matte reader for ${ext} files (known: ${matteFormats().join(', ')})`);
  try {
    return decode(file, channel, kind === 'plate' ? 'alpha' : kind);
  } catch (e) {
    if (e instanceof MatteFileError || e instanceof ExrFormatError) throw new MatteFileError(e.message);
    if (e instanceof InputError) throw new MatteFileError(e.message.replace(`${file}: `, ''));
    const why = fsProblem(e);
    if (why) throw new MatteFileError(why);
    // anything a decoder library throws means the bytes are not what the name says
    throw new MatteFileError(ext === '.png' ? 'not a readable PNG (damaged or truncated)' : `not a readable ${ext} file (damaged or truncated)`);
  }
}

/** The first bytes of a file (all of it when shorter). */
function head(file: string, bytes: number): Buffer {
  const fd = openSync(file, 'r');
  try {
    const buf = Buffer.alloc(Math.min(bytes, statSync(file).size));
    let n = 0;
    while (n < buf.length) {
      const r = readSync(fd, buf, n, buf.length - n, n);
      if (r === 0) break;
      n += r;
    }
    return buf.subarray(0, n);
  } finally {
    closeSync(fd);
  }
}

/**
 * A matte frame's size from its header alone (PNG IHDR; OpenEXR display window, and the channel
 * the matte reads is there), so a long sequence is checked without decoding it. Problems are
 * MatteFileErrors in our words.
 */
export function matteFrameSize(file: string, channel?: MatteChannel, kind: 'alpha' | 'depth' | 'plate' = 'alpha'): { width: number; height: number } {
  const ext = path.extname(file).toLowerCase();
  try {
    if (ext === '.png') {
      const b = head(file, 33);
      const sig = '89504e470d0a1a0a';
      if (b.length < 24 || b.toString('hex', 0, 8) !== sig || b.toString('latin1', 12, 16) !== 'IHDR') throw new MatteFileError('not a PNG file (damaged, or another format under a .png name)');
      return { width: b.readUInt32BE(16), height: b.readUInt32BE(20) };
    }
    if (ext === '.exr') {
      // headers are small: read the start, and the whole file only if the header runs past it
      const start = head(file, 1 << 16);
      let header;
      try {
        header = readExrHeader(start);
      } catch (e) {
        if (start.length >= statSync(file).size) throw e;
        header = readExrHeader(readFileSync(file));
      }
      const names = header.channels.map((c) => c.name);
      if (kind !== 'plate') exrMatteChannel(names, channel, kind);
      else if (!['R', 'G', 'B'].every((c) => names.includes(c)) && !names.includes('Y')) throw new MatteFileError(`no R, G, B or Y channels to read the plate's luminance from (the file has ${names.join(', ')})`);
      return header;
    }
    throw new MatteFileError(`no matte reader for ${ext} files (known: ${matteFormats().join(', ')})`);
  } catch (e) {
    if (e instanceof MatteFileError || e instanceof ExrFormatError) throw new MatteFileError(e.message);
    throw new MatteFileError(fsProblem(e) ?? 'cannot be read');
  }
}

/** A plate frame's luminance (Rec.709 weights) in linear light: PNG through its transfer, OpenEXR R, G, B or Y. */
function plateLuminance(file: string): MatteImage {
  const f = readFrameLinear(file);
  const values = new Float32Array(f.width * f.height);
  for (let i = 0; i < values.length; i++) values[i] = 0.2126 * f.rgb[i * 3] + 0.7152 * f.rgb[i * 3 + 1] + 0.0722 * f.rgb[i * 3 + 2];
  return { width: f.width, height: f.height, values };
}

/** PNG, 8 or 16 bits: the channel (default r) scaled to [0, 1]; grey images give the same value in r, g, b. */
registerMatteFormat('.png', (file, channel) => {
  const png = PNG.sync.read(readFileSync(file), { skipRescale: true });
  const max = png.depth === 16 ? 65535 : 255;
  const c = { r: 0, g: 1, b: 2, a: 3 }[channel ?? 'r'];
  if (c === undefined) throw new Error(`PNG mattes have channels r, g, b and a, not "${channel}"`);
  const n = png.width * png.height;
  const values = new Float32Array(n);
  const d = png.data as unknown as ArrayLike<number>;
  for (let p = 0; p < n; p++) values[p] = d[p * 4 + c] / max;
  return { width: png.width, height: png.height, values };
});

/**
 * OpenEXR: the named channel as stored (scene depth in the renderer's units, or coverage). Without a
 * name: Z for depth mattes and A for alpha mattes, or the file's only channel.
 */
registerMatteFormat('.exr', (file, channel, kind) => {
  const img = decodeExr(readFileSync(file));
  const name = exrMatteChannel([...img.channels.keys()], channel, kind);
  return { width: img.width, height: img.height, values: img.channels.get(name)! };
});

/** Which channel of an OpenEXR matte is read: the named one, or Z/A by kind, or the only one. */
function exrMatteChannel(names: string[], channel: MatteChannel, kind: 'alpha' | 'depth'): string {
  const asked = channel && /^[rgba]$/.test(channel) ? channel.toUpperCase() : channel;
  const dflt = kind === 'depth' ? 'Z' : 'A';
  const name = asked ?? (names.includes(dflt) ? dflt : names.length === 1 ? names[0] : undefined);
  if (name === undefined || !names.includes(name)) {
    const want = asked ? `no channel "${asked}"` : `no ${dflt} channel`;
    throw new MatteFileError(`${want}; the file has ${names.join(', ')}: give the matte a channel: NAME`);
  }
  return name;
}
