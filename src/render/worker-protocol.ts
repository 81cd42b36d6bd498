// Messages between the main thread and render workers (discriminated unions).

import type { ResolvedShot } from '../shot/types.js';
import type { FrameDone, FrameJob } from './frame-job.js';
import type { ShotAssets } from './render-frame.js';

export type ToWorker = { type: 'init'; shot: ResolvedShot; assets: ShotAssets } | { type: 'frame'; job: FrameJob; attempt: number };

export type FromWorker =
  | { type: 'ready' }
  | { type: 'done'; result: FrameDone }
  | { type: 'failed'; job: FrameJob; attempt: number; error: string; badInput: boolean };

/** Test-only fault injection, given to a worker at start: fail or crash on one frame. */
export interface WorkerFault {
  frame: number;
  kind: 'throw' | 'crash';
  /** only on the first attempt (so the retry succeeds) or on every attempt */
  times: 'once' | 'always';
}
