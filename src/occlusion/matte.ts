// Mattes: per-frame images of what covers the lights, as coverage (alpha: 1 = covered) or scene
// depth. Formats plug in by file extension (PNG here; the OpenEXR reader registers itself too).

import { readFileSync } from 'node:fs';
import path from 'node:path';
import pngjs from 'pngjs';

const { PNG } = pngjs;

/** One channel of a matte frame, row-major from the top-left, values in the file's own range. */
export interface MatteImage {
  width: number;
  height: number;
  values: Float32Array;
}

export type MatteChannel = 'r' | 'g' | 'b' | 'a';

export type MatteDecoder = (file: string, channel: MatteChannel) => MatteImage;

const decoders = new Map<string, MatteDecoder>();

/** Register a decoder for a file extension (lower case, with the dot). */
export function registerMatteFormat(ext: string, decode: MatteDecoder): void {
  decoders.set(ext, decode);
}

export function matteFormats(): string[] {
  return [...decoders.keys()];
}

export function decodeMatte(file: string, channel: MatteChannel): MatteImage {
  const ext = path.extname(file).toLowerCase();
  const decode = decoders.get(ext);
  if (!decode) throw new Error(`no matte reader for ${ext} files (known: ${matteFormats().join(', ')})`);
  return decode(file, channel);
}

/** PNG, 8 or 16 bits: the channel scaled to [0, 1]; grey images give the same value in r, g, b. */
registerMatteFormat('.png', (file, channel) => {
  const png = PNG.sync.read(readFileSync(file), { skipRescale: true });
  const max = png.depth === 16 ? 65535 : 255;
  const c = { r: 0, g: 1, b: 2, a: 3 }[channel];
  const n = png.width * png.height;
  const values = new Float32Array(n);
  const d = png.data as unknown as ArrayLike<number>;
  for (let p = 0; p < n; p++) values[p] = d[p * 4 + c] / max;
  return { width: png.width, height: png.height, values };
});
