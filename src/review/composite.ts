// Review composites: the pass added over the background plate in linear light (Porter & Duff
// "plus"), clipped to white and written with the sRGB curve as 8-bit PNGs, one per frame, each
// written atomically (a temporary name, then renamed).

import { writeFileAtomic } from '../io/atomic-write.js';
import { expandFramePath } from '../format/frame-path.js';
import { encodePng } from '../io/png.js';
import { FloatImage } from '../raster/image.js';
import { OutputError } from '../errors.js';
import type { LinearFrame } from '../io/read-frame.js';
import { addPlate, readPlate, readSource, type SequenceSource } from './source.js';
import { burnInto, type BurnIn } from './burn-in.js';

export function writeComposites(src: SequenceSource, plate: string, template: string, signal?: AbortSignal, burnIn?: BurnIn): number {
  let written = 0;
  for (const f of src.frames) {
    if (signal?.aborted) throw new OutputError(`${template}: interrupted after ${written} review frames`);
    const frame = readSource(src, f);
    const over = addPlate(frame, readPlate(plate, f, frame.width, frame.height));
    if (burnIn) burnInto(over, burnIn, f);
    writeCompositeFrame(over, expandFramePath(template, f));
    written++;
  }
  return written;
}

/** One composited frame (linear RGB, plate already added) as an 8-bit sRGB PNG, written atomically. */
export function writeCompositeFrame(frame: LinearFrame, file: string): void {
  const img = new FloatImage(frame.width, frame.height);
  for (let p = 0; p < frame.width * frame.height; p++) img.data.set([frame.rgb[p * 3], frame.rgb[p * 3 + 1], frame.rgb[p * 3 + 2], 0], p * 4);
  writeFileAtomic(file, encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
}
