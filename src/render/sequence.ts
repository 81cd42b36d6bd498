// The sequence renderer: which frames to render (range, shard, resume against the manifest), who
// renders them (in this thread, or a worker pool), and what is kept: every frame written atomically
// and recorded in the manifest, failures reported while the others go on, an abort that stops
// between frames with whole files and a consistent manifest, and flash screening in frame order.

import { existsSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { InputError, OutputError } from '../errors.js';
import { checkWritableFolder, whyNotWritable } from '../io/output-file.js';
import { expandFramePath } from '../format/frame-path.js';
import { TOOL_VERSION, cleanStrayTempFiles, manifestPath, readManifests, recordHash, shotHash, withManifestLock, writeManifest, type Manifest, type ManifestFrame, type Shard } from '../io/manifest.js';
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
  /**
   * render every frame even if the manifest says it is already there, and replace files under the
   * frames' names that no manifest of this sequence records (without it those stop the render)
   */
  force?: boolean;
  signal?: AbortSignal;
  onFrame?: (event: FrameEvent) => void;
  /** every rendered frame's screening cells, in frame order */
  onCells?: (frame: number, cells: FlashCells) => void;
  /** tests only: make a worker fail or crash on a frame */
  fault?: WorkerFault;
  /** a plan already made by planSequence with these same options (spares hashing every file twice) */
  plan?: SequencePlan;
}

export type FrameEvent =
  | { kind: 'written'; frame: number; file: string; ms: number }
  | { kind: 'skipped'; frame: number; file: string }
  | { kind: 'failed'; frame: number; error: string; badInput: boolean };

export interface SequenceResult {
  written: number[];
  skipped: number[];
  /** badInput: the frame failed on the shot's input (a matte frame that will not decode) */
  failed: { frame: number; error: string; badInput: boolean }[];
  interrupted: boolean;
  manifest: string;
  /** worker start-up times, ms (empty when rendering in this thread) */
  startupMs: number[];
  /** things worth saying that did not stop the render (an unreadable manifest, cleaned temporary files) */
  warnings: string[];
}

/** How many foreign files a refusal names before it says "and N more". */
const FOREIGN_NAMED = 5;

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

/** What a render of a sequence would do, worked out from the manifests and files on disk. */
export interface SequencePlan {
  template: string;
  hash: string;
  /** this render's manifest (a shard's own) */
  manifest: string;
  kept: [number, ManifestFrame][];
  todo: FrameJob[];
  /** files under frame names that no manifest of the sequence records or plans */
  foreign: string[];
  warnings: string[];
}

/** Plan a render without writing anything (the output folder need not exist). */
export function planSequence(shot: ResolvedShot, opts: Pick<SequenceOptions, 'frames' | 'template' | 'shard' | 'force'> = {}): SequencePlan {
  const range = opts.frames ?? { first: shot.frame.first, last: shot.frame.last };
  const template = opts.template ?? shot.output.template;
  const hash = shotHash(shot);
  const warnings: string[] = [];
  const unreadable: string[] = [];
  const manifests = readManifests(template, unreadable);
  for (const u of unreadable) warnings.push(`${u} is not a manifest straylight can read; treated as absent (its frames are rendered again)`);
  // an unreadable manifest of this sequence says its files are ours, though not which
  const presumeOurs = unreadable.length > 0;
  // frames any render of this sequence recorded or set out to write: a file under such a name is
  // ours to replace (a damaged frame, one a killed render left); records of this shot's hash let
  // finished frames be kept
  const current = new Map<number, ManifestFrame>();
  const ours = new Set<number>();
  for (const { manifest: m } of manifests) {
    for (const f of m.pending ?? []) ours.add(f);
    for (const [f, rec] of Object.entries(m.frames)) {
      ours.add(Number(f));
      if (recordHash(m, rec) === hash) current.set(Number(f), rec);
    }
  }
  const plan: SequencePlan = { template, hash, manifest: manifestPath(template, opts.shard), kept: [], todo: [], foreign: [], warnings };
  for (const f of shardFrames(range, opts.shard)) {
    const file = expandFramePath(template, f);
    const rec = current.get(f);
    if (!opts.force && fileMatches(file, rec)) {
      plan.kept.push([f, rec!]);
    } else {
      if (!opts.force && !presumeOurs && !ours.has(f) && existsSync(file)) plan.foreign.push(file);
      plan.todo.push({ frame: f, file });
    }
  }
  return plan;
}

/** Refuse a plan that would replace files straylight did not write (named, at most a few). */
export function refuseForeign(foreign: string[]): void {
  if (foreign.length === 0) return;
  const n = foreign.length;
  const named = foreign.slice(0, FOREIGN_NAMED).join(', ');
  const more = n > FOREIGN_NAMED ? ` and ${n - FOREIGN_NAMED} more` : '';
  throw new InputError(`${n} file${n === 1 ? '' : 's'} already under the output's frame names ${n === 1 ? 'was' : 'were'} not written by straylight (no manifest beside ${n === 1 ? 'it' : 'them'} records ${n === 1 ? 'it' : 'them'}): ${named}${more}; nothing was rendered. Choose another output path, or give --force to replace ${n === 1 ? 'it' : 'them'}`);
}

export async function renderSequence(shot: ResolvedShot, opts: SequenceOptions = {}): Promise<SequenceResult> {
  const { template, hash, manifest: mine, kept, todo, foreign, warnings } = opts.plan ?? planSequence(shot, opts);
  // never replace what straylight did not write: said before anything is written
  refuseForeign(foreign);
  const folder = path.dirname(template);
  checkWritableFolder(folder);
  const result: SequenceResult = { written: [], skipped: [], failed: [], interrupted: false, manifest: mine, startupMs: [], warnings };
  const removed = cleanStrayTempFiles(template);
  if (removed > 0) warnings.push(`removed ${removed} temporary file${removed === 1 ? '' : 's'} left in ${folder} by an interrupted render`);
  for (const [f] of kept) {
    result.skipped.push(f);
    opts.onFrame?.({ kind: 'skipped', frame: f, file: expandFramePath(template, f) });
  }

  // This manifest keeps every record it had for frames this run does not render (any hash, and
  // frames outside the range), gains the kept frames, and loses those being rendered until each is
  // written. Saves merge under a lock with what other processes recorded in it meanwhile.
  const touched = new Set(todo.map((j) => j.frame));
  const own = new Map<string, ManifestFrame>(kept.map(([f, rec]) => [String(f), { size: rec.size, sha256: rec.sha256 }]));
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
  const writeMerged = () =>
    withManifestLock(mine, () => {
      const onDisk = readManifests(template).find((x) => x.file === mine)?.manifest;
      const frames: Record<string, ManifestFrame> = {};
      const pending = new Set([...touched].filter((f) => !own.has(String(f))));
      for (const f of onDisk?.pending ?? []) if (!touched.has(f) && !own.has(String(f))) pending.add(f);
      if (onDisk) {
        for (const [f, rec] of Object.entries(onDisk.frames)) {
          if (touched.has(Number(f)) || own.has(f)) continue;
          const h = recordHash(onDisk, rec);
          frames[f] = h === hash ? { size: rec.size, sha256: rec.sha256 } : { size: rec.size, sha256: rec.sha256, shotHash: h };
        }
      }
      for (const [f, rec] of own) frames[f] = rec;
      manifest.frames = Object.fromEntries(Object.entries(frames).sort((x, y) => Number(x[0]) - Number(y[0])));
      if (pending.size > 0) manifest.pending = [...pending].sort((x, y) => x - y);
      else delete manifest.pending;
      writeManifest(mine, manifest);
    });
  try {
    writeMerged();
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    throw new OutputError(err.code === 'ELOCKED' ? `${err.message}; try again when it is done` : `cannot write the manifest ${mine}: ${whyNotWritable(err)}`);
  }

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
      writeMerged();
      lastSave = performance.now();
    }
  };
  const done = (r: FrameDone) => {
    own.set(String(r.frame), { size: r.bytes, sha256: r.sha256 });
    result.written.push(r.frame);
    opts.onFrame?.({ kind: 'written', frame: r.frame, file: r.file, ms: r.ms });
    held.set(r.frame, r.cells);
    release();
    save();
  };
  const failed = (job: FrameJob, error: string, badInput: boolean) => {
    result.failed.push({ frame: job.frame, error, badInput });
    opts.onFrame?.({ kind: 'failed', frame: job.frame, error, badInput });
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
          const badInput = e instanceof InputError;
          if (attempt++ === 0 && !badInput) continue;
          failed(job, (e as Error).message, badInput);
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
