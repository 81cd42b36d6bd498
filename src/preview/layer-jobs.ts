// Which thread draws which of a preview frame's element layers. The ghosts, most of a frame's
// cost, are split between every thread by rank (alternate ranks: the ranking is by strength, so
// each share gets big and small ghosts alike); the other elements go, dearest first, to the thread
// with the least work so far. The shares of the ghost layer add up to the whole.

import { adoptShotAssets, matteProvider, renderFrame, shotAssets, shotAssetsKey, type ShotAssets } from '../render/render-frame.js';
import { passShot } from '../render/passes.js';
import type { FloatImage } from '../raster/image.js';
import type { ElementName, ResolvedShot } from '../shot/types.js';

export interface LayerJob {
  element: ElementName;
  /** for the ghosts: this thread's share of the ranked ghosts */
  share?: { index: number; count: number };
}

/** Rough relative cost of each element's layer at preview sizes (measured with --cpu-prof). */
const COST: Record<ElementName, number> = { ghosts: 10, glow: 2, dust: 1, starburst: 0.5, veil: 0.3, streak: 0.3, core: 0.2 };

/** Each thread's layer jobs for a frame with these elements. */
export function splitLayers(elements: ElementName[], threads: number): LayerJob[][] {
  const out: LayerJob[][] = Array.from({ length: threads }, () => []);
  const load = new Array<number>(threads).fill(0);
  if (elements.includes('ghosts')) {
    for (let t = 0; t < threads; t++) {
      out[t].push(threads === 1 ? { element: 'ghosts' } : { element: 'ghosts', share: { index: t, count: threads } });
      load[t] += COST.ghosts / threads;
    }
  }
  const rest = elements.filter((e) => e !== 'ghosts').sort((a, b) => COST[b] - COST[a]);
  for (const e of rest) {
    let t = 0;
    for (let k = 1; k < threads; k++) if (load[k] < load[t]) t = k;
    out[t].push({ element: e });
    load[t] += COST[e];
  }
  return out;
}

/** The last shot's assets: a reload that changes no lens, iris or dust setting reuses them. */
let lastAssets: { key: string; assets: ShotAssets } | undefined;

/** The pass shots of a thread's jobs, sharing the shot's lens, kernels and mattes. */
export function jobShots(shot: ResolvedShot, jobs: LayerJob[]): ResolvedShot[] {
  const key = shotAssetsKey(shot);
  if (lastAssets?.key === key) adoptShotAssets(shot, lastAssets.assets);
  const assets = shotAssets(shot);
  lastAssets = { key, assets };
  return jobs.map((j) => {
    const pass = passShot(shot, j.element);
    if (!j.share) return pass;
    const shared: ResolvedShot = { ...pass, ghosts: { ...pass.ghosts, share: j.share } };
    adoptShotAssets(shared, assets);
    return shared;
  });
}

/** Draw a thread's layers of frame n, into last frame's images where given. */
export function drawLayers(shot: ResolvedShot, shots: ResolvedShot[], n: number, reuse?: FloatImage[]): FloatImage[] {
  const mattes = matteProvider(shot);
  return shots.map((s, i) => renderFrame(s, n, undefined, mattes, reuse?.[i]));
}

/**
 * sum += gain x layer, a row at a time (a function per row, so V8 optimises it by call count in
 * the first frame rather than on stack replacement).
 */
export function addScaled(sum: Float32Array, layer: Float32Array, gain: number, rowFloats: number): void {
  for (let o = 0; o < sum.length; o += rowFloats) addRow(sum, layer, gain, o, o + rowFloats);
}

function addRow(sum: Float32Array, layer: Float32Array, gain: number, from: number, to: number): void {
  for (let i = from; i < to; i++) sum[i] += gain * layer[i];
}
