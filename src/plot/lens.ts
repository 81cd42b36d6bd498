// The lens drawing of `straylight lens --plot`: the prescription's meridional section to scale,
// glass elements filled between their two surfaces (cemented groups touch), every surface numbered
// as in the ghost table, the stop and its opening at the widest aperture, the sensor, a millimetre
// scale bar, and one ghost's rays traced along its path, in its tint, labelled with its name. The
// picture is cropped to the lens with margins.

import { elementRim, sag } from '../optics/geometry.js';
import type { LensSystem } from '../optics/ghost-system.js';
import { ghostPath, vertexZ, type LensModel } from '../optics/lens.js';
import { RayHit, planPath, tracePoints } from '../optics/trace.js';
import { el, svgDocument, text } from './svg.js';

export interface LensDrawing {
  /** index into system.ranked (0: the strongest) */
  ghost: number;
}

const H = 620;
const M = { left: 40, right: 60, top: 104, bottom: 96 };
/** the page is as wide as the lens needs at the height's scale, within these bounds */
const MIN_W = 900;
const MAX_W = 1400;

const hex = (rgb: readonly number[]) => `#${rgb.map((c) => Math.round(Math.max(0, Math.min(1, c)) * 255).toString(16).padStart(2, '0')).join('')}`;

export function lensSvg(lens: LensModel, system: LensSystem, opts: LensDrawing = { ghost: 0 }): string {
  const z = vertexZ(lens);
  const surfaces = lens.surfaces;
  const lengthMm = z[z.length - 1];
  const maxSemi = Math.max(...surfaces.filter((s) => !s.stop).map((s) => s.semiDiameterMm), lens.sensorWidthMm / 2);
  // millimetres to the page: the same scale both ways, fitted to the lens with margins
  const minZ = Math.min(0, ...surfaces.map((s, k) => z[k] + Math.min(0, sag(s.radiusMm, s.semiDiameterMm)))) - 4;
  const maxZ = lengthMm + 4;
  const fit = (H - M.top - M.bottom) / (2.2 * maxSemi);
  const W = Math.max(MIN_W, Math.min(MAX_W, M.left + M.right + (maxZ - minZ) * fit));
  const scale = Math.min((W - M.left - M.right) / (maxZ - minZ), fit);
  const X = (zz: number) => M.left + (zz - minZ) * scale;
  const Y = (yy: number) => M.top + (H - M.top - M.bottom) / 2 - yy * scale;
  const parts: string[] = [];
  const profile = (k: number, h: number, reverse = false) => {
    const pts: string[] = [];
    for (let i = 0; i <= 40; i++) {
      const y = (reverse ? 1 - (2 * i) / 40 : -1 + (2 * i) / 40) * h;
      pts.push(`${X(z[k] + sag(surfaces[k].radiusMm, y)).toFixed(2)},${Y(y).toFixed(2)}`);
    }
    return pts;
  };
  // an element's rim is its larger clear aperture (a lens is ground to one diameter); a surface is
  // drawn out to the rim of the element(s) it bounds (lens geometry checks that it reaches it)
  const extent = (k: number) => Math.max(surfaces[k].semiDiameterMm, elementRim(lens, k), k > 0 ? elementRim(lens, k - 1) : 0);
  // glass: between a surface and the next wherever glass follows it
  surfaces.forEach((s, k) => {
    if (s.stop || s.glass.kind === 'air' || k + 1 >= surfaces.length) return;
    const h = elementRim(lens, k);
    parts.push(el('polygon', { class: 'glass', 'data-surfaces': `${k + 1}-${k + 2}`, points: [...profile(k, h), ...profile(k + 1, h, true)].join(' '), fill: '#cfe3f7', stroke: '#3b6ea5', 'stroke-width': 1.2 }));
  });
  // the axis
  parts.push(el('line', { x1: X(minZ), x2: X(maxZ), y1: Y(0), y2: Y(0), stroke: '#999999', 'stroke-dasharray': '8 4 2 4', 'stroke-width': 1 }));
  // every surface's profile, numbered as in the ghost table; the stop and its opening
  const stopR = (system.focalLengthMm / (2 * lens.fNumberMin)) * system.stopRatio;
  // numbers in a row under the lens, at each vertex; a number too close to the last drops a row
  const rowY = Y(-maxSemi) + 22;
  let lastX = -Infinity;
  let row = 0;
  surfaces.forEach((s, k) => {
    const x = X(z[k]);
    row = x - lastX < 18 ? 1 - row : 0;
    lastX = x;
    const label = (colour: string) => [
      el('line', { x1: x, x2: x, y1: Y(-Math.max(s.semiDiameterMm, s.stop ? stopR : 0)) + 3, y2: rowY + row * 16 - 12, stroke: '#bbbbbb', 'stroke-width': 0.8 }),
      text(x, rowY + row * 16, String(k + 1), { class: 'surface-number', 'data-surface': k + 1, 'text-anchor': 'middle', fill: colour, 'font-size': 12 }),
    ];
    if (s.stop) {
      const outer = Math.max(stopR * 1.35, stopR + 3);
      for (const sign of [1, -1]) parts.push(el('line', { class: 'stop', x1: x, x2: x, y1: Y(sign * stopR), y2: Y(sign * outer), stroke: '#c08000', 'stroke-width': 4 }));
      parts.push(text(x, Y(outer) - 8, 'stop', { 'text-anchor': 'middle', fill: '#8a5a00', 'font-size': 12 }));
      parts.push(...label('#8a5a00'));
      return;
    }
    parts.push(el('polyline', { class: 'surface', 'data-surface': k + 1, points: profile(k, extent(k)).join(' '), fill: 'none', stroke: '#1f3f66', 'stroke-width': 1.5 }));
    parts.push(...label('#1f3f66'));
  });
  parts.push(text(M.left, rowY + 36, 'surface numbers as in the ghost table', { fill: '#777777', 'font-size': 11 }));
  // the sensor
  const half = lens.sensorWidthMm / 2;
  parts.push(el('line', { class: 'sensor', x1: X(lengthMm), x2: X(lengthMm), y1: Y(half), y2: Y(-half), stroke: '#222222', 'stroke-width': 3 }));
  parts.push(text(X(lengthMm), Y(half) - 10, 'sensor', { 'text-anchor': 'middle', fill: '#222222', 'font-size': 12 }));
  // the ghost's rays: a meridional fan across the pupil from a light slightly off the axis
  const g = system.ranked[opts.ghost];
  let caption = 'no ghost to draw';
  if (g) {
    const name = `${g.i + 1}-${g.j + 1}`;
    // the tint, darkened until it shows on the white page (bare glass gives a near-white ghost):
    // its relative luminance (Rec.709 weights, on the sRGB-coded values) at most 0.55
    const lum = 0.2126 * g.tint[0] + 0.7152 * g.tint[1] + 0.0722 * g.tint[2];
    const colour = hex(lum > 0.55 ? g.tint.map((c) => (c * 0.55) / lum) : g.tint);
    const plan = planPath(lens, ghostPath(lens, g), 550, stopR);
    const hit = new RayHit();
    const slope = 0.05;
    const norm = 1 / Math.hypot(1, slope);
    const ep = system.focalLengthMm / (2 * lens.fNumberMin);
    const launch = -minZ + 2;
    const rays: string[] = [];
    for (let t = -1; t <= 1.0001; t += 0.2) {
      const y0 = t * ep * 0.95;
      const pts = tracePoints(plan, 0, y0 - launch * slope, -launch, 0, slope * norm, norm, hit);
      if (pts.length === 0 || hit.vignette > 1 || hit.margin < 0) continue;
      const xy = [`${X(-launch).toFixed(2)},${Y(y0 - launch * slope).toFixed(2)}`];
      for (let q = 0; q < pts.length; q += 2) xy.push(`${X(pts[q]).toFixed(2)},${Y(pts[q + 1]).toFixed(2)}`);
      rays.push(el('polyline', { points: xy.join(' '), fill: 'none', stroke: colour, 'stroke-width': 1.2, 'stroke-opacity': 0.85 }));
    }
    parts.push(el('g', { class: 'ghost-rays', 'data-ghost': name, 'data-tint': colour }, ...rays));
    caption = `ghost ${name} (rank ${opts.ghost + 1}): reflects at surface ${g.i + 1}, then at ${g.j + 1}; its rays at 550 nm, in its tint`;
  }
  // a 10 mm scale bar (5 mm for small lenses)
  const bar = lengthMm > 40 ? 10 : 5;
  const bx = W - M.right - bar * scale - 60;
  const by = H - 18;
  parts.push(el('g', { class: 'scale-bar', 'data-mm': bar }, el('line', { x1: bx, x2: bx + bar * scale, y1: by, y2: by, stroke: '#222222', 'stroke-width': 3 }), text(bx + bar * scale + 8, by + 4, `${bar} mm`, { fill: '#222222', 'font-size': 12 })));
  // the name, then the note and the figures on one line when they fit in the width (DejaVu Sans
  // at 12 px is about 6.9 px a character), else the note on a line of its own
  const figures = `f ${system.focalLengthMm.toFixed(2)} mm, f/${lens.fNumberMin} widest (the stop drawn open)`;
  const room = Math.floor((W - M.left - M.right) / 6.9);
  const lines = !lens.note ? [figures] : lens.note.length + figures.length + 2 <= room ? [`${lens.note}; ${figures}`] : [lens.note.length <= room ? lens.note : `${lens.note.slice(0, room - 1)}\u2026`, figures];
  parts.push(text(M.left, 30, lens.name, { 'font-size': 17, fill: '#111111' }));
  lines.forEach((l, k) => parts.push(text(M.left, 50 + 16 * k, l, { 'font-size': 12, fill: '#444444' })));
  parts.push(text(M.left, 50 + 16 * lines.length, caption, { class: 'ghost-caption', 'font-size': 12, fill: '#444444' }));
  return svgDocument(W, H, ...parts);
}
