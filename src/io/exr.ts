// OpenEXR writer: single-part scanline files, written here from the OpenEXR file-layout
// specification (no maintained encoder exists for Node; the registry has only readers).
// Layout: magic 20000630, version 2; header attributes (name, type, size, value), a null byte;
// the scanline offset table (uint64 per chunk); chunks of (int32 y, int32 size, data), each
// holding its lines one after another, each line its channels in alphabetical order, little
// endian. ZIP (16 lines a chunk) and ZIPS (1 line) reorder the bytes (evens, then odds), apply a
// delta predictor, and zlib-deflate; a chunk that does not shrink is stored raw, as the
// specification allows. Values are scene-linear and premultiplied (EXR's own convention).

import { endianness } from 'node:os';
import { deflateSync } from 'node:zlib';
import type { FloatImage } from '../raster/image.js';
import { passAlpha } from './png.js';

export type ExrPixelType = 'half' | 'float';
export type ExrCompression = 'none' | 'zips' | 'zip';

export interface ExrOptions {
  type: ExrPixelType;
  compression: ExrCompression;
  /** none: RGB; derived: RGBA, alpha the pass's largest channel like the PNG writer's; zero: RGBA
   * with alpha 0 (premultiplied light that "over" adds to the plate unchanged) */
  alpha: 'none' | 'derived' | 'zero';
  pixelAspect: number;
  /** the frame's SMPTE timecode (written as OpenEXR's standard `timeCode` attribute) */
  timeCode?: ExrTimeCode;
  /** the sequence's rate (the standard `framesPerSecond` attribute) */
  framesPerSecond?: { num: number; den: number };
  /** the primaries and white of the values (x, y of red, green, blue, white); default Rec.709 / D65 */
  chromaticities?: readonly number[];
  /** more RGB layers beside the image's own (its R, G, B[, A] are the default layer): channels
   * NAME.R, NAME.G, NAME.B, as OpenEXR names the channels of a layer */
  layers?: { name: string; img: FloatImage }[];
}

export interface ExrTimeCode {
  hours: number;
  minutes: number;
  seconds: number;
  frame: number;
  dropFrame: boolean;
}

/**
 * A timecode packed as OpenEXR stores it (ImfTimeCode.h, "packing for 60-field television", the
 * file's encoding): BCD frame units 0-3, frame tens 4-5, drop-frame flag 6, seconds 8-11 and
 * 12-14, minutes 16-19 and 20-22, hours 24-27 and 28-29; the user-data word is 0.
 */
export function packTimeCode(tc: ExrTimeCode): Buffer {
  const bcd = (v: number, unitShift: number) => ((v % 10) << unitShift) | (Math.floor(v / 10) << (unitShift + 4));
  const word = (bcd(tc.frame, 0) | (tc.dropFrame ? 1 << 6 : 0) | bcd(tc.seconds, 8) | bcd(tc.minutes, 16) | bcd(tc.hours, 24)) >>> 0;
  const b = Buffer.alloc(8);
  b.writeUInt32LE(word, 0);
  b.writeUInt32LE(0, 4);
  return b;
}

const COMPRESSION_CODE: Record<ExrCompression, number> = { none: 0, zips: 2, zip: 3 };
/** the largest finite half (IEEE 754 binary16) */
const HALF_MAX = 65504;

/** zlib level for ZIP/ZIPS, by measurement at 1920x1080 half RGB: level 4 took 270 ms for 1.51 MB,
 * level 6 twice as long for 1.17 MB; re-render speed matters more than disk for passes */
const ZIP_LEVEL = 4;
const LINES_PER_CHUNK: Record<ExrCompression, number> = { none: 1, zips: 1, zip: 16 };

// float32 -> float16 bits, round to nearest even (IEEE 754 binary16)
const f32 = new Float32Array(1);
const u32 = new Uint32Array(f32.buffer);
export function toHalf(v: number): number {
  f32[0] = v;
  const x = u32[0];
  const sign = (x >>> 16) & 0x8000;
  let exp = (x >>> 23) & 0xff;
  let mant = x & 0x7fffff;
  if (exp === 0xff) return sign | 0x7c00 | (mant ? 0x200 : 0); // inf or nan
  exp = exp - 127 + 15;
  if (exp >= 0x1f) return sign | 0x7c00; // overflow -> inf
  if (exp <= 0) {
    if (exp < -10) return sign; // too small -> zero
    mant |= 0x800000;
    const shift = 14 - exp;
    let h = mant >>> shift;
    const rest = mant & ((1 << shift) - 1);
    const half = 1 << (shift - 1);
    if (rest > half || (rest === half && h & 1)) h++;
    return sign | h;
  }
  let h = (exp << 10) | (mant >>> 13);
  const rest = mant & 0x1fff;
  if (rest > 0x1000 || (rest === 0x1000 && h & 1)) h++; // may carry into the exponent: still right
  return sign | h;
}

/** half's range ends at its largest finite value; NaN becomes 0 */
function clampHalf(v: number): number {
  return v === v ? (v > HALF_MAX ? HALF_MAX : v < -HALF_MAX ? -HALF_MAX : v) : 0;
}

/** float32 bits of 65504, half's largest finite value */
const HALF_MAX_BITS = 0x477fe000;
/** 2^-14, the smallest normal half: below it, halves are subnormal */
const HALF_NORMAL_BITS = 113 << 23;

/**
 * One channel of one line as halves, straight from the floats' bits (round to nearest even, as
 * toHalf; F. Giesen's bit method for normal values): never NaN or infinity for a compositor (the
 * PNG quantiser clips the same way): NaN is 0, and values beyond half's range its largest finite
 * value. Zeros are left as the fresh array has them (most of an element layer).
 */
function halfLine(out: Uint16Array, o: number, src: Float32Array, i: number, width: number): void {
  const bits = new Uint32Array(src.buffer, src.byteOffset, src.length);
  for (let x = 0; x < width; x++, i += 4) {
    const u = bits[i];
    if (u === 0) continue;
    const sign = (u >>> 16) & 0x8000;
    const a = u & 0x7fffffff;
    let h: number;
    if (a > 0x7f800000) h = 0; // NaN
    else if (a >= HALF_MAX_BITS) h = sign | 0x7bff; // at or beyond the largest finite half
    else if (a < HALF_NORMAL_BITS) h = toHalf(src[i]); // subnormal or zero (rare): the slow path
    else h = sign | (((a + 0xc8000fff + ((a >>> 13) & 1)) >>> 13) & 0x7fff);
    if (h !== 0) out[o + x] = h;
  }
}

function floatLine(out: Float32Array, o: number, src: Float32Array, i: number, width: number): void {
  for (let x = 0; x < width; x++, i += 4) {
    const v = src[i];
    out[o + x] = v === v ? (Number.isFinite(v) ? v : v > 0 ? 3.4028234663852886e38 : -3.4028234663852886e38) : 0;
  }
}

class Writer {
  private chunks: Buffer[] = [];
  bytes(b: Buffer | Uint8Array) {
    this.chunks.push(Buffer.from(b));
  }
  str(s: string) {
    this.bytes(Buffer.from(`${s}\0`, 'latin1'));
  }
  i32(v: number) {
    const b = Buffer.alloc(4);
    b.writeInt32LE(v, 0);
    this.bytes(b);
  }
  f32(v: number) {
    const b = Buffer.alloc(4);
    b.writeFloatLE(v, 0);
    this.bytes(b);
  }
  u8(v: number) {
    this.bytes(Buffer.from([v]));
  }
  attr(name: string, type: string, value: Buffer) {
    this.str(name);
    this.str(type);
    this.i32(value.length);
    this.bytes(value);
  }
  done(): Buffer {
    return Buffer.concat(this.chunks);
  }
}

function box2i(x0: number, y0: number, x1: number, y1: number): Buffer {
  const b = Buffer.alloc(16);
  [x0, y0, x1, y1].forEach((v, i) => b.writeInt32LE(v, i * 4));
  return b;
}

function floats(...vs: number[]): Buffer {
  const b = Buffer.alloc(vs.length * 4);
  vs.forEach((v, i) => b.writeFloatLE(v, i * 4));
  return b;
}

/** ZIP/ZIPS preprocessing: bytes split into evens then odds, then a delta predictor. Samples are 2
 * or 4 bytes, so a block's length is even and each 16-bit word gives one even and one odd byte:
 * the split and the delta are done in one pass over the words (a third of the time of two passes
 * over bytes). */
export function zipPredict(raw: Buffer): Buffer {
  const n = raw.length;
  if (n === 0) return Buffer.alloc(0);
  if ((n & 1) === 1 || (raw.byteOffset & 1) === 1) return zipPredictBytes(raw);
  const half = n >> 1;
  const t = new Uint8Array(n);
  const words = new Uint16Array(raw.buffer, raw.byteOffset, half);
  let prev = words[0] & 0xff;
  t[0] = prev;
  for (let k = 1; k < half; k++) {
    const c = words[k] & 0xff;
    t[k] = (c - prev + 128) & 0xff;
    prev = c;
  }
  for (let k = 0; k < half; k++) {
    const c = words[k] >>> 8;
    t[half + k] = (c - prev + 128) & 0xff;
    prev = c;
  }
  return Buffer.from(t.buffer, 0, n);
}

/** the same, byte by byte, for a block of odd length or odd alignment */
function zipPredictBytes(raw: Buffer): Buffer {
  const n = raw.length;
  const t = Buffer.alloc(n);
  let a = 0;
  let b = (n + 1) >> 1;
  for (let i = 0; i < n; i++) {
    if (i & 1) t[b++] = raw[i];
    else t[a++] = raw[i];
  }
  let prev = t[0];
  for (let i = 1; i < n; i++) {
    const d = (t[i] - prev + 128 + 256) & 0xff;
    prev = t[i];
    t[i] = d;
  }
  return t;
}

export function encodeExr(img: FloatImage, opts: ExrOptions): Buffer {
  // samples are laid out through typed arrays, which use the machine's byte order
  if (endianness() !== 'LE') throw new Error('the OpenEXR writer needs a little-endian machine');
  const { width, height } = img;
  // every channel: its name, the image it comes from and the component (-1: the derived alpha),
  // in the file's order (names sorted byte by byte: the default layer's capitals come first)
  const own = (opts.alpha !== 'none' ? ['A', 'B', 'G', 'R'] : ['B', 'G', 'R']).map((c) => ({ name: c, data: img.data, off: { A: -1, B: 2, G: 1, R: 0 }[c as 'A' | 'B' | 'G' | 'R'] }));
  const extra = (opts.layers ?? []).flatMap((l) => (['B', 'G', 'R'] as const).map((c) => ({ name: `${l.name}.${c}`, data: l.img.data, off: { B: 2, G: 1, R: 0 }[c] })));
  const sources = [...own, ...extra].sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  const channels = sources.map((c) => c.name);
  const zeroAlpha = opts.alpha === 'zero';
  const size = opts.type === 'half' ? 2 : 4;
  const w = new Writer();
  w.bytes(Buffer.from([0x76, 0x2f, 0x31, 0x01]));
  w.i32(2); // version 2, single-part scanline, short names
  // channels: name, pixel type (1 half, 2 float), pLinear, 3 reserved, x and y sampling
  const ch = new Writer();
  for (const c of channels) {
    ch.str(c);
    ch.i32(opts.type === 'half' ? 1 : 2);
    ch.bytes(Buffer.from([0, 0, 0, 0]));
    ch.i32(1);
    ch.i32(1);
  }
  ch.u8(0);
  w.attr('channels', 'chlist', ch.done());
  // the values' primaries and white: by default Rec.709 / sRGB primaries and D65 (IEC 61966-2-1)
  w.attr('chromaticities', 'chromaticities', floats(...(opts.chromaticities ?? [0.64, 0.33, 0.3, 0.6, 0.15, 0.06, 0.3127, 0.329])));
  w.attr('compression', 'compression', Buffer.from([COMPRESSION_CODE[opts.compression]]));
  w.attr('dataWindow', 'box2i', box2i(0, 0, width - 1, height - 1));
  w.attr('displayWindow', 'box2i', box2i(0, 0, width - 1, height - 1));
  if (opts.framesPerSecond) {
    const r = Buffer.alloc(8);
    r.writeInt32LE(opts.framesPerSecond.num, 0);
    r.writeUInt32LE(opts.framesPerSecond.den, 4);
    w.attr('framesPerSecond', 'rational', r);
  }
  w.attr('lineOrder', 'lineOrder', Buffer.from([0])); // increasing y
  w.attr('pixelAspectRatio', 'float', floats(opts.pixelAspect));
  w.attr('screenWindowCenter', 'v2f', floats(0, 0));
  w.attr('screenWindowWidth', 'float', floats(1));
  if (opts.timeCode) w.attr('timeCode', 'timecode', packTimeCode(opts.timeCode));
  w.u8(0); // end of header
  const header = w.done();

  const per = LINES_PER_CHUNK[opts.compression];
  const count = Math.ceil(height / per);
  const blocks: Buffer[] = [];
  const nc = channels.length;
  for (let c = 0; c < count; c++) {
    const y0 = c * per;
    const lines = Math.min(per, height - y0);
    // each line holds its channels one after another, little endian
    const samples = lines * width * nc;
    const words = size === 2 ? new Uint16Array(samples) : new Float32Array(samples);
    let o = 0;
    for (let y = y0; y < y0 + lines; y++) {
      const row = y * width * 4;
      for (let k = 0; k < nc; k++) {
        const { off, data: src } = sources[k];
        if (off < 0) {
          // the alpha: 0 (emission), or derived from the pass
          if (!zeroAlpha) for (let x = 0; x < width; x++) words[o + x] = size === 2 ? toHalf(clampHalf(passAlpha(src[row + x * 4], src[row + x * 4 + 1], src[row + x * 4 + 2]))) : passAlpha(src[row + x * 4], src[row + x * 4 + 1], src[row + x * 4 + 2]);
        } else if (size === 2) {
          halfLine(words as Uint16Array, o, src, row + off, width);
        } else {
          floatLine(words as Float32Array, o, src, row + off, width);
        }
        o += width;
      }
    }
    const raw = Buffer.from(words.buffer, words.byteOffset, words.byteLength);
    let data = raw;
    if (opts.compression !== 'none') {
      const z = deflateSync(zipPredict(raw), { level: ZIP_LEVEL });
      if (z.length < raw.length) data = z;
    }
    const head = Buffer.alloc(8);
    head.writeInt32LE(y0, 0);
    head.writeInt32LE(data.length, 4);
    blocks.push(Buffer.concat([head, data]));
  }
  const table = Buffer.alloc(count * 8);
  let offset = header.length + table.length;
  blocks.forEach((b, i) => {
    table.writeBigUInt64LE(BigInt(offset), i * 8);
    offset += b.length;
  });
  return Buffer.concat([header, table, ...blocks]);
}
