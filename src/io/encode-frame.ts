// Encoding a rendered frame as the shot's output asks: PNG (8/16 bit) or OpenEXR.

import { COLOUR_SPACES, convertMatrix, type ColourSpace } from '../colour/spaces.js';
import { FloatImage } from '../raster/image.js';
import type { ResolvedFrame, ResolvedOutput } from '../shot/types.js';
import { nominalRate, framesToTimecode } from '../timeline/timecode.js';
import { encodeExr, type ExrTimeCode } from './exr.js';
import { encodePng, prepareScanlines, type PngOptions } from './png.js';

function pngOptions(o: ResolvedOutput): PngOptions {
  return { bitDepth: o.format === 'png8' ? 8 : 16, transfer: o.transfer, alpha: o.alpha === 'premultiplied' ? 'premultiplied' : 'none' };
}

/**
 * A frame's SMPTE timecode from the shot, as OpenEXR stores it; undefined above 30 frames a
 * second, where the two-bit frame-tens field of the packing cannot hold the frame label.
 */
export function exrTimeCode(frame: ResolvedFrame, n: number): ExrTimeCode | undefined {
  if (nominalRate(frame.rate) > 30) return undefined;
  const label = framesToTimecode(frame.timecodeStartFrames + (n - frame.first), frame.rate, frame.dropFrame);
  const [hours, minutes, seconds, f] = label.split(/[:;]/).map(Number);
  return { hours, minutes, seconds, frame: f, dropFrame: frame.dropFrame };
}

/** Encode a frame; `at` (the shot's frame and the frame number) adds OpenEXR's timecode and rate;
 * `layers`, OpenEXR layers beside the frame's own channels. */
export function encodeOutput(img: FloatImage, o: ResolvedOutput, pixelAspect: number, at?: { frame: ResolvedFrame; n: number }, layers?: { name: string; img: FloatImage }[]): Buffer {
  if (o.format === 'exr') {
    const alpha = o.alpha === 'none' ? 'none' : o.alpha === 'emission' ? 'zero' : 'derived';
    const tc = at ? exrTimeCode(at.frame, at.n) : undefined;
    const space = o.colourSpace === 'rec709' ? undefined : COLOUR_SPACES[o.colourSpace];
    const chromaticities = space ? [...space.red, ...space.green, ...space.blue, ...space.white] : undefined;
    return encodeExr(space ? inSpace(img, o.colourSpace) : img, { type: o.exr.type, compression: o.exr.compression, alpha, pixelAspect, ...(tc ? { timeCode: tc } : {}), ...(at ? { framesPerSecond: at.frame.rate } : {}), ...(chromaticities ? { chromaticities } : {}), ...(layers ? { layers: space ? layers.map((l) => ({ name: l.name, img: inSpace(l.img, o.colourSpace) })) : layers } : {}) });
  }
  return encodePng(img, pngOptions(o));
}

/** A copy of the (linear Rec.709) frame in another space; alpha as it is. */
function inSpace(img: FloatImage, space: ColourSpace): FloatImage {
  const m = convertMatrix('rec709', space);
  const out = new FloatImage(img.width, img.height);
  const s = img.data;
  const d = out.data;
  for (let i = 0; i < s.length; i += 4) {
    const r = s[i];
    const g = s[i + 1];
    const b = s[i + 2];
    d[i] = m[0] * r + m[1] * g + m[2] * b;
    d[i + 1] = m[3] * r + m[4] * g + m[5] * b;
    d[i + 2] = m[6] * r + m[7] * g + m[8] * b;
    d[i + 3] = s[i + 3];
  }
  return out;
}

/** Allocate and fault in the encoder's per-thread buffers for frames of this size (PNG only). */
export function prepareOutput(width: number, height: number, o: ResolvedOutput): void {
  if (o.format !== 'exr') prepareScanlines(width, height, pngOptions(o));
}
