// Contact sheets: every Nth frame of a sequence as a tile (area-averaged in linear light, the plate
// added when asked) on a dark grey ground, with the sheet's title above and each tile's frame
// number and timecode under it. The tiles are display-referred linear RGB; the labels are placed
// here and drawn as SVG text in the package's font (sheetSvg), rasterised by io/svg-png.ts.

import { FloatImage } from '../raster/image.js';
import { framesToTimecode } from '../timeline/timecode.js';
import { el, esc, svgDocument, text } from '../plot/svg.js';
import { addPlate, readPlate, readSource, resampleArea, type SequenceSource } from './source.js';
import type { LinearFrame } from '../io/read-frame.js';

export interface SheetOptions {
  /** every Nth frame, from the first */
  every: number;
  columns: number;
  /** tile width in pixels (at most the frame's own width) */
  tileWidth: number;
  /** a plate template to add the pass over */
  over?: string;
}

/** px: the sheet's margin, the gap between tiles, the title strip above them, each tile's label strip */
export const SHEET_LAYOUT = { margin: 8, gap: 8, title: 24, label: 18 };
const GROUND = 0.0144; // about sRGB 32/255
/** DejaVu Sans at 13 px: digits and colons are about 8.3 px wide (a bound for fitting a timecode) */
const CHAR_PX = 8.3;

export interface SheetLabel {
  /** the tile's top-left corner and width */
  x: number;
  y: number;
  width: number;
  frame: number;
  /** shown when it fits beside the number */
  timecode?: string;
}

/** Frames a sheet shows: every Nth from the first. */
export function sheetFrames(frames: number[], every: number): number[] {
  return frames.filter((_, i) => i % every === 0);
}

/** Tile size for a frame of w x h pixels of the given pixel aspect (tiles are shown desqueezed). */
export function tileSize(w: number, h: number, tileWidth: number, pixelAspect: number): { tw: number; th: number } {
  const tw = Math.max(1, Math.min(tileWidth, Math.round(w * pixelAspect)));
  const th = Math.max(1, Math.round((h * tw) / (w * pixelAspect)));
  return { tw, th };
}

export function contactSheet(src: SequenceSource, o: SheetOptions): { image: FloatImage; frames: number[]; labels: SheetLabel[]; tileHeight: number } {
  const frames = sheetFrames(src.frames, o.every);
  const { margin, gap, title, label } = SHEET_LAYOUT;
  let tw = 0;
  let th = 0;
  let img: FloatImage | undefined;
  const labels: SheetLabel[] = [];
  const columns = Math.min(o.columns, frames.length);
  const rows = Math.ceil(frames.length / columns);
  frames.forEach((f, k) => {
    const frame = readSource(src, f);
    if (o.over) addPlate(frame, readPlate(o.over, f, frame.width, frame.height));
    if (!img) {
      ({ tw, th } = tileSize(frame.width, frame.height, o.tileWidth, src.pixelAspect));
      img = new FloatImage(margin * 2 + columns * tw + (columns - 1) * gap, margin * 2 + title + rows * (th + label) + (rows - 1) * gap);
      const d = img.data;
      for (let i = 0; i < d.length; i += 4) d.fill(GROUND, i, i + 3);
    }
    const x0 = margin + (k % columns) * (tw + gap);
    const y0 = margin + title + Math.floor(k / columns) * (th + label + gap);
    drawTile(img, frame, x0, y0, tw, th);
    const tc = src.timecode ? framesToTimecode(src.timecode.startFrames + (f - src.timecode.first), src.timecode.rate, src.timecode.dropFrame) : undefined;
    // the timecode, right-aligned, only when it fits beside the number
    const fits = tc !== undefined && (String(f).length + 2 + tc.length) * CHAR_PX <= tw;
    labels.push({ x: x0, y: y0, width: tw, frame: f, ...(fits ? { timecode: tc } : {}) });
  });
  return { image: img!, frames, labels, tileHeight: th };
}

/**
 * The sheet as SVG: the tiles (a PNG data URI of the whole image, placed 1:1), the title above
 * them, and each tile's frame number (left) and timecode (right) under it.
 */
export function sheetSvg(picture: string, width: number, height: number, title: string, labels: SheetLabel[], tileHeight: number): string {
  const { margin, title: titleH } = SHEET_LAYOUT;
  const parts = [el('image', { href: picture, x: 0, y: 0, width, height })];
  parts.push(text(margin, margin + titleH - 9, title, { class: 'sheet-title', fill: '#eeeeee', 'font-size': 14 }));
  for (const l of labels) {
    const base = l.y + tileHeight + 14;
    parts.push(text(l.x, base, String(l.frame), { class: 'frame-number', 'data-frame': l.frame, fill: '#ffffff', 'font-size': 13 }));
    if (l.timecode) parts.push(text(l.x + l.width, base, l.timecode, { class: 'timecode', 'data-frame': l.frame, 'text-anchor': 'end', fill: '#bbbbbb', 'font-size': 13 }));
  }
  // the document's own white ground is covered by the image
  return svgDocument(width, height, ...parts).replace('<rect x="0" y="0"', `<!-- ${esc(title)} --><rect x="0" y="0"`);
}

/** Area-average the frame into a tw x th tile at (x0, y0), clipped to display white. */
function drawTile(img: FloatImage, f: LinearFrame, x0: number, y0: number, tw: number, th: number): void {
  const t = resampleArea(f, tw, th);
  for (let ty = 0; ty < th; ty++) {
    for (let tx = 0; tx < tw; tx++) {
      const i = (ty * tw + tx) * 3;
      const o = ((y0 + ty) * img.width + x0 + tx) * 4;
      img.data[o] = Math.min(1, t.rgb[i]);
      img.data[o + 1] = Math.min(1, t.rgb[i + 1]);
      img.data[o + 2] = Math.min(1, t.rgb[i + 2]);
    }
  }
}
