// A preview drawing thread: told the shot (again at every reload) and its share of each frame's
// layers (layer-jobs.ts), it draws frames as asked, in order, keeps the last few frames' layers,
// and replies with its layers summed under the page's switches and gains: one image a frame,
// whichever settings, so a changed switch costs a sum here and no drawing. The reply is copied by
// the message, not transferred: a detached buffer throws away V8's optimised typed-array code in
// the thread (see render/worker-entry.ts). Shared memory was tried and measured slower: fresh
// shared buffers each frame made a frame take twice as long.

import { parentPort } from 'node:worker_threads';
import { FloatImage } from '../raster/image.js';
import type { ElementName, ResolvedShot } from '../shot/types.js';
import { addScaled, drawLayers, setScaled, jobShots, type LayerJob } from './layer-jobs.js';

export type ToPreviewWorker =
  | { type: 'init'; version: number; shot: ResolvedShot; jobs: LayerJob[] }
  /** gains: each element's multiplier on top of the shot's (0 or absent: off) */
  | { type: 'frame'; version: number; n: number; gains: Partial<Record<ElementName, number>> };
export type FromPreviewWorker = { version: number; n: number; sum: Float32Array } | { version: number; n: number; error: string };

/** Frames whose layers a thread keeps (each is a few frame-sized float images). */
const KEPT_FRAMES = 3;

let current: { version: number; shot: ResolvedShot; jobs: LayerJob[]; shots: ResolvedShot[] } | undefined;
const kept = new Map<number, FloatImage[]>();
let spare: FloatImage[] | undefined;
let scratch: FloatImage | undefined;

function layersOf(n: number): FloatImage[] {
  const c = current!;
  let imgs = kept.get(n);
  if (imgs) kept.delete(n);
  else {
    imgs = drawLayers(c.shot, c.shots, n, spare);
    spare = undefined;
  }
  kept.set(n, imgs);
  while (kept.size > KEPT_FRAMES) {
    const oldest = kept.keys().next().value!;
    spare = kept.get(oldest);
    kept.delete(oldest);
  }
  return imgs;
}

parentPort!.on('message', (msg: ToPreviewWorker) => {
  if (msg.type === 'init') {
    current = { version: msg.version, shot: msg.shot, jobs: msg.jobs, shots: jobShots(msg.shot, msg.jobs) };
    kept.clear();
    spare = undefined;
    return;
  }
  try {
    if (!current || current.version !== msg.version) throw new Error(`the preview thread has version ${current?.version ?? 'none'}, not ${msg.version}`);
    const imgs = layersOf(msg.n);
    const { widthPx: w, heightPx: h } = current.shot.frame;
    if (!scratch || scratch.width !== w || scratch.height !== h) scratch = new FloatImage(w, h);
    const sum = scratch.data;
    // the first layer drawn is written, not added to a cleared image: a pass over the frame less
    let first = true;
    current.jobs.forEach((job, k) => {
      const gain = msg.gains[job.element] ?? 0;
      if (!(gain > 0)) return;
      (first ? setScaled : addScaled)(sum, imgs[k].data, gain, w * 4);
      first = false;
    });
    if (first) sum.fill(0);
    parentPort!.postMessage({ version: msg.version, n: msg.n, sum } satisfies FromPreviewWorker);
  } catch (e) {
    parentPort!.postMessage({ version: msg.version, n: msg.n, error: e instanceof Error ? e.message : String(e) } satisfies FromPreviewWorker);
  }
});
