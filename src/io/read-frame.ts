// Reading frames back (rendered passes, plates) as linear RGB, premultiplied: the light each pixel
// adds. PNG through pngjs: the transfer is taken from the file (gAMA 1.0 means linear, anything else
// is decoded as sRGB, what straylight and most tools write) and straight alpha is applied. OpenEXR
// through our reader: R, G, B (or Y for grey) as stored, already linear and premultiplied.

import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import pngjs from 'pngjs';
import { srgbDecode } from '../colour/srgb.js';
import { InputError } from '../errors.js';
import { matrixFromChromaticities, spaceOfChromaticities } from '../colour/spaces.js';
import { decodeExr, ExrFormatError } from '../format/exr-read.js';
import { parseFrameTemplate, framePath } from '../format/frame-path.js';

const { PNG } = pngjs;

export interface LinearFrame {
  width: number;
  height: number;
  /** RGB, 3 floats a pixel */
  rgb: Float32Array;
}

const srgbTable = (() => {
  const t = new Float32Array(65536);
  for (let i = 0; i < 65536; i++) t[i] = srgbDecode(i / 65535);
  return t;
})();

export function readFrameLinear(file: string): LinearFrame {
  if (/\.exr$/i.test(file)) return readExrLinear(file);
  const png = PNG.sync.read(readFileSync(file), { skipRescale: true });
  const max = png.depth === 16 ? 65535 : 255;
  const linear = Math.abs((png.gamma || 0) - 1) < 1e-3;
  const n = png.width * png.height;
  const rgb = new Float32Array(n * 3);
  const d = png.data as unknown as ArrayLike<number>;
  for (let p = 0; p < n; p++) {
    const a = d[p * 4 + 3] / max;
    for (let c = 0; c < 3; c++) {
      const code = d[p * 4 + c];
      const v = linear ? code / max : srgbTable[Math.round((code / max) * 65535)];
      rgb[p * 3 + c] = v * a;
    }
  }
  return { width: png.width, height: png.height, rgb };
}

function readExrLinear(file: string): LinearFrame {
  let img;
  try {
    img = decodeExr(readFileSync(file));
  } catch (e) {
    if (e instanceof ExrFormatError) throw new InputError(`${file}: ${e.message}`);
    throw e;
  }
  const ch = img.channels;
  const names = ch.has('R') && ch.has('G') && ch.has('B') ? ['R', 'G', 'B'] : ch.has('Y') ? ['Y', 'Y', 'Y'] : undefined;
  if (!names) throw new InputError(`${file}: no R, G, B or Y channels to show (the file has ${[...ch.keys()].join(', ')})`);
  const [r, g, b] = names.map((c) => ch.get(c)!);
  const n = img.width * img.height;
  const rgb = new Float32Array(n * 3);
  // a file in other primaries (its chromaticities attribute) is shown converted to Rec.709
  const c = img.chromaticities;
  const m = c && names[0] === 'R' && spaceOfChromaticities(c) !== 'rec709' ? matrixFromChromaticities(c, 'rec709') : undefined;
  for (let p = 0; p < n; p++) {
    if (m) {
      const [x, y, z] = [r[p], g[p], b[p]];
      rgb[p * 3] = m[0] * x + m[1] * y + m[2] * z;
      rgb[p * 3 + 1] = m[3] * x + m[4] * y + m[5] * z;
      rgb[p * 3 + 2] = m[6] * x + m[7] * y + m[8] * z;
    } else {
      rgb[p * 3] = r[p];
      rgb[p * 3 + 1] = g[p];
      rgb[p * 3 + 2] = b[p];
    }
  }
  return { width: img.width, height: img.height, rgb };
}

/** Frame numbers present on disk for a template, in order. */
export function framesOnDisk(template: string): number[] {
  const t = parseFrameTemplate(template);
  if (typeof t === 'string') throw new Error(t);
  const dir = path.dirname(template);
  const base = path.basename(t.prefix);
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return [];
  }
  const re = new RegExp(`^${escape(base)}(-?\\d+)${escape(t.suffix)}$`);
  return names
    .map((n) => re.exec(n))
    .filter((m): m is RegExpExecArray => m !== null && path.basename(framePath(t, Number(m[1]))) === m[0])
    .map((m) => Number(m[1]))
    .sort((a, b) => a - b);
}

function escape(s: string): string {
  return s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
