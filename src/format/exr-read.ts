// OpenEXR reader: single-part scanline files, every channel as float32, written here from the
// OpenEXR file layout and the reference library's compression formats (see DEVELOPERS.md for why
// not a registry decoder: the one well-kept reader, three.js's loader, decodes only RGB(A)/Y images
// of one pixel type, while depth mattes are Z channels, often float beside half colour).
//
// Compressions: none, RLE, ZIPS, ZIP and PIZ (wavelet + Huffman). A chunk whose stored size equals
// its raw size is raw, whatever the header says (writers store incompressible chunks that way).
// Refused with a clear message: tiled, multi-part and deep files, subsampled channels, and the
// lossy compressions (PXR24, B44, B44A, DWAA, DWAB).

import { inflateSync } from 'node:zlib';

export type ExrChannelType = 'uint' | 'half' | 'float';

export interface ExrImageData {
  /** the display window's size; pixels of the data window land in it, the rest are 0 */
  width: number;
  height: number;
  /** channel name -> values, row-major from the display window's top-left */
  channels: Map<string, Float32Array>;
  /** channel name -> stored pixel type, in file order (alphabetical) */
  types: Map<string, ExrChannelType>;
  compression: string;
  dataWindow: [number, number, number, number];
  displayWindow: [number, number, number, number];
  pixelAspectRatio: number;
  /** the standard chromaticities attribute, when present */
  chromaticities?: number[];
}

export class ExrFormatError extends Error {}

const COMPRESSIONS = ['none', 'rle', 'zips', 'zip', 'piz', 'pxr24', 'b44', 'b44a', 'dwaa', 'dwab', 'htj2k256', 'htj2k32'];
const LINES: Record<string, number> = { none: 1, rle: 1, zips: 1, zip: 16, piz: 32 };
const TYPE_NAMES: ExrChannelType[] = ['uint', 'half', 'float'];

/** IEEE 754 binary16 -> number, for every bit pattern */
export const HALF_TO_FLOAT = (() => {
  const t = new Float32Array(65536);
  for (let h = 0; h < 65536; h++) {
    const s = h & 0x8000 ? -1 : 1;
    const e = (h >> 10) & 0x1f;
    const m = h & 0x3ff;
    t[h] = e === 0 ? s * m * 2 ** -24 : e === 31 ? (m ? NaN : s * Infinity) : s * (1 + m / 1024) * 2 ** (e - 15);
  }
  return t;
})();

interface Channel {
  name: string;
  type: ExrChannelType;
  size: number;
}

class Cursor {
  constructor(
    readonly b: Buffer,
    public p = 0,
  ) {}
  need(n: number) {
    if (this.p + n > this.b.length) throw new ExrFormatError('the file ends early (truncated?)');
  }
  i32() {
    this.need(4);
    const v = this.b.readInt32LE(this.p);
    this.p += 4;
    return v;
  }
  str(max = 256): string {
    const end = this.b.indexOf(0, this.p);
    if (end < 0 || end - this.p > max) throw new ExrFormatError('a header name is not terminated (not an OpenEXR file, or damaged)');
    const s = this.b.toString('latin1', this.p, end);
    this.p = end + 1;
    return s;
  }
}

/** What an OpenEXR header says, and where the offset table after it starts. */
export interface ExrHeader {
  channels: Channel[];
  compression: string;
  dataWindow: [number, number, number, number];
  displayWindow: [number, number, number, number];
  pixelAspectRatio: number;
  /** the standard chromaticities attribute (x, y of red, green, blue, white), when present */
  chromaticities?: number[];
  /** the display window's size */
  width: number;
  height: number;
  /** byte offset just past the header */
  end: number;
}

/**
 * Parse the header of a single-part scanline OpenEXR file (refusing the kinds this reader does
 * not decode). `buf` may hold only the start of the file: a header cut short throws.
 */
export function readExrHeader(buf: Buffer): ExrHeader {
  if (buf.length < 8 || buf.readUInt32LE(0) !== 20000630) throw new ExrFormatError('not an OpenEXR file (no 76 2f 31 01 magic number)');
  const version = buf.readUInt32LE(4);
  if ((version & 0xff) !== 2) throw new ExrFormatError(`OpenEXR version ${version & 0xff} is not supported (only 2)`);
  if (version & 0x200) throw new ExrFormatError('tiled OpenEXR files are not supported; convert to scanlines (e.g. oiiotool in.exr --scanline -o out.exr)');
  if (version & 0x800) throw new ExrFormatError('deep OpenEXR files are not supported');
  if (version & 0x1000) throw new ExrFormatError('multi-part OpenEXR files are not supported; extract the part with the matte');
  const c = new Cursor(buf, 8);
  const maxName = version & 0x400 ? 255 : 31;
  let channels: Channel[] | undefined;
  let compression: string | undefined;
  let dataWindow: [number, number, number, number] | undefined;
  let displayWindow: [number, number, number, number] | undefined;
  let pixelAspectRatio = 1;
  let chromaticities: number[] | undefined;
  for (;;) {
    const name = c.str(maxName);
    if (name === '') break;
    const type = c.str(maxName);
    const size = c.i32();
    c.need(size);
    const start = c.p;
    if (name === 'channels' && type === 'chlist') {
      channels = [];
      const v = new Cursor(buf, start);
      for (;;) {
        const cn = v.str(maxName);
        if (cn === '') break;
        const pt = v.i32();
        v.p += 4; // pLinear, reserved
        const xs = v.i32();
        const ys = v.i32();
        const t = TYPE_NAMES[pt];
        if (!t) throw new ExrFormatError(`channel ${cn}: unknown pixel type ${pt}`);
        if (xs !== 1 || ys !== 1) throw new ExrFormatError(`channel ${cn} is subsampled (${xs}x${ys}); only full-resolution channels are supported`);
        channels.push({ name: cn, type: t, size: t === 'half' ? 2 : 4 });
      }
    } else if (name === 'compression') {
      const code = buf[start];
      compression = COMPRESSIONS[code] ?? `code ${code}`;
    } else if (name === 'dataWindow' || name === 'displayWindow') {
      const box: [number, number, number, number] = [0, 1, 2, 3].map((i) => buf.readInt32LE(start + i * 4)) as [number, number, number, number];
      if (name === 'dataWindow') dataWindow = box;
      else displayWindow = box;
    } else if (name === 'pixelAspectRatio') {
      pixelAspectRatio = buf.readFloatLE(start);
    } else if (name === 'chromaticities' && type === 'chromaticities' && size === 32) {
      chromaticities = [0, 1, 2, 3, 4, 5, 6, 7].map((i) => buf.readFloatLE(start + i * 4));
    }
    c.p = start + size;
  }
  if (!channels || !compression || !dataWindow || !displayWindow) throw new ExrFormatError('the header lacks channels, compression, dataWindow or displayWindow');
  return { channels, compression, dataWindow, displayWindow, pixelAspectRatio, ...(chromaticities ? { chromaticities } : {}), width: displayWindow[2] - displayWindow[0] + 1, height: displayWindow[3] - displayWindow[1] + 1, end: c.p };
}

export function decodeExr(buf: Buffer): ExrImageData {
  const { channels, compression, dataWindow, displayWindow, pixelAspectRatio, chromaticities, end } = readExrHeader(buf);
  const c = new Cursor(buf, end);
  const per = LINES[compression];
  if (!per) throw new ExrFormatError(`${compression.toUpperCase()} compression is not supported (supported: none, RLE, ZIPS, ZIP, PIZ); re-save the matte with one of those`);

  const [dx0, dy0, dx1, dy1] = dataWindow;
  const [wx0, wy0, wx1, wy1] = displayWindow;
  const width = wx1 - wx0 + 1;
  const height = wy1 - wy0 + 1;
  const dw = dx1 - dx0 + 1;
  const dh = dy1 - dy0 + 1;
  if (width < 1 || height < 1 || width * height > 2 ** 28 || dw < 0 || dh < 0 || dw * dh > 2 ** 28) throw new ExrFormatError(`unreasonable image size (display ${width}x${height}, data ${dw}x${dh})`);

  const out = new Map<string, Float32Array>();
  for (const ch of channels) out.set(ch.name, new Float32Array(width * height));
  const dsts = channels.map((ch) => out.get(ch.name)!);
  const lineBytes = channels.reduce((s, ch) => s + ch.size * dw, 0);
  const chunks = Math.ceil(dh / per);
  c.need(chunks * 8);
  const table = c.p;
  for (let k = 0; k < chunks; k++) {
    const off = Number(buf.readBigUInt64LE(table + k * 8));
    if (off + 8 > buf.length) throw new ExrFormatError(`chunk ${k} lies beyond the end of the file (truncated?)`);
    const y = buf.readInt32LE(off);
    const size = buf.readInt32LE(off + 4);
    if (size < 0 || off + 8 + size > buf.length) throw new ExrFormatError(`chunk ${k} lies beyond the end of the file (truncated?)`);
    if ((y - dy0) % per !== 0 || y < dy0 || y > dy1) throw new ExrFormatError(`chunk ${k} starts at line ${y}, not a chunk boundary`);
    const lines = Math.min(per, dy1 - y + 1);
    const rawSize = lines * lineBytes;
    const packed = buf.subarray(off + 8, off + 8 + size);
    const raw = size === rawSize ? packed : decompress(compression, packed, rawSize, channels, dw, lines);
    if (raw.length !== rawSize) throw new ExrFormatError(`chunk ${k}: ${raw.length} bytes after decompression, expected ${rawSize}`);
    // lines one after another, each holding its channels in file order; the data window's columns
    // that fall inside the display window are x0..x1
    const x0 = Math.max(0, wx0 - dx0);
    const x1 = Math.min(dw, wx1 + 1 - dx0);
    let p = 0;
    for (let l = 0; l < lines; l++) {
      const row = y + l - wy0;
      const inside = row >= 0 && row < height;
      for (let c = 0; c < channels.length; c++) {
        const ch = channels[c];
        const lineStart = p;
        p += ch.size * dw;
        if (!inside || x1 <= x0) continue;
        const dst = dsts[c];
        const base = row * width + dx0 - wx0;
        if (ch.type === 'half') {
          for (let x = x0, q = lineStart + 2 * x0; x < x1; x++, q += 2) dst[base + x] = HALF_TO_FLOAT[raw[q] | (raw[q + 1] << 8)];
        } else if (ch.type === 'float') {
          for (let x = x0, q = lineStart + 4 * x0; x < x1; x++, q += 4) dst[base + x] = raw.readFloatLE(q);
        } else {
          for (let x = x0, q = lineStart + 4 * x0; x < x1; x++, q += 4) dst[base + x] = raw.readUInt32LE(q);
        }
      }
    }
  }
  return {
    width,
    height,
    channels: out,
    types: new Map(channels.map((ch) => [ch.name, ch.type])),
    compression,
    dataWindow,
    displayWindow,
    pixelAspectRatio,
    ...(chromaticities ? { chromaticities } : {}),
  };
}

function decompress(kind: string, packed: Buffer, rawSize: number, channels: Channel[], width: number, lines: number): Buffer {
  try {
    if (kind === 'zip' || kind === 'zips') return unpredict(inflateSync(packed));
    if (kind === 'rle') return unpredict(unRle(packed, rawSize));
    if (kind === 'piz') return unPiz(packed, rawSize, channels, width, lines);
  } catch (e) {
    if (e instanceof ExrFormatError) throw e;
    throw new ExrFormatError(`damaged ${kind.toUpperCase()} data: ${(e as Error).message}`);
  }
  throw new ExrFormatError(`${kind} data in a chunk that is not raw`);
}

/** Undo ZIP/RLE preprocessing: a running sum (delta predictor), then evens and odds interleaved. */
function unpredict(t: Buffer): Buffer {
  const n = t.length;
  let prev = t[0];
  for (let i = 1; i < n; i++) t[i] = prev = (prev + t[i] - 128) & 0xff;
  const out = Buffer.allocUnsafe(n);
  const half = (n + 1) >> 1;
  for (let k = 0; k < half; k++) out[2 * k] = t[k];
  for (let k = 0; half + k < n; k++) out[2 * k + 1] = t[half + k];
  return out;
}

/** OpenEXR's byte RLE: a signed count; negative = that many literal bytes, else one byte count+1 times. */
function unRle(src: Buffer, rawSize: number): Buffer {
  const out = Buffer.alloc(rawSize);
  let i = 0;
  let o = 0;
  while (i < src.length) {
    const n = (src[i++] << 24) >> 24;
    if (n < 0) {
      if (o - n > rawSize || i - n > src.length) throw new ExrFormatError('damaged RLE data (a run overflows)');
      src.copy(out, o, i, i - n);
      i -= n;
      o -= n;
    } else {
      if (o + n + 1 > rawSize || i >= src.length) throw new ExrFormatError('damaged RLE data (a run overflows)');
      out.fill(src[i++], o, o + n + 1);
      o += n + 1;
    }
  }
  if (o !== rawSize) throw new ExrFormatError(`damaged RLE data (${o} bytes, expected ${rawSize})`);
  return out;
}

// ---- PIZ: a bitmap of the 16-bit values used, a Huffman-coded 2-D Haar-like wavelet of the values
// mapped through that bitmap's lookup table, per channel over the chunk's lines.

function unPiz(src: Buffer, rawSize: number, channels: Channel[], width: number, lines: number): Buffer {
  let p = 0;
  if (src.length < 4) throw new ExrFormatError('damaged PIZ data (too short)');
  const minNonZero = src.readUInt16LE(0);
  const maxNonZero = src.readUInt16LE(2);
  p = 4;
  if (maxNonZero >= 8192) throw new ExrFormatError('damaged PIZ data (bitmap range)');
  const bitmap = new Uint8Array(8192);
  if (minNonZero <= maxNonZero) {
    const n = maxNonZero - minNonZero + 1;
    if (p + n > src.length) throw new ExrFormatError('damaged PIZ data (bitmap)');
    bitmap.set(src.subarray(p, p + n), minNonZero);
    p += n;
  }
  // reverse lookup: the k-th value present (zero is always present)
  const lut = new Uint16Array(65536);
  let k = 0;
  for (let i = 0; i < 65536; i++) if (i === 0 || bitmap[i >> 3] & (1 << (i & 7))) lut[k++] = i;
  const maxValue = k - 1;

  if (p + 4 > src.length) throw new ExrFormatError('damaged PIZ data (no Huffman length)');
  const hufBytes = src.readUInt32LE(p);
  p += 4;
  if (p + hufBytes > src.length) throw new ExrFormatError('damaged PIZ data (Huffman length)');
  const words = new Uint16Array(rawSize / 2);
  huffmanDecode(src.subarray(p, p + hufBytes), words);

  let base = 0;
  for (const ch of channels) {
    const wc = ch.size / 2;
    for (let j = 0; j < wc; j++) waveletDecode(words, base + j, width, wc, lines, wc * width, maxValue);
    base += width * lines * wc;
  }
  for (let i = 0; i < words.length; i++) words[i] = lut[words[i]];

  // channel-planar (all of a channel's lines together) -> lines of interleaved channels
  const out = Buffer.alloc(rawSize);
  let o = 0;
  const starts: number[] = [];
  base = 0;
  for (const ch of channels) {
    starts.push(base);
    base += width * lines * (ch.size / 2);
  }
  for (let y = 0; y < lines; y++) {
    channels.forEach((ch, ci) => {
      const n = width * (ch.size / 2);
      const from = starts[ci] + y * n;
      for (let i = 0; i < n; i++) o = out.writeUInt16LE(words[from + i], o);
    });
  }
  return out;
}

/** Inverse of the 2-D wavelet, in place over a strided (nx by ny) array of 16-bit words. */
function waveletDecode(a: Uint16Array, at: number, nx: number, ox: number, ny: number, oy: number, maxValue: number): void {
  const w14 = maxValue < 1 << 14;
  const n = Math.min(nx, ny);
  let p = 1;
  while (p <= n) p <<= 1;
  p >>= 1;
  let p2 = p;
  p >>= 1;
  const dec = w14 ? dec14 : dec16;
  const r = [0, 0];
  while (p >= 1) {
    const oy1 = oy * p;
    const oy2 = oy * p2;
    const ox1 = ox * p;
    const ox2 = ox * p2;
    const ey = at + oy * (ny - p2);
    let py = at;
    for (; py <= ey; py += oy2) {
      const ex = py + ox * (nx - p2);
      let px = py;
      for (; px <= ex; px += ox2) {
        const p01 = px + ox1;
        const p10 = px + oy1;
        const p11 = p10 + ox1;
        dec(a[px], a[p10], r);
        const i00 = r[0];
        const i10 = r[1];
        dec(a[p01], a[p11], r);
        const i01 = r[0];
        const i11 = r[1];
        dec(i00, i01, r);
        a[px] = r[0];
        a[p01] = r[1];
        dec(i10, i11, r);
        a[p10] = r[0];
        a[p11] = r[1];
      }
      if (nx & p) {
        const p10 = px + oy1;
        dec(a[px], a[p10], r);
        a[px] = r[0];
        a[p10] = r[1];
      }
    }
    if (ny & p) {
      const ex = py + ox * (nx - p2);
      for (let px = py; px <= ex; px += ox2) {
        const p01 = px + ox1;
        dec(a[px], a[p01], r);
        a[px] = r[0];
        a[p01] = r[1];
      }
    }
    p2 = p;
    p >>= 1;
  }
}

/** (l, h) -> (a, b) for data under 14 bits: l = floor((a+b)/2), h = a-b, as signed 16-bit words. */
function dec14(l: number, h: number, r: number[]): void {
  const ls = (l << 16) >> 16;
  const hs = (h << 16) >> 16;
  const ai = ls + (hs & 1) + (hs >> 1);
  r[0] = ai & 0xffff;
  r[1] = (ai - hs) & 0xffff;
}

/** (l, h) -> (a, b) for full 16-bit data, modulo 2^16 with offset 2^15. */
function dec16(l: number, h: number, r: number[]): void {
  const b = (l - (h >> 1)) & 0xffff;
  r[0] = (h + b - 0x8000) & 0xffff;
  r[1] = b;
}

// ---- OpenEXR's Huffman code: a 20-byte header (min and max symbol, table length, bit count,
// reserved), the code lengths of symbols min..max packed as 6-bit numbers with zero runs, then the
// bit stream (most significant bit first). Codes are canonical with longer codes numerically
// lower; the largest symbol (max) is a run marker followed by an 8-bit repeat count.

function huffmanDecode(src: Buffer, out: Uint16Array): void {
  if (out.length === 0) return;
  if (src.length < 20) throw new ExrFormatError('damaged PIZ data (Huffman header)');
  const im = src.readUInt32LE(0);
  const iM = src.readUInt32LE(4);
  const nBits = src.readUInt32LE(12);
  if (im > iM || iM > 65536) throw new ExrFormatError('damaged PIZ data (Huffman symbol range)');
  const bits = new BitReader(src, 20, src.length);
  const lengths = new Uint8Array(iM + 1);
  for (let s = im; s <= iM; s++) {
    const l = bits.read(6);
    if (l === 63) {
      const run = bits.read(8) + 6;
      if (s + run > iM + 1) throw new ExrFormatError('damaged PIZ data (code-length run)');
      s += run - 1;
    } else if (l >= 59) {
      const run = l - 59 + 2;
      if (s + run > iM + 1) throw new ExrFormatError('damaged PIZ data (code-length run)');
      s += run - 1;
    } else lengths[s] = l;
  }
  const tableEnd = 20 + src.readUInt32LE(8);
  if (tableEnd < bits.bytePos() || tableEnd > src.length) throw new ExrFormatError('damaged PIZ data (Huffman table length)');
  // canonical codes: count per length, then the first code of each length from the longest down
  const count = new Float64Array(60);
  for (let s = im; s <= iM; s++) count[lengths[s]]++;
  const first = new Float64Array(60);
  let code = 0;
  for (let l = 58; l > 0; l--) {
    first[l] = code;
    code = Math.floor((code + count[l]) / 2);
  }
  let maxLen = 0;
  const byCode: Map<number, Uint32Array> = new Map();
  const bucket: number[][] = Array.from({ length: 60 }, () => []);
  for (let s = im; s <= iM; s++) {
    const l = lengths[s];
    if (!l) continue;
    if (l > 53) throw new ExrFormatError('damaged PIZ data (code longer than 53 bits)');
    bucket[l].push(s); // symbols of one length get consecutive codes in symbol order
    maxLen = Math.max(maxLen, l);
  }
  for (let l = 1; l <= maxLen; l++) byCode.set(l, Uint32Array.from(bucket[l]));
  // a lookup table for codes up to TABLE bits: (symbol << 6) | length
  const TABLE = 12;
  const fast = new Float64Array(1 << TABLE);
  for (let l = 1; l <= Math.min(TABLE, maxLen); l++) {
    const syms = byCode.get(l)!;
    for (let i = 0; i < syms.length; i++) {
      const c0 = (first[l] + i) * (1 << (TABLE - l));
      for (let j = 0; j < 1 << (TABLE - l); j++) fast[c0 + j] = syms[i] * 64 + l;
    }
  }

  const data = new BitReader(src, tableEnd, src.length);
  const end = tableEnd * 8 + nBits;
  if (end > src.length * 8) throw new ExrFormatError('damaged PIZ data (bit count beyond the data)');
  let o = 0;
  while (o < out.length) {
    if (data.pos >= end) throw new ExrFormatError('damaged PIZ data (bit stream ends early)');
    let sym = -1;
    const e = fast[data.peek(TABLE)];
    if (e !== 0 && data.pos + (e % 64) <= end) {
      sym = Math.floor(e / 64);
      data.pos += e % 64;
    } else {
      let v = 0;
      for (let l = 1; l <= maxLen; l++) {
        if (data.pos >= end) break;
        v = v * 2 + data.read(1);
        if (count[l] && v >= first[l] && v < first[l] + count[l]) {
          sym = byCode.get(l)![v - first[l]];
          break;
        }
      }
      if (sym < 0) throw new ExrFormatError('damaged PIZ data (no Huffman code matches)');
    }
    if (sym === iM) {
      if (data.pos + 8 > end) throw new ExrFormatError('damaged PIZ data (run without a count)');
      const run = data.read(8);
      if (o === 0 || o + run > out.length) throw new ExrFormatError('damaged PIZ data (a run overflows)');
      out.fill(out[o - 1], o, o + run);
      o += run;
    } else {
      out[o++] = sym;
    }
  }
}

class BitReader {
  pos: number;
  constructor(
    private readonly b: Buffer,
    startByte: number,
    private readonly endByte: number,
  ) {
    this.pos = startByte * 8;
  }
  private byte(i: number): number {
    return i < this.endByte ? this.b[i] : 0;
  }
  /** the next n (<= 16) bits without consuming them; bits past the end read as 0 */
  peek(n: number): number {
    const i = this.pos >> 3;
    const v = (this.byte(i) << 16) | (this.byte(i + 1) << 8) | this.byte(i + 2);
    return (v >> (24 - (this.pos & 7) - n)) & ((1 << n) - 1);
  }
  read(n: number): number {
    if (this.pos + n > this.endByte * 8) throw new ExrFormatError('damaged PIZ data (reads past the end)');
    const v = this.peek(n);
    this.pos += n;
    return v;
  }
  bytePos(): number {
    return Math.ceil(this.pos / 8);
  }
}
