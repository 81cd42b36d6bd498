// Encoding a rendered frame as the shot's output asks: PNG (8/16 bit) or OpenEXR.

import type { FloatImage } from '../raster/image.js';
import type { ResolvedOutput } from '../shot/types.js';
import { encodeExr } from './exr.js';
import { encodePng } from './png.js';

export function encodeOutput(img: FloatImage, o: ResolvedOutput, pixelAspect: number): Buffer {
  if (o.format === 'exr') return encodeExr(img, { type: o.exr.type, compression: o.exr.compression, alpha: o.alpha === 'none' ? 'none' : o.alpha === 'emission' ? 'zero' : 'derived', pixelAspect });
  return encodePng(img, { bitDepth: o.format === 'png8' ? 8 : 16, transfer: o.transfer, alpha: o.alpha === 'premultiplied' ? 'premultiplied' : 'none' });
}
