// The sequence renderer: frames in order, each encoded and written atomically; a failing frame is
// reported and the others go on; an abort stops between frames and leaves only whole files.

import { encodePng } from '../io/png.js';
import path from 'node:path';
import { OutputError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { ensureDir } from '../io/ensure-dir.js';
import { expandFramePath } from '../io/frame-path.js';
import type { FloatImage } from '../raster/image.js';
import type { ResolvedOutput, ResolvedShot } from '../shot/types.js';
import { renderFrame } from './render-frame.js';

export interface FrameRange {
  first: number;
  last: number;
}

export interface SequenceOptions {
  frames?: FrameRange;
  /** overrides shot.output.template (absolute) */
  template?: string;
  signal?: AbortSignal;
  onFrame?: (event: FrameEvent) => void;
  /** every rendered frame's float image, in frame order (for screening as frames are made) */
  onImage?: (frame: number, img: FloatImage) => void;
}

export type FrameEvent =
  | { kind: 'written'; frame: number; file: string; ms: number }
  | { kind: 'failed'; frame: number; error: string };

export interface SequenceResult {
  written: number[];
  failed: { frame: number; error: string }[];
  interrupted: boolean;
}

export function encodeFrame(shot: ResolvedShot, frame: number, output: ResolvedOutput = shot.output, img: FloatImage = renderFrame(shot, frame)): Buffer {
  return encodePng(img, {
    bitDepth: output.format === 'png8' ? 8 : 16,
    transfer: output.transfer,
    alpha: output.alpha,
  });
}

export async function renderSequence(shot: ResolvedShot, opts: SequenceOptions = {}): Promise<SequenceResult> {
  const range = opts.frames ?? { first: shot.frame.first, last: shot.frame.last };
  const template = opts.template ?? shot.output.template;
  const result: SequenceResult = { written: [], failed: [], interrupted: false };
  const folder = path.dirname(template);
  try {
    ensureDir(folder);
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    throw new OutputError(`cannot create the output folder ${folder}: ${err.code ?? err.message}`);
  }
  for (let f = range.first; f <= range.last; f++) {
    // let signal handlers run between frames
    await new Promise((resolve) => setImmediate(resolve));
    if (opts.signal?.aborted) {
      result.interrupted = true;
      break;
    }
    const start = performance.now();
    const file = expandFramePath(template, f);
    try {
      const img = renderFrame(shot, f);
      opts.onImage?.(f, img);
      writeFileAtomic(file, encodeFrame(shot, f, shot.output, img));
      result.written.push(f);
      opts.onFrame?.({ kind: 'written', frame: f, file, ms: performance.now() - start });
    } catch (e) {
      const error = (e as Error).message;
      result.failed.push({ frame: f, error });
      opts.onFrame?.({ kind: 'failed', frame: f, error });
    }
  }
  return result;
}
