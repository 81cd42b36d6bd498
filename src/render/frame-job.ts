// One frame's whole job, the same in the main thread and in a worker: render, encode, write
// atomically, and report the file's size and checksum plus the frame reduced for flash screening.

import { createHash } from 'node:crypto';
import { writeFileAtomic } from '../io/atomic-write.js';
import { encodeOutput, prepareOutput } from '../io/encode-frame.js';
import { reduceFrame, type FlashCells } from '../safety/flash.js';
import { FloatImage } from '../raster/image.js';
import type { ResolvedOutput, ResolvedShot } from '../shot/types.js';
import { renderFrame } from './render-frame.js';
import { renderLayers } from './passes.js';

export interface FrameJob {
  frame: number;
  file: string;
}

export interface FrameDone {
  frame: number;
  file: string;
  bytes: number;
  sha256: string;
  ms: number;
  cells: FlashCells;
}

export function sha256(data: Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** One image per thread, reused frame after frame (the job is done with it before the next). */
let scratch: FloatImage | undefined;

/**
 * Allocate this thread's frame and the encoder's buffers and write every page of them now. A fresh
 * 1080p frame is 33 MB and its 16-bit scanlines 12 MB, about 11,000 page faults when first written;
 * a worker does this while the main thread is still preparing the lens, so its first frame does not
 * pay them.
 */
export function prepareThread(width: number, height: number, output: ResolvedOutput): void {
  if (!scratch || scratch.width !== width || scratch.height !== height) {
    scratch = new FloatImage(width, height);
    scratch.data.fill(0);
  }
  prepareOutput(width, height, output);
}

export function runFrameJob(shot: ResolvedShot, job: FrameJob): FrameDone {
  const start = performance.now();
  const layered = shot.output.passes === 'layers' ? renderLayers(shot, job.frame, scratch) : undefined;
  const img = layered ? layered.combined : renderFrame(shot, job.frame, undefined, undefined, scratch);
  scratch = img;
  const png = encodeOutput(img, shot.output, shot.frame.pixelAspect, { frame: shot.frame, n: job.frame }, layered?.layers);
  writeFileAtomic(job.file, png);
  const cells = reduceFrame(img.width, img.height, img.data, 4);
  return { frame: job.frame, file: job.file, bytes: png.length, sha256: sha256(png), ms: performance.now() - start, cells };
}
