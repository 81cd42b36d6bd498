// Each light's visibility frame by frame (averaged over the open shutter), where it is, and its
// effective intensity: what `visibility` prints and charts, and what the batch report charts.

import type { ResolvedShot } from '../shot/types.js';
import { shutterTimes } from '../timeline/shutter.js';
import { framesToTimecode } from '../timeline/timecode.js';
import { lightState } from './frame-state.js';
import { evalScalar } from '../timeline/track.js';
import { lightVisibility, matteProvider } from './render-frame.js';
import type { VisibilityChart } from '../plot/visibility.js';

export interface VisibilityRow {
  frame: number;
  light: string;
  /** where the light is on the frame (undefined: behind the camera) */
  xPx?: number;
  yPx?: number;
  /** the light's depth: its keys, or from the camera (undefined: neither) */
  depth?: number;
  visibility: number;
  effectiveIntensity: number;
}

export function visibilityRows(shot: ResolvedShot): VisibilityRow[] {
  const mattes = matteProvider(shot);
  const rows: VisibilityRow[] = [];
  for (let f = shot.frame.first; f <= shot.frame.last; f++) {
    const times = shutterTimes(shot.shutter, f, shot.seed);
    for (const light of shot.lights) {
      // both averaged over the open shutter; the effective intensity is the light that gets
      // through at each instant, averaged (not the product of the two averages)
      let v = 0;
      let vg = 0;
      for (const t of times) {
        const st = lightState(shot, light, t);
        const vt = lightVisibility(shot, light, t, mattes, st);
        v += vt;
        vg += vt * st.gain;
      }
      v /= times.length;
      const s = lightState(shot, light, f);
      const depth = light.depth ? evalScalar(light.depth, f) : s.depth;
      rows.push({ frame: f, light: light.name, ...(s.placed ? { xPx: s.xPx, yPx: s.yPx } : {}), ...(depth !== undefined ? { depth } : {}), visibility: v, effectiveIntensity: vg / times.length });
    }
  }
  return rows;
}

/** The rows as the visibility chart takes them. */
export function visibilityChart(shot: ResolvedShot, rows: VisibilityRow[], title: string): VisibilityChart {
  const { widthPx, heightPx } = shot.frame;
  return {
    title,
    first: shot.frame.first,
    last: shot.frame.last,
    timecode: (n) => framesToTimecode(shot.frame.timecodeStartFrames + (n - shot.frame.first), shot.frame.rate, shot.frame.dropFrame),
    curves: shot.lights.map((light) => {
      const mine = rows.filter((r) => r.light === light.name);
      return { name: light.name, values: mine.map((r) => r.visibility), offFrame: mine.map((r) => r.xPx === undefined || r.yPx === undefined || r.xPx < 0 || r.yPx < 0 || r.xPx >= widthPx || r.yPx >= heightPx) };
    }),
  };
}
