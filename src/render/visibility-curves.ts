// Each light's visibility frame by frame (averaged over the open shutter), where it is, and its
// effective intensity: what `visibility` prints and charts, and what the batch report charts.

import type { ResolvedShot } from '../shot/types.js';
import { shutterTimes } from '../timeline/shutter.js';
import { framesToTimecode } from '../timeline/timecode.js';
import { lightGain, lightState } from './frame-state.js';
import { lightVisibility, matteProvider } from './render-frame.js';
import type { VisibilityChart } from '../plot/visibility.js';

export interface VisibilityRow {
  frame: number;
  light: string;
  xPx: number;
  yPx: number;
  visibility: number;
  effectiveIntensity: number;
}

export function visibilityRows(shot: ResolvedShot): VisibilityRow[] {
  const mattes = matteProvider(shot);
  const rows: VisibilityRow[] = [];
  for (let f = shot.frame.first; f <= shot.frame.last; f++) {
    const times = shutterTimes(shot.shutter, f, shot.seed);
    for (const light of shot.lights) {
      let v = 0;
      let g = 0;
      for (const t of times) {
        v += lightVisibility(shot, light, t, mattes);
        g += lightGain(light, t);
      }
      v /= times.length;
      g /= times.length;
      const s = lightState(light, f);
      rows.push({ frame: f, light: light.name, xPx: s.xPx, yPx: s.yPx, visibility: v, effectiveIntensity: v * g });
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
      return { name: light.name, values: mine.map((r) => r.visibility), offFrame: mine.map((r) => r.xPx < 0 || r.yPx < 0 || r.xPx >= widthPx || r.yPx >= heightPx) };
    }),
  };
}
