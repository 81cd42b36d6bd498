// Encoding a rendered frame as the shot's output asks: PNG (8/16 bit) or OpenEXR.

import type { FloatImage } from '../raster/image.js';
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

/** Encode a frame; `at` (the shot's frame and the frame number) adds OpenEXR's timecode and rate. */
export function encodeOutput(img: FloatImage, o: ResolvedOutput, pixelAspect: number, at?: { frame: ResolvedFrame; n: number }): Buffer {
  if (o.format === 'exr') {
    const alpha = o.alpha === 'none' ? 'none' : o.alpha === 'emission' ? 'zero' : 'derived';
    const tc = at ? exrTimeCode(at.frame, at.n) : undefined;
    return encodeExr(img, { type: o.exr.type, compression: o.exr.compression, alpha, pixelAspect, ...(tc ? { timeCode: tc } : {}), ...(at ? { framesPerSecond: at.frame.rate } : {}) });
  }
  return encodePng(img, pngOptions(o));
}

/** Allocate and fault in the encoder's per-thread buffers for frames of this size (PNG only). */
export function prepareOutput(width: number, height: number, o: ResolvedOutput): void {
  if (o.format !== 'exr') prepareScanlines(width, height, pngOptions(o));
}
