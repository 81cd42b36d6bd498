// Encoding a rendered frame as the shot's output asks: PNG (8/16 bit) or OpenEXR.

import type { FloatImage } from '../raster/image.js';
import type { ResolvedOutput } from '../shot/types.js';
import { encodeExr } from './exr.js';
import { encodePng, prepareScanlines, type PngOptions } from './png.js';

function pngOptions(o: ResolvedOutput): PngOptions {
  return { bitDepth: o.format === 'png8' ? 8 : 16, transfer: o.transfer, alpha: o.alpha === 'premultiplied' ? 'premultiplied' : 'none' };
}

export function encodeOutput(img: FloatImage, o: ResolvedOutput, pixelAspect: number): Buffer {
  if (o.format === 'exr') return encodeExr(img, { type: o.exr.type, compression: o.exr.compression, alpha: o.alpha === 'none' ? 'none' : o.alpha === 'emission' ? 'zero' : 'derived', pixelAspect });
  return encodePng(img, pngOptions(o));
}

/** Allocate and fault in the encoder's per-thread buffers for frames of this size (PNG only). */
export function prepareOutput(width: number, height: number, o: ResolvedOutput): void {
  if (o.format !== 'exr') prepareScanlines(width, height, pngOptions(o));
}
