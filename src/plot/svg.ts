// A few helpers for writing SVG by hand (the charts are small and fixed in form, so strings are
// clearer than a DOM): escaping, elements from attribute maps, and the chart's frame: title, axes
// with ticks and grid lines, axis labels and a legend. Scales and line paths come from d3.

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
