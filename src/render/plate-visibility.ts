// A plate matte: each light's visibility read from the plate itself. At every frame of the shot the
// light's bright core is measured where the light is (brightCore: plate pixels at or above the
// matte's threshold within 2 x radius + 2 px); the visibility is that measure over the light's clear
// level, at most 1. The clear level is the 75th percentile of the measure over the shot's frames:
// a light hidden on up to three quarters of them still has a clear frame as its reference, and the
// few percent a small core's pixel count wavers from frame to frame mostly stay at 1. A light the
// plate never shows bright where it is counts as uncovered. Measured once per shot, matte and light (every plate frame read
// once), so the result does not depend on which frames a worker renders or in what order.

import type { MatteProvider } from '../io/matte-provider.js';
import { brightCore } from '../occlusion/plate.js';
import type { ResolvedLight, ResolvedMatte, ResolvedShot } from '../shot/types.js';
import { lightState } from './frame-state.js';

/** Per light: the core measure at each frame of the shot, and its clear level. */
interface Measures {
  measured: Float64Array;
  clear: number;
}

/** The clear level's percentile of a light's measures over the shot. */
export const CLEAR_PERCENTILE = 0.75;

const tables = new WeakMap<MatteProvider, Map<string, Map<string, Measures>>>();

/** The share of the light's core the plate shows at shot frame `frame` (0..1). */
export function plateVisibility(shot: ResolvedShot, light: ResolvedLight, matte: ResolvedMatte, frame: number, mattes: MatteProvider): number {
  const { measured, clear } = plateMeasures(shot, matte, mattes).get(light.name)!;
  const { first, last } = shot.frame;
  const f = Math.min(last, Math.max(first, frame));
  return clear > 0 ? Math.min(1, measured[f - first] / clear) : 1;
}

/** Each light's core measure at every frame of the shot, for one plate matte. */
function plateMeasures(shot: ResolvedShot, matte: ResolvedMatte, mattes: MatteProvider): Map<string, Measures> {
  let byMatte = tables.get(mattes);
  if (!byMatte) tables.set(mattes, (byMatte = new Map()));
  let out = byMatte.get(matte.name);
  if (out) return out;
  const { first, last, widthPx, heightPx } = shot.frame;
  const lights = shot.lights.filter((l) => l.occludedBy.includes(matte.name));
  const raw = new Map(lights.map((l) => [l.name, new Float64Array(last - first + 1)]));
  for (let f = first; f <= last; f++) {
    const img = mattes.image(matte, f);
    if (!img) continue;
    const sx = img.width / widthPx;
    const sy = img.height / heightPx;
    for (const l of lights) {
      const s = lightState(shot, l, f);
      if (!s.placed) continue;
      raw.get(l.name)![f - first] = brightCore(img, s.xPx * sx, s.yPx * sy, (2 * l.radiusPx + 2) * sx, matte.plate!.threshold);
    }
  }
  out = new Map();
  for (const [name, measured] of raw) {
    const sorted = [...measured].sort((a, b) => a - b);
    out.set(name, { measured, clear: sorted[Math.min(sorted.length - 1, Math.floor(CLEAR_PERCENTILE * sorted.length))] });
  }
  byMatte.set(matte.name, out);
  return out;
}
