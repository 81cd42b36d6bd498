// Which thread draws which of a preview frame's element layers. The other elements go, dearest
// first, to the thread with the least work so far; then the ghosts, most of a frame's cost, are
// split between the threads in shares that even out the threads' work (a share is a stretch of
// the golden-ratio sequence over the ranks, so each gets big and small ghosts alike). The shares
// of the ghost layer add up to the whole.

import { adoptShotAssets, matteProvider, renderFrame, shotAssets, shotAssetsKey, type ShotAssets } from '../render/render-frame.js';
import { passShot } from '../render/passes.js';
import type { FloatImage } from '../raster/image.js';
import type { ElementName, GhostShare, ResolvedShot } from '../shot/types.js';

export interface LayerJob {
  element: ElementName;
  /** for the ghosts: this thread's share of the ranked ghosts */
  share?: GhostShare;
}

/**
 * Rough relative cost of each element's layer at preview sizes: a draft frame of zoom-like-35 at
 * 960x540 with glow, starburst and streak, each layer timed alone (ghosts 75 ms, glow 14, starburst
 * 4.5, streak and core under 0.5); dust and veil from --cpu-prof.
 */
const COST: Record<ElementName, number> = { ghosts: 10, glow: 1.9, dust: 1, starburst: 0.6, veil: 0.3, streak: 0.1, core: 0.1 };

/** Each thread's layer jobs for a frame with these elements. */
export function splitLayers(elements: ElementName[], threads: number): LayerJob[][] {
  const out: LayerJob[][] = Array.from({ length: threads }, () => []);
  const load = new Array<number>(threads).fill(0);
  const rest = elements.filter((e) => e !== 'ghosts').sort((a, b) => COST[b] - COST[a]);
  const placed: LayerJob[][] = Array.from({ length: threads }, () => []);
  for (const e of rest) {
    let t = 0;
    for (let k = 1; k < threads; k++) if (load[k] < load[t]) t = k;
    placed[t].push({ element: e });
    load[t] += COST[e];
  }
  if (elements.includes('ghosts')) {
    // fill every thread up to the same total: the water level over the others' loads
    const sorted = [...load].sort((a, b) => a - b);
    let level = 0;
    for (let m = threads; m >= 1; m--) {
      const lower = sorted.slice(0, m);
      level = (COST.ghosts + lower.reduce((a, b) => a + b, 0)) / m;
      if (m === 1 || level >= sorted[m - 1]) break;
    }
    let from = 0;
    for (let t = 0; t < threads; t++) {
      const width = Math.max(0, level - load[t]) / COST.ghosts;
      // the last share ends at 1 exactly, so the shares tile [0, 1) whatever the rounding
      const to = t === threads - 1 ? 1 : Math.min(1, from + width);
      if (to > from) out[t].push(threads === 1 ? { element: 'ghosts' } : { element: 'ghosts', share: { from, to } });
      from = to;
    }
  }
  for (let t = 0; t < threads; t++) out[t].push(...placed[t]);
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

/** sum = gain x layer, a row at a time (as addScaled). */
export function setScaled(sum: Float32Array, layer: Float32Array, gain: number, rowFloats: number): void {
  for (let o = 0; o < sum.length; o += rowFloats) setRow(sum, layer, gain, o, o + rowFloats);
}

function setRow(sum: Float32Array, layer: Float32Array, gain: number, from: number, to: number): void {
  for (let i = from; i < to; i++) sum[i] = gain * layer[i];
}

function addRow(sum: Float32Array, layer: Float32Array, gain: number, from: number, to: number): void {
  for (let i = from; i < to; i++) sum[i] += gain * layer[i];
}
