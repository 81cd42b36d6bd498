// Reading matte files: per-frame images of what covers the lights, as coverage (alpha: 1 =
// covered) or scene depth. Formats plug in by file extension: PNG (8/16 bit) and OpenEXR (any
// channel, half/float).

import { readFileSync } from 'node:fs';
import path from 'node:path';
import pngjs from 'pngjs';
import { decodeExr } from '../format/exr-read.js';
import type { MatteImage } from '../occlusion/matte.js';

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

export function decodeMatte(file: string, channel: MatteChannel, kind: 'alpha' | 'depth'): MatteImage {
  const ext = path.extname(file).toLowerCase();
  const decode = decoders.get(ext);
  if (!decode) throw new Error(`no matte reader for ${ext} files (known: ${matteFormats().join(', ')})`);
  return decode(file, channel, kind);
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
  const names = [...img.channels.keys()];
  const asked = channel && /^[rgba]$/.test(channel) ? channel.toUpperCase() : channel;
  const name = asked ?? (img.channels.has(kind === 'depth' ? 'Z' : 'A') ? (kind === 'depth' ? 'Z' : 'A') : names.length === 1 ? names[0] : undefined);
  const values = name === undefined ? undefined : img.channels.get(name);
  if (!values) {
    const want = asked ? `no channel "${asked}"` : `no ${kind === 'depth' ? 'Z' : 'A'} channel`;
    throw new Error(`${want}; the file has ${names.join(', ')}: give the matte a channel: NAME`);
  }
  return { width: img.width, height: img.height, values };
});
