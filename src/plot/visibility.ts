// The visibility chart of `straylight visibility --plot`: each light's visibility (0..1, averaged
// over the shutter) against the shot's frame numbers, with timecodes under the frame ticks, grid
// lines, a legend naming each light, and the spans where a light is off the frame shaded in its
// colour. Tick positions carry data-value attributes so tests can read the scale back.

import { scaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import { el, esc, frameTicks, PALETTE, svgDocument, text, yLabel, yTicks } from './svg.js';

export interface VisibilityCurve {
  name: string;
  /** one value per frame, first to last */
  values: number[];
  /** per frame: the light's centre lies outside the frame */
  offFrame: boolean[];
}

export interface VisibilityChart {
  title: string;
  first: number;
  last: number;
  /** the timecode label of a frame number */
  timecode: (frame: number) => string;
  curves: VisibilityCurve[];
}

const W = 1200;
const H = 520;
const M = { left: 84, right: 210, top: 64, bottom: 92 };

/** Runs of true in a list, as [start, end] indices (inclusive). */
function runs(flags: boolean[]): [number, number][] {
  const out: [number, number][] = [];
  let start = -1;
  flags.forEach((f, i) => {
    if (f && start < 0) start = i;
    if (!f && start >= 0) {
      out.push([start, i - 1]);
      start = -1;
    }
  });
  if (start >= 0) out.push([start, flags.length - 1]);
  return out;
}

export function visibilitySvg(c: VisibilityChart): string {
  const x = scaleLinear().domain([c.first, Math.max(c.last, c.first + 1)]).range([M.left, W - M.right]);
  const y = scaleLinear().domain([0, 1]).range([H - M.bottom, M.top]);
  const parts: string[] = [];
  // shaded spans where a light is off the frame (half a frame either side of each frame)
  c.curves.forEach((cv, li) => {
    for (const [a, b] of runs(cv.offFrame)) {
      const x0 = x(Math.max(c.first, c.first + a - 0.5));
      const x1 = x(Math.min(c.last, c.first + b + 0.5));
      parts.push(el('rect', { class: 'off-frame', 'data-light': cv.name, x: x0, y: M.top, width: Math.max(1, x1 - x0), height: H - M.top - M.bottom, fill: PALETTE[li % PALETTE.length], 'fill-opacity': 0.12 }));
    }
  });
  parts.push(...yTicks(y, M.left, W - M.right, [0, 0.25, 0.5, 0.75, 1], (v) => v.toFixed(2)));
  // x ticks: whole frame numbers, with the timecode under each
  parts.push(...frameTicks(x, c.first, c.last, M.top, H - M.bottom, c.timecode));
  // axes' lines and labels
  parts.push(el('line', { x1: M.left, x2: M.left, y1: M.top, y2: H - M.bottom, stroke: '#444444', 'stroke-width': 1 }));
  parts.push(text((M.left + W - M.right) / 2, H - 22, 'frame (timecode below)', { 'text-anchor': 'middle', fill: '#222222' }));
  parts.push(yLabel(22, M.top, H - M.bottom, 'visibility (share of the light not covered)'));
  parts.push(text(M.left, 32, c.title, { 'font-size': 17, 'font-weight': 'bold', fill: '#111111' }));
  parts.push(text(M.left, 50, 'averaged over the open shutter; shaded: the light is outside the frame', { 'font-size': 12, fill: '#555555' }));
  // one line per light
  const path = line<number>()
    .x((_, i) => x(c.first + i))
    .y((v) => y(v));
  c.curves.forEach((cv, li) => {
    const colour = PALETTE[li % PALETTE.length];
    parts.push(el('path', { class: 'curve', 'data-light': cv.name, d: path(cv.values) ?? '', fill: 'none', stroke: colour, 'stroke-width': 2.5, 'stroke-linejoin': 'round' }));
  });
  // legend
  const lx = W - M.right + 24;
  c.curves.forEach((cv, li) => {
    const ly = M.top + 10 + li * 24;
    parts.push(
      el(
        'g',
        { class: 'legend', 'data-light': cv.name },
        el('line', { x1: lx, x2: lx + 28, y1: ly, y2: ly, stroke: PALETTE[li % PALETTE.length], 'stroke-width': 3 }),
        text(lx + 36, ly + 4, cv.name, { fill: '#222222' }),
      ),
    );
  });
  return svgDocument(W, H, ...parts, `<!-- ${esc(c.title)} -->`);
}
