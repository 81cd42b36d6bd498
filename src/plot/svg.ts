// A few helpers for writing SVG by hand (the charts are small and fixed in form, so strings are
// clearer than a DOM): escaping, elements from attribute maps, and the chart's frame: title, axes
// with ticks and grid lines, axis labels and a legend. Scales and line paths come from d3.

import type { ScaleLinear } from 'd3-scale';

export type Attrs = Record<string, string | number | undefined>;

export function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** An element; children are already SVG text. */
export function el(tag: string, attrs: Attrs, ...children: string[]): string {
  const a = Object.entries(attrs)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => ` ${k}="${typeof v === 'number' ? +v.toFixed(2) : esc(v as string)}"`)
    .join('');
  return children.length ? `<${tag}${a}>${children.join('')}</${tag}>` : `<${tag}${a}/>`;
}

export function text(x: number, y: number, s: string, attrs: Attrs = {}): string {
  return el('text', { x, y, ...attrs }, esc(s));
}

/** The font every chart asks for; shipped with the package (io/svg-png.ts loads it). */
export const FONT = 'DejaVu Sans';

/** A colour-blind-safe palette (Okabe & Ito, "Color Universal Design", 2002). */
export const PALETTE = ['#E69F00', '#0072B2', '#009E73', '#D55E00', '#CC79A7', '#56B4E9', '#F0E442', '#000000'];

export function svgDocument(width: number, height: number, ...children: string[]): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n${el(
    'svg',
    { xmlns: 'http://www.w3.org/2000/svg', width, height, viewBox: `0 0 ${width} ${height}`, 'font-family': FONT, 'font-size': 13 },
    el('rect', { x: 0, y: 0, width, height, fill: '#ffffff' }),
    ...children,
  )}\n`;
}

/** Horizontal grid lines and labels at `ticks` (data-value carries each value for tests). */
export function yTicks(y: ScaleLinear<number, number>, left: number, right: number, ticks: number[], format: (v: number) => string): string[] {
  return ticks.map((v) =>
    el(
      'g',
      { class: 'tick y', 'data-value': v, transform: `translate(0,${y(v).toFixed(2)})` },
      el('line', { x1: left, x2: right, y1: 0, y2: 0, stroke: v === ticks[0] ? '#444444' : '#dddddd', 'stroke-width': 1 }),
      text(left - 8, 4, format(v), { 'text-anchor': 'end', fill: '#333333' }),
    ),
  );
}

/** Frame-number ticks along x between top and bottom, each with its timecode under it when `labels`. */
export function frameTicks(x: ScaleLinear<number, number>, first: number, last: number, top: number, bottom: number, timecode: (f: number) => string, labels = true): string[] {
  const ticks = x.ticks(Math.min(12, last - first + 1)).filter((t) => Number.isInteger(t));
  return ticks.map((t) =>
    el(
      'g',
      { class: 'tick x', 'data-value': t, transform: `translate(${x(t).toFixed(2)},0)` },
      el('line', { x1: 0, x2: 0, y1: top, y2: bottom, stroke: '#eeeeee', 'stroke-width': 1 }),
      el('line', { x1: 0, x2: 0, y1: bottom, y2: bottom + 5, stroke: '#444444', 'stroke-width': 1 }),
      ...(labels ? [text(0, bottom + 20, String(t), { 'text-anchor': 'middle', fill: '#333333' }), text(0, bottom + 36, timecode(t), { 'text-anchor': 'middle', fill: '#777777', 'font-size': 11 })] : []),
    ),
  );
}

/** A vertical axis label, centred on the panel. */
export function yLabel(xPos: number, top: number, bottom: number, label: string): string {
  const mid = (top + bottom) / 2;
  return text(xPos, mid, label, { 'text-anchor': 'middle', fill: '#222222', transform: `rotate(-90 ${xPos} ${mid})` });
}
