// The flash-screening chart of `straylight flashes --plot`: over the frames (numbers and timecodes
// on x), the frame's relative luminance with the 0.80 darker-state limit, and the flashes a second
// of the busiest part of the frame (general and red) with the WCAG 2.x SC 2.3.1 limit of three;
// flagged spans shaded. A screening aid, as the report says; the chart's footnote says so too.

import { scaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import type { FlaggedSpan, FlashTraceFrame } from '../safety/flash.js';
import { DARK_LIMIT } from '../safety/flash.js';
import { el, frameTicks, svgDocument, text, yLabel, yTicks } from './svg.js';

export interface FlashChart {
  title: string;
  /** over black, or added over the plate */
  over: string;
  trace: FlashTraceFrame[];
  spans: FlaggedSpan[];
  timecode: (frame: number) => string;
}

const W = 1200;
const H = 640;
const M = { left: 84, right: 210, top: 70, bottom: 92 };
const GAP = 56;
/** WCAG 2.x SC 2.3.1: no more than three flashes in any one-second period */
const FLASH_LIMIT = 3;
const GENERAL = '#0072B2';
const RED = '#D55E00';
const LUM = '#555555';

export function flashesSvg(c: FlashChart): string {
  const first = c.trace.length ? c.trace[0].frame : 0;
  const last = c.trace.length ? c.trace[c.trace.length - 1].frame : 1;
  const x = scaleLinear().domain([first, Math.max(last, first + 1)]).range([M.left, W - M.right]);
  const panelH = (H - M.top - M.bottom - GAP) / 2;
  const top1 = M.top;
  const bottom1 = top1 + panelH;
  const top2 = bottom1 + GAP;
  const bottom2 = top2 + panelH;
  const yLum = scaleLinear().domain([0, 1]).range([bottom1, top1]);
  const maxRate = Math.max(6, ...c.trace.map((f) => Math.max(f.general.perSecond, f.red.perSecond)));
  const yRate = scaleLinear().domain([0, maxRate]).range([bottom2, top2]).nice();
  const parts: string[] = [];
  // flagged spans, shaded across both panels
  for (const s of c.spans) {
    const x0 = x(Math.max(first, s.firstFrame - 0.5));
    const x1 = x(Math.min(last, s.lastFrame + 0.5));
    for (const [t, b] of [[top1, bottom1], [top2, bottom2]]) {
      parts.push(el('rect', { class: 'flagged', 'data-kind': s.kind, 'data-first': s.firstFrame, 'data-last': s.lastFrame, x: x0, y: t, width: Math.max(1, x1 - x0), height: b - t, fill: s.kind === 'red' ? RED : GENERAL, 'fill-opacity': 0.14 }));
    }
  }
  // panel 1: luminance, with the darker-state limit
  parts.push(...yTicks(yLum, M.left, W - M.right, [0, 0.2, 0.4, 0.6, 0.8, 1], (v) => v.toFixed(1)));
  parts.push(...frameTicks(x, first, last, top1, bottom1, c.timecode, false));
  parts.push(el('line', { class: 'limit', 'data-value': DARK_LIMIT, x1: M.left, x2: W - M.right, y1: yLum(DARK_LIMIT), y2: yLum(DARK_LIMIT), stroke: '#000000', 'stroke-dasharray': '6 4', 'stroke-width': 1.2 }));
  parts.push(text(W - M.right - 4, yLum(DARK_LIMIT) - 6, 'darker state must be below 0.80 to count', { 'text-anchor': 'end', fill: '#222222', 'font-size': 11 }));
  const lum = (key: 'meanLum' | 'peakLum') =>
    line<FlashTraceFrame>()
      .x((f) => x(f.frame))
      .y((f) => yLum(f[key]))(c.trace) ?? '';
  parts.push(el('path', { class: 'curve', 'data-series': 'peak', d: lum('peakLum'), fill: 'none', stroke: LUM, 'stroke-width': 2 }));
  parts.push(el('path', { class: 'curve', 'data-series': 'mean', d: lum('meanLum'), fill: 'none', stroke: LUM, 'stroke-width': 1.5, 'stroke-dasharray': '2 3' }));
  parts.push(yLabel(22, top1, bottom1, 'relative luminance'));
  // panel 2: flashes a second, with the limit
  parts.push(...yTicks(yRate, M.left, W - M.right, yRate.ticks(6), (v) => String(v)));
  parts.push(...frameTicks(x, first, last, top2, bottom2, c.timecode));
  parts.push(el('line', { class: 'limit', 'data-value': FLASH_LIMIT, x1: M.left, x2: W - M.right, y1: yRate(FLASH_LIMIT), y2: yRate(FLASH_LIMIT), stroke: '#000000', 'stroke-dasharray': '6 4', 'stroke-width': 1.2 }));
  parts.push(text(W - M.right - 4, yRate(FLASH_LIMIT) - 6, 'limit: 3 flashes in any second (WCAG 2.x SC 2.3.1)', { 'text-anchor': 'end', fill: '#222222', 'font-size': 11 }));
  const rate = (kind: 'general' | 'red') =>
    line<FlashTraceFrame>()
      .x((f) => x(f.frame))
      .y((f) => yRate(f[kind].perSecond))(c.trace) ?? '';
  parts.push(el('path', { class: 'curve', 'data-series': 'general', d: rate('general'), fill: 'none', stroke: GENERAL, 'stroke-width': 2.5 }));
  parts.push(el('path', { class: 'curve', 'data-series': 'red', d: rate('red'), fill: 'none', stroke: RED, 'stroke-width': 2.5 }));
  parts.push(yLabel(22, top2, bottom2, 'flashes a second'));
  for (const [t, b] of [[top1, bottom1], [top2, bottom2]]) parts.push(el('line', { x1: M.left, x2: M.left, y1: t, y2: b, stroke: '#444444', 'stroke-width': 1 }));
  parts.push(text((M.left + W - M.right) / 2, H - 22, 'frame (timecode below)', { 'text-anchor': 'middle', fill: '#222222' }));
  parts.push(text(M.left, 30, c.title, { 'font-size': 17, fill: '#111111' }));
  parts.push(text(M.left, 50, `${c.over}; busiest part of the frame over the trailing second; shaded: flagged. A screening aid, not a certificate.`, { 'font-size': 12, fill: '#555555' }));
  // legend
  const lx = W - M.right + 24;
  const entries: [string, string, string | undefined][] = [
    ['brightest cell', LUM, undefined],
    ['frame mean', LUM, '2 3'],
    ['general flashes', GENERAL, undefined],
    ['red flashes', RED, undefined],
  ];
  entries.forEach(([name, colour, dash], i) => {
    const ly = M.top + 10 + i * 24;
    parts.push(el('g', { class: 'legend', 'data-series': name }, el('line', { x1: lx, x2: lx + 28, y1: ly, y2: ly, stroke: colour, 'stroke-width': 3, 'stroke-dasharray': dash }), text(lx + 36, ly + 4, name, { fill: '#222222' })));
  });
  return svgDocument(W, H, ...parts);
}
