// A pool of render workers (worker_threads), one frame per task. At most one frame is in flight
// per worker, so memory stays flat however long the shot. A frame that throws, or whose worker
// dies, is tried once more (on a fresh worker if it died); then it is reported and the rest go on.

import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { ResolvedShot } from '../shot/types.js';
import type { FrameDone, FrameJob } from './frame-job.js';
import type { ShotAssets } from './render-frame.js';
import type { FromWorker, ToWorker, WorkerFault } from './worker-protocol.js';

/** The compiled worker script (tests run from src/, the worker always runs from dist/). */
export function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  const beside = path.join(path.dirname(here), 'worker-entry.js');
  if (here.endsWith('.js') && existsSync(beside)) return beside;
  const root = path.resolve(path.dirname(here), '..', '..');
  return path.join(root, 'dist', 'src', 'render', 'worker-entry.js');
}

export interface PoolCallbacks {
  done(result: FrameDone): void;
  /** badInput: the frame failed on the shot's own input (a damaged matte frame), not on the machine */
  failed(job: FrameJob, error: string, badInput: boolean): void;
}

interface Slot {
  worker: Worker;
  busy: { job: FrameJob; attempt: number } | undefined;
  ready: boolean;
}

export class RenderPool {
  private readonly slots: Slot[] = [];
  private queue: { job: FrameJob; attempt: number }[] = [];
  private stopping = false;
  private settle: (() => void) | undefined;
  /** milliseconds from spawning each worker to its first ready message */
  readonly startupMs: number[] = [];

  private assets: ShotAssets | undefined;

  /**
   * `assets` is called once, after the first workers are spawned: the workers load their modules
   * on the other cores while this thread prepares the lens and the diffraction kernel.
   */
  constructor(
    readonly size: number,
    private readonly shot: ResolvedShot,
    private readonly makeAssets: () => ShotAssets,
    private readonly callbacks: PoolCallbacks,
    private readonly fault?: WorkerFault,
  ) {}

  private spawn(): Slot {
    const born = performance.now();
    const frame = { widthPx: this.shot.frame.widthPx, heightPx: this.shot.frame.heightPx, output: this.shot.output };
    const worker = new Worker(workerScript(), { workerData: { fault: this.fault, frame } });
    const slot: Slot = { worker, busy: undefined, ready: false };
    worker.on('message', (msg: FromWorker) => this.onMessage(slot, msg, born));
    worker.on('error', () => this.onDeath(slot));
    worker.on('exit', (code) => {
      if (code !== 0 || slot.busy) this.onDeath(slot);
    });
    if (this.assets) this.init(slot);
    return slot;
  }

  private init(slot: Slot): void {
    slot.worker.postMessage({ type: 'init', shot: this.shot, assets: this.assets! } satisfies ToWorker);
  }

  private onMessage(slot: Slot, msg: FromWorker, born: number): void {
    if (msg.type === 'ready') {
      slot.ready = true;
      this.startupMs.push(performance.now() - born);
    } else if (msg.type === 'done') {
      slot.busy = undefined;
      this.callbacks.done(msg.result);
    } else {
      slot.busy = undefined;
      this.retryOrFail(msg.job, msg.badInput ? 1 : msg.attempt, msg.error, msg.badInput);
    }
    this.pump();
  }

  private onDeath(slot: Slot): void {
    const i = this.slots.indexOf(slot);
    if (i < 0) return;
    const lost = slot.busy;
    slot.busy = undefined;
    void slot.worker.terminate();
    this.slots.splice(i, 1);
    if (lost) this.retryOrFail(lost.job, lost.attempt, 'the worker rendering it stopped unexpectedly', false);
    if (!this.stopping && (this.queue.length > 0 || lost)) this.slots.push(this.spawn());
    this.pump();
  }

  private retryOrFail(job: FrameJob, attempt: number, error: string, badInput: boolean): void {
    if (attempt === 0 && !this.stopping) this.queue.unshift({ job, attempt: 1 });
    else this.callbacks.failed(job, error, badInput);
  }

  private pump(): void {
    for (const slot of this.slots) {
      if (this.stopping) break;
      if (slot.busy || !slot.ready) continue;
      const next = this.queue.shift();
      if (!next) break;
      slot.busy = next;
      slot.worker.postMessage({ type: 'frame', job: next.job, attempt: next.attempt } satisfies ToWorker);
    }
    if (this.settle && this.slots.every((s) => !s.busy) && (this.queue.length === 0 || this.stopping)) {
      const s = this.settle;
      this.settle = undefined;
      s();
    }
  }

  /** Render the jobs; resolves when all are done or failed, or (after stop) when none is in flight. */
  run(jobs: FrameJob[], signal?: AbortSignal): Promise<void> {
    this.queue = jobs.map((job) => ({ job, attempt: 0 }));
    signal?.addEventListener('abort', () => {
      this.stopping = true;
      this.pump();
    });
    const done = new Promise<void>((resolve) => (this.settle = resolve));
    const n = Math.min(this.size, Math.max(1, jobs.length));
    for (let i = 0; i < n; i++) this.slots.push(this.spawn());
    this.assets = this.makeAssets();
    for (const slot of this.slots) this.init(slot);
    if (signal?.aborted) this.stopping = true;
    this.pump();
    return done;
  }

  async close(): Promise<void> {
    this.stopping = true;
    await Promise.all(this.slots.map((s) => s.worker.terminate()));
    this.slots.length = 0;
  }
}
