// Where a lens's ghosts land on the frame for a light at a chosen place (`lens --plot-ghosts`): the
// ghosts drawn by the renderer (given as a picture) with the strongest named as the table names
// them, at their centres (the paraxial centre: the optical centre plus k times the light's offset,
// on the line through the centre and the light), so a user can name the ghost to change.

import { el, svgDocument, text } from './svg.js';

export interface GhostMark {
  name: string;
  xPx: number;
  yPx: number;
}

export interface GhostMap {
  title: string;
  widthPx: number;
  heightPx: number;
  /** the rendered ghosts, a PNG data URI of widthPx x heightPx */
  picture: string;
  light: { xPx: number; yPx: number };
  centre: readonly [number, number];
  marks: GhostMark[];
}

const M = { left: 30, right: 30, top: 64, bottom: 40 };

export function ghostMapSvg(m: GhostMap): string {
  const W = m.widthPx + M.left + M.right;
  const H = m.heightPx + M.top + M.bottom;
  const X = (x: number) => M.left + x;
  const Y = (y: number) => M.top + y;
  const parts: string[] = [];
  parts.push(el('rect', { x: M.left, y: M.top, width: m.widthPx, height: m.heightPx, fill: '#000000' }));
  parts.push(el('image', { href: m.picture, x: M.left, y: M.top, width: m.widthPx, height: m.heightPx }));
  // the line every ghost sits on
  const dx = m.light.xPx - m.centre[0];
  const dy = m.light.yPx - m.centre[1];
  const far = 4 * Math.max(m.widthPx, m.heightPx) / Math.max(1e-9, Math.hypot(dx, dy));
  parts.push(el('clipPath', { id: 'frame' }, el('rect', { x: M.left, y: M.top, width: m.widthPx, height: m.heightPx })));
  parts.push(el('line', { x1: X(m.centre[0] - dx * far), y1: Y(m.centre[1] - dy * far), x2: X(m.centre[0] + dx * far), y2: Y(m.centre[1] + dy * far), stroke: '#666666', 'stroke-dasharray': '4 4', 'stroke-width': 1, 'clip-path': 'url(#frame)' }));
  parts.push(el('circle', { class: 'light', cx: X(m.light.xPx), cy: Y(m.light.yPx), r: 6, fill: 'none', stroke: '#ffffff', 'stroke-width': 2 }));
  parts.push(text(X(m.light.xPx) + 10, Y(m.light.yPx) - 8, 'light', { fill: '#ffffff', 'font-size': 12 }));
  m.marks.forEach((g, n) => {
    const inside = g.xPx >= 0 && g.yPx >= 0 && g.xPx <= m.widthPx && g.yPx <= m.heightPx;
    if (!inside) return;
    // labels alternate sides of the line, so neighbours along it do not cover each other
    const side = n % 2 === 0 ? 1 : -1;
    const len = Math.hypot(dx, dy) || 1;
    const ox = (-dy / len) * 14 * side;
    const oy = (dx / len) * 14 * side;
    parts.push(
      el(
        'g',
        { class: 'ghost-mark', 'data-ghost': g.name },
        el('circle', { cx: X(g.xPx), cy: Y(g.yPx), r: 3, fill: '#ffdd44' }),
        el('line', { x1: X(g.xPx), y1: Y(g.yPx), x2: X(g.xPx) + ox, y2: Y(g.yPx) + oy, stroke: '#ffdd44', 'stroke-width': 1 }),
        text(X(g.xPx) + ox * 1.3, Y(g.yPx) + oy * 1.3 + 4, g.name, { 'text-anchor': 'middle', fill: '#ffdd44', 'font-size': 12, stroke: '#000000', 'stroke-width': 3, 'paint-order': 'stroke' }),
      ),
    );
  });
  parts.push(text(M.left, 26, m.title, { 'font-size': 16, fill: '#111111' }));
  parts.push(text(M.left, 46, 'the ghosts as rendered (draft quality, exposure raised to show them); names as in the ghost table, at each ghost\'s centre', { 'font-size': 12, fill: '#444444' }));
  parts.push(text(M.left, H - 14, `frame ${m.widthPx}x${m.heightPx} px; optical centre (${m.centre[0]}, ${m.centre[1]}); dashed: the line through the centre and the light`, { 'font-size': 11, fill: '#555555' }));
  return svgDocument(W, H, ...parts);
}
