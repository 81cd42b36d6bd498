// How much memory a render needs, worked out before it starts: each worker holds a float RGBA
// frame, its encoder's buffers, the ghost renderer's low-resolution layers, decoded matte frames
// and the diffraction kernel, on top of a thread's own cost; the main thread holds the shot, the
// prepared lens and the screening state. The worker count is lowered to what fits the memory
// available (or a budget given with --max-memory), and a render that cannot fit one is refused.
// The per-pixel figures are upper bounds of the buffers' sizes; the constants were measured (peak
// RSS of fresh-process renders in `npm run bench`; see docs/perf-notes.md).

import { freemem } from 'node:os';
import { ExitCode, StraylightError } from '../errors.js';
import { MATTE_CACHE_BYTES } from '../io/matte-provider.js';
import type { ResolvedShot } from '../shot/types.js';
import { activeElements } from './passes.js';
import { MAX_PAD_PX, smearApplies } from './shutter-smear.js';

/** A thread's own cost (V8 isolate, loaded modules, small buffers), bytes. */
const THREAD_BYTES = 64 * 2 ** 20;
/** The main process before any frame (runtime, shot, lens, screening), bytes. */
const MAIN_BYTES = 160 * 2 ** 20;
/** What the memory left free is allowed to be used for (the rest stays for the system and page cache). */
const USABLE = 0.8;

export const GiB = 2 ** 30;

/** Not enough memory for even one worker: nothing is rendered. */
export class MemoryError extends StraylightError {
  constructor(message: string) {
    super(message, ExitCode.memory);
  }
}

/** Bytes one rendering thread needs for this shot's frames (an upper bound). */
export function workerBytes(shot: ResolvedShot): number {
  const px = shot.frame.widthPx * shot.frame.heightPx;
  let perPx = 16; // the float RGBA frame
  // encoder: PNG rows (up to 8 bytes a pixel at 16-bit RGBA, plus the deflate output); OpenEXR
  // half or float lines and their compressed copy
  const o = shot.output;
  perPx += o.format === 'exr' ? (o.exr.type === 'float' ? 2 : 1) * 8 * 2 : o.format === 'png16' ? 8 * 2 : 4 * 2;
  // layers: each element's float frame beside the combined one, and its lines in the encoder
  if (o.passes === 'layers') perPx += activeElements(shot).length * (16 + (o.exr.type === 'float' ? 2 : 1) * 6 * 2);
  // ghost layers at 1/2, 1/4 and 1/8 resolution, RGB float
  if (shot.lens && shot.ghosts.enabled) perPx += 12 * (1 / 4 + 1 / 16 + 1 / 64);
  // the dust texture, one float a pixel
  if (shot.dust.fraction > 0) perPx += 4;
  // the smear shutter's scratch: the frame with a margin for the elements that move with the
  // light, another for ghosts drawn alone, and their low-resolution layers
  const smear = smearApplies(shot);
  if (smear) perPx += 16 + 16 + 12 * (1 / 4 + 1 / 16 + 1 / 64);
  let bytes = THREAD_BYTES + px * perPx;
  if (smear) bytes += 2 * 2 * MAX_PAD_PX * (shot.frame.widthPx + shot.frame.heightPx + 2 * MAX_PAD_PX) * 16 * 1.4;
  // decoded matte frames: a float a pixel each, the cache's budget per matte, and the decoder's
  // RGBA copy of the frame being read
  for (let i = 0; i < shot.mattes.length; i++) bytes += Math.max(2 * px * 4, Math.min(MATTE_CACHE_BYTES, 8 * px * 4)) + px * 4 * 2;
  return bytes;
}

/** Memory the render may use: a budget given by the user, or a share of what the system has free. */
export function availableBytes(): number {
  const free = freemem();
  const limit = (process as { constrainedMemory?: () => number }).constrainedMemory?.() ?? 0;
  const capped = limit > 0 ? Math.min(free, Math.max(0, limit - process.memoryUsage().rss)) : free;
  return capped * USABLE;
}

export interface WorkerPlan {
  jobs: number;
  /** bytes a worker needs, and the main process */
  perWorker: number;
  main: number;
  budget: number;
  /** why the count is lower than asked, to say once; undefined when it is as asked */
  note?: string;
}

const gib = (b: number) => (b < GiB ? `${Math.round(b / 2 ** 20)} MiB` : `${(b / GiB).toFixed(b < 10 * GiB ? 1 : 0)} GiB`);

/**
 * How many workers fit: `asked`, or fewer when they would not fit `budget` bytes. One worker
 * renders in the main thread. Throws MemoryError when even that does not fit.
 */
export function planWorkers(shot: ResolvedShot, asked: number, budget: number): WorkerPlan {
  const perWorker = workerBytes(shot);
  const main = MAIN_BYTES;
  const size = `${shot.frame.widthPx}x${shot.frame.heightPx}`;
  if (main + perWorker > budget) {
    throw new MemoryError(`not enough memory to render ${size} frames: one worker needs about ${gib(perWorker)} and ${gib(budget)} can be used; nothing was rendered. Free memory, render on a larger machine, or give a larger --max-memory`);
  }
  const fit = Math.max(1, Math.floor((budget - main) / perWorker));
  if (asked <= fit) return { jobs: asked, perWorker, main, budget };
  return {
    jobs: fit,
    perWorker,
    main,
    budget,
    note: `using ${fit} worker${fit === 1 ? '' : 's'} instead of ${asked}: each needs about ${gib(perWorker)} at ${size} and ${gib(budget)} can be used (--max-memory sets the budget)`,
  };
}

/** Parse a memory size: "8G", "512M", "1.5GiB", "2048MB" (binary units). */
export function parseMemorySize(text: string): number | undefined {
  const m = /^\s*(\d+(?:\.\d+)?)\s*([kmgt])?(?:i?b)?\s*$/i.exec(text);
  if (!m) return undefined;
  const unit = { k: 2 ** 10, m: 2 ** 20, g: 2 ** 30, t: 2 ** 40 }[(m[2] ?? '').toLowerCase() as 'k'] ?? 1;
  const bytes = Number(m[1]) * unit;
  return bytes > 0 ? bytes : undefined;
}

export function formatBytes(b: number): string {
  return gib(b);
}
