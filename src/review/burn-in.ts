// Burn-in for review frames and movies: a strip along the bottom of the picture naming the shot,
// the frame, its timecode, the lens and f-number, and the straylight version, set in the shipped
// font (an SVG strip rasterised by resvg) and laid over the linear frame with its own alpha.

import pngjs from 'pngjs';
import { srgbDecode } from '../colour/srgb.js';
import type { LinearFrame } from '../io/read-frame.js';
import { svgToPng } from '../io/svg-png.js';
import { el, esc } from '../plot/svg.js';
import { FONT } from '../plot/svg.js';

const { PNG } = pngjs;

export interface BurnIn {
  shot: string;
  lens?: string;
  version: string;
  /** the timecode label of a frame number */
  timecode?: (frame: number) => string;
}

/** The line burnt into a frame. */
export function burnInText(b: BurnIn, frame: number): string {
  return [b.shot, `frame ${frame}`, ...(b.timecode ? [b.timecode(frame)] : []), ...(b.lens ? [b.lens] : []), b.version].join('  |  ');
}

/** Height of the strip for a frame of this height: legible on a 540-line frame and up. */
export function stripHeight(heightPx: number): number {
  return Math.max(14, Math.round(heightPx * 0.04));
}

/** Lay the burn-in strip over the bottom of a linear frame (in place). */
export function burnInto(f: LinearFrame, b: BurnIn, frame: number): void {
  const h = Math.min(f.height, stripHeight(f.height));
  const size = Math.max(9, Math.round(h * 0.62));
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${f.width}" height="${h}" font-family="${FONT}">${el('rect', { x: 0, y: 0, width: f.width, height: h, fill: '#000000', 'fill-opacity': 0.55 })}${el(
    'text',
    { x: Math.round(h * 0.4), y: Math.round(h * 0.72), fill: '#ffffff', 'font-size': size, 'xml:space': 'preserve' },
    esc(burnInText(b, frame)),
  )}</svg>`;
  // resvg renders over a transparent ground here (no background): straight RGBA from the PNG
  const strip = PNG.sync.read(svgToPng(svg, 1, null));
  const y0 = f.height - h;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < f.width; x++) {
      const s = (y * f.width + x) * 4;
      const a = strip.data[s + 3] / 255;
      if (a === 0) continue;
      const o = ((y0 + y) * f.width + x) * 3;
      for (let c = 0; c < 3; c++) f.rgb[o + c] = srgbDecode(strip.data[s + c] / 255) * a + Math.min(1, f.rgb[o + c]) * (1 - a);
    }
  }
}
