// The sequence renderer: which frames to render (range, shard, resume against the manifest), who
// renders them (in this thread, or a worker pool), and what is kept: every frame written atomically
// and recorded in the manifest, failures reported while the others go on, an abort that stops
// between frames with whole files and a consistent manifest, and flash screening in frame order.

import { existsSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { OutputError } from '../errors.js';
import { ensureDir } from '../io/ensure-dir.js';
import { expandFramePath } from '../format/frame-path.js';
import { TOOL_VERSION, manifestPath, readManifests, shotHash, writeManifest, type Manifest, type Shard } from '../io/manifest.js';
import type { FlashCells } from '../safety/flash.js';
import type { ResolvedShot } from '../shot/types.js';
import { runFrameJob, sha256, type FrameDone, type FrameJob } from './frame-job.js';
import { RenderPool } from './pool.js';
import { shotAssets } from './render-frame.js';
import type { WorkerFault } from './worker-protocol.js';

export interface FrameRange {
  first: number;
  last: number;
}

export interface SequenceOptions {
  frames?: FrameRange;
  /** overrides shot.output.template (absolute) */
  template?: string;
  /** render only this deterministic share of the frames: those whose index mod n is k */
  shard?: Shard;
  /** worker threads; 1 renders in this thread */
  jobs?: number;
  /** render every frame even if the manifest says it is already there */
  force?: boolean;
  signal?: AbortSignal;
  onFrame?: (event: FrameEvent) => void;
  /** every rendered frame's screening cells, in frame order */
  onCells?: (frame: number, cells: FlashCells) => void;
  /** tests only: make a worker fail or crash on a frame */
  fault?: WorkerFault;
}

export type FrameEvent =
  | { kind: 'written'; frame: number; file: string; ms: number }
  | { kind: 'skipped'; frame: number; file: string }
  | { kind: 'failed'; frame: number; error: string };

export interface SequenceResult {
  written: number[];
  skipped: number[];
  failed: { frame: number; error: string }[];
  interrupted: boolean;
  manifest: string;
  /** worker start-up times, ms (empty when rendering in this thread) */
  startupMs: number[];
}

/** The frames of a range that belong to a shard (by index from the range's first frame). */
export function shardFrames(range: FrameRange, shard?: Shard): number[] {
  const out: number[] = [];
  for (let f = range.first; f <= range.last; f++) if (!shard || (f - range.first) % shard.n === shard.k) out.push(f);
  return out;
}

/** Whether a file on disk is exactly what a manifest recorded. */
export function fileMatches(file: string, rec: { size: number; sha256: string } | undefined): boolean {
  if (!rec || !existsSync(file)) return false;
  if (statSync(file).size !== rec.size) return false;
  return sha256(readFileSync(file)) === rec.sha256;
}

export async function renderSequence(shot: ResolvedShot, opts: SequenceOptions = {}): Promise<SequenceResult> {
  const range = opts.frames ?? { first: shot.frame.first, last: shot.frame.last };
  const template = opts.template ?? shot.output.template;
  const folder = path.dirname(template);
  try {
    ensureDir(folder);
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    throw new OutputError(`cannot create the output folder ${folder}: ${err.code ?? err.message}`);
  }
  const hash = shotHash(shot);
  const mine = manifestPath(template, opts.shard);
  const manifest: Manifest = {
    version: 1,
    tool: TOOL_VERSION,
    shotHash: hash,
    shot: shot.file,
    template: path.basename(template),
    first: shot.frame.first,
    last: shot.frame.last,
    ...(opts.shard && opts.shard.n > 1 ? { shard: opts.shard } : {}),
    frames: {},
  };
  // what earlier renders of the same shot left, from any manifest of this sequence
  const known = new Map<number, { size: number; sha256: string }>();
  if (!opts.force) {
    for (const { manifest: m } of readManifests(template)) {
      if (m.shotHash !== hash) continue;
      for (const [f, rec] of Object.entries(m.frames)) known.set(Number(f), rec);
    }
  }
  // a manifest of this share, kept from earlier runs (frames outside this run's range stay listed)
  for (const { file, manifest: m } of readManifests(template)) {
    if (file === mine && m.shotHash === hash && !opts.force) Object.assign(manifest.frames, m.frames);
  }
  const result: SequenceResult = { written: [], skipped: [], failed: [], interrupted: false, manifest: mine, startupMs: [] };
  const todo: FrameJob[] = [];
  for (const f of shardFrames(range, opts.shard)) {
    const file = expandFramePath(template, f);
    const rec = known.get(f);
    if (!opts.force && fileMatches(file, rec)) {
      result.skipped.push(f);
      manifest.frames[String(f)] = rec!;
      opts.onFrame?.({ kind: 'skipped', frame: f, file });
    } else {
      delete manifest.frames[String(f)];
      todo.push({ frame: f, file });
    }
  }
  writeManifest(mine, manifest);

  // screening wants frames in order: hold early arrivals until their turn
  const order = todo.map((j) => j.frame);
  let nextIndex = 0;
  const held = new Map<number, FlashCells | null>();
  const release = () => {
    while (nextIndex < order.length && held.has(order[nextIndex])) {
      const f = order[nextIndex++];
      const cells = held.get(f);
      held.delete(f);
      if (cells) opts.onCells?.(f, cells);
    }
  };
  let lastSave = performance.now();
  const save = (force = false) => {
    if (force || performance.now() - lastSave > 500) {
      writeManifest(mine, manifest);
      lastSave = performance.now();
    }
  };
  const done = (r: FrameDone) => {
    manifest.frames[String(r.frame)] = { size: r.bytes, sha256: r.sha256 };
    result.written.push(r.frame);
    opts.onFrame?.({ kind: 'written', frame: r.frame, file: r.file, ms: r.ms });
    held.set(r.frame, r.cells);
    release();
    save();
  };
  const failed = (job: FrameJob, error: string) => {
    result.failed.push({ frame: job.frame, error });
    opts.onFrame?.({ kind: 'failed', frame: job.frame, error });
    held.set(job.frame, null);
    release();
  };

  const jobs = Math.max(1, opts.jobs ?? 1);
  if (jobs === 1 || todo.length <= 1) {
    for (const job of todo) {
      // let signal handlers run between frames
      await new Promise((resolve) => setImmediate(resolve));
      if (opts.signal?.aborted) break;
      let attempt = 0;
      for (;;) {
        try {
          done(runFrameJob(shot, job));
          break;
        } catch (e) {
          if (attempt++ === 0) continue;
          failed(job, (e as Error).message);
          break;
        }
      }
    }
  } else {
    const pool = new RenderPool(jobs, shot, () => shotAssets(shot), { done, failed }, opts.fault);
    try {
      await pool.run(todo, opts.signal);
    } finally {
      result.startupMs = pool.startupMs;
      await pool.close();
    }
  }
  result.interrupted = Boolean(opts.signal?.aborted) && result.written.length + result.failed.length < todo.length;
  result.written.sort((a, b) => a - b);
  result.failed.sort((a, b) => a.frame - b.frame);
  save(true);
  return result;
}
