// The preview's drawing threads: every frame is drawn by all of them at once, each its share of
// the layers (layer-jobs.ts), so one frame comes back in about the time of its share, and the
// server's thread stays free to answer the page. Each thread sums its layers under the page's
// gains; this thread adds the threads' sums.

import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { ElementName, ResolvedShot } from '../shot/types.js';
import { addScaled, splitLayers, type LayerJob } from './layer-jobs.js';
import type { FromPreviewWorker, ToPreviewWorker } from './worker-entry.js';

/** The compiled thread script (tests run from src/, the thread always runs from dist/). */
function threadScript(): string {
  const here = fileURLToPath(import.meta.url);
  const beside = path.join(path.dirname(here), 'worker-entry.js');
  if (here.endsWith('.js') && existsSync(beside)) return beside;
  return path.join(path.resolve(path.dirname(here), '..', '..'), 'dist', 'src', 'preview', 'worker-entry.js');
}

interface Thread {
  worker: Worker;
  jobs: LayerJob[];
  /** replies awaited, in the order asked (a thread answers in order) */
  waiting: { resolve: (m: FromPreviewWorker) => void; reject: (e: Error) => void }[];
}

export class PreviewPool {
  private readonly threads: Thread[];
  private version = -1;
  private shot?: ResolvedShot;
  private closed = false;

  constructor(size: number) {
    this.threads = Array.from({ length: Math.max(1, size) }, () => {
      const t: Thread = { worker: new Worker(threadScript()), jobs: [], waiting: [] };
      t.worker.on('message', (m: FromPreviewWorker) => t.waiting.shift()?.resolve(m));
      const fail = (e: Error) => {
        for (const w of t.waiting.splice(0)) w.reject(e);
      };
      t.worker.on('error', (e) => fail(e));
      t.worker.on('exit', (code) => fail(new Error(`a preview thread stopped (exit ${code})`)));
      return t;
    });
  }

  /** Draw from now on with this shot (its elements split between the threads). */
  use(version: number, shot: ResolvedShot, elements: ElementName[]): void {
    this.version = version;
    this.shot = shot;
    const split = splitLayers(elements, this.threads.length);
    this.threads.forEach((t, i) => {
      t.jobs = split[i];
      t.worker.postMessage({ type: 'init', version, shot, jobs: t.jobs } satisfies ToPreviewWorker);
    });
  }

  /** Frame n summed under these gains (element -> multiplier; 0 or absent: off). */
  async compose(n: number, version: number, gains: Partial<Record<ElementName, number>>): Promise<Float32Array> {
    if (this.closed || !this.shot) throw new Error('the preview threads are not ready');
    if (version !== this.version) throw new Error('the shot was reloaded while this frame was asked for');
    const row = this.shot.frame.widthPx * 4;
    const replies = await Promise.all(
      this.threads.map(
        (t) =>
          new Promise<FromPreviewWorker>((resolve, reject) => {
            t.waiting.push({ resolve, reject });
            t.worker.postMessage({ type: 'frame', version, n, gains } satisfies ToPreviewWorker);
          }),
      ),
    );
    let sum: Float32Array | undefined;
    for (const r of replies) {
      if ('error' in r) throw new Error(r.error);
      if (!sum) sum = r.sum;
      else addScaled(sum, r.sum, 1, row);
    }
    return sum!;
  }

  async close(): Promise<void> {
    this.closed = true;
    await Promise.all(this.threads.map((t) => t.worker.terminate()));
  }
}
