// The tracks `straylight lights` found, drawn over a frame of the plate: the frame as the picture,
// pixel axes along its top-left edges, each light's path in its own colour (solid where seen,
// dashed where predicted behind something), its place on the shown frame ringed, and a legend.

import { scaleLinear } from 'd3-scale';
import { el, PALETTE, svgDocument, text, yLabel } from './svg.js';

export interface PlateTracksChart {
  title: string;
  subtitle: string;
  width: number;
  height: number;
  /** the shown frame, as an 8-bit sRGB PNG */
  png: Uint8Array;
  frame: number;
  tracks: { name: string; first: number; last: number; predicted: number; points: { frame: number; x: number; y: number; predicted: boolean }[] }[];
}

export function plateTracksSvg(c: PlateTracksChart): string {
  const left = 70;
  const top = 64;
  const pw = Math.min(960, c.width);
  const ph = (pw * c.height) / c.width;
  const legendW = 260;
  const W = left + pw + 24 + legendW;
  const H = top + ph + 60;
  const x = scaleLinear().domain([0, c.width]).range([left, left + pw]);
  const y = scaleLinear().domain([0, c.height]).range([top, top + ph]);
  const parts: string[] = [
    text(left, 26, c.title, { 'font-size': 16, fill: '#111111' }),
    text(left, 46, c.subtitle, { 'font-size': 12, fill: '#555555' }),
    el('image', { x: left, y: top, width: pw, height: ph, preserveAspectRatio: 'none', href: `data:image/png;base64,${Buffer.from(c.png).toString('base64')}` }),
    el('rect', { x: left, y: top, width: pw, height: ph, fill: 'none', stroke: '#444444', 'stroke-width': 1 }),
  ];
  for (const t of x.ticks(8)) {
    parts.push(el('line', { x1: x(t), x2: x(t), y1: top + ph, y2: top + ph + 5, stroke: '#444444' }), text(x(t), top + ph + 19, String(t), { 'text-anchor': 'middle', fill: '#333333', class: 'tick x', 'data-value': t }));
  }
  for (const t of y.ticks(6)) {
    parts.push(el('line', { x1: left - 5, x2: left, y1: y(t), y2: y(t), stroke: '#444444' }), text(left - 8, y(t) + 4, String(t), { 'text-anchor': 'end', fill: '#333333', class: 'tick y', 'data-value': t }));
  }
  parts.push(text(left + pw / 2, top + ph + 42, 'x (px, from the left)', { 'text-anchor': 'middle', fill: '#222222' }), yLabel(22, top, top + ph, 'y (px, down from the top)'));
  const clip = el('clipPath', { id: 'plate' }, el('rect', { x: left, y: top, width: pw, height: ph }));
  const paths: string[] = [];
  c.tracks.forEach((tr, i) => {
    const colour = PALETTE[i % PALETTE.length];
    // runs of seen and predicted points, each joined to the next so the line is unbroken
    for (let k = 0; k + 1 < tr.points.length; k++) {
      const a = tr.points[k];
      const b = tr.points[k + 1];
      paths.push(el('line', { x1: x(a.x), y1: y(a.y), x2: x(b.x), y2: y(b.y), stroke: colour, 'stroke-width': 2.5, 'stroke-dasharray': a.predicted || b.predicted ? '5 4' : undefined, 'stroke-linecap': 'round' }));
    }
    const here = tr.points.find((p) => p.frame === c.frame);
    if (here) paths.push(el('circle', { cx: x(here.x), cy: y(here.y), r: 9, fill: 'none', stroke: colour, 'stroke-width': 2 }));
    const s = tr.points[0];
    paths.push(text(x(s.x) + 8, y(s.y) - 8, tr.name, { fill: colour, 'font-size': 13, 'font-weight': 'bold', stroke: '#000000', 'stroke-width': 3, 'paint-order': 'stroke' }));
    const ly = top + 10 + i * 40;
    parts.push(
      el('line', { x1: left + pw + 24, x2: left + pw + 54, y1: ly, y2: ly, stroke: colour, 'stroke-width': 3 }),
      text(left + pw + 62, ly + 4, tr.name, { fill: '#222222' }),
      text(left + pw + 62, ly + 20, `frames ${tr.first}-${tr.last}${tr.predicted ? `, ${tr.predicted} predicted` : ''}`, { fill: '#555555', 'font-size': 11 }),
    );
  });
  const ly = top + 10 + c.tracks.length * 40;
  parts.push(
    el('line', { x1: left + pw + 24, x2: left + pw + 54, y1: ly, y2: ly, stroke: '#555555', 'stroke-width': 2, 'stroke-dasharray': '5 4' }),
    text(left + pw + 62, ly + 4, 'predicted (hidden, wholly or in part)', { fill: '#555555', 'font-size': 11 }),
    el('circle', { cx: left + pw + 39, cy: ly + 26, r: 7, fill: 'none', stroke: '#555555', 'stroke-width': 2 }),
    text(left + pw + 62, ly + 30, `on the frame shown (${c.frame})`, { fill: '#555555', 'font-size': 11 }),
  );
  return svgDocument(W, H, clip, ...parts, el('g', { 'clip-path': 'url(#plate)' }, ...paths));
}

