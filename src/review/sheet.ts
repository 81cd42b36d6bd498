// Contact sheets: every Nth frame of a sequence as a tile (area-averaged in linear light, the plate
// added when asked), its frame number and timecode printed under it, on a dark grey ground. The
// result is display-referred linear RGB for an 8-bit sRGB PNG.

import { FloatImage } from '../raster/image.js';
import { framesToTimecode } from '../timeline/timecode.js';
import { drawText, GLYPH_H, textWidth } from './font.js';
import { addPlate, readPlate, readSource, type SequenceSource } from './source.js';
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

export const SHEET_LAYOUT = { margin: 8, gap: 8, textScale: 2, labelGap: 4 };
const GROUND = 0.0144; // about sRGB 32/255
const INK = 1;

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

export function contactSheet(src: SequenceSource, o: SheetOptions): { image: FloatImage; frames: number[] } {
  const frames = sheetFrames(src.frames, o.every);
  const { margin, gap, textScale, labelGap } = SHEET_LAYOUT;
  let tw = 0;
  let th = 0;
  let img: FloatImage | undefined;
  const label = GLYPH_H * textScale;
  const columns = Math.min(o.columns, frames.length);
  const rows = Math.ceil(frames.length / columns);
  frames.forEach((f, k) => {
    const frame = readSource(src, f);
    if (o.over) addPlate(frame, readPlate(o.over, f, frame.width, frame.height));
    if (!img) {
      ({ tw, th } = tileSize(frame.width, frame.height, o.tileWidth, src.pixelAspect));
      img = new FloatImage(margin * 2 + columns * tw + (columns - 1) * gap, margin * 2 + rows * (th + labelGap + label) + (rows - 1) * gap);
      const d = img.data;
      for (let i = 0; i < d.length; i += 4) d.fill(GROUND, i, i + 3);
    }
    const x0 = margin + (k % columns) * (tw + gap);
    const y0 = margin + Math.floor(k / columns) * (th + labelGap + label + gap);
    drawTile(img, frame, x0, y0, tw, th);
    const canvas = img;
    const plot = (x: number, y: number) => {
      if (x >= 0 && y >= 0 && x < canvas.width && y < canvas.height) canvas.data.fill(INK, (y * canvas.width + x) * 4, (y * canvas.width + x) * 4 + 3);
    };
    const number = String(f);
    drawText(number, x0, y0 + th + labelGap, textScale, plot);
    if (src.timecode) {
      const tc = framesToTimecode(src.timecode.startFrames + (f - src.timecode.first), src.timecode.rate, src.timecode.dropFrame);
      const w = textWidth(tc, textScale);
      // right-aligned, when it fits beside the number
      if (textWidth(number, textScale) + 3 * textScale + w <= tw) drawText(tc, x0 + tw - w, y0 + th + labelGap, textScale, plot);
    }
  });
  return { image: img!, frames };
}

/** Area-average the frame into a tw x th tile at (x0, y0), clipped to display white. */
function drawTile(img: FloatImage, f: LinearFrame, x0: number, y0: number, tw: number, th: number): void {
  const sx = f.width / tw;
  const sy = f.height / th;
  for (let ty = 0; ty < th; ty++) {
    const ya = ty * sy;
    const yb = ya + sy;
    for (let tx = 0; tx < tw; tx++) {
      const xa = tx * sx;
      const xb = xa + sx;
      let r = 0;
      let g = 0;
      let b = 0;
      let wsum = 0;
      for (let y = Math.floor(ya); y < Math.min(f.height, Math.ceil(yb)); y++) {
        const wy = Math.min(yb, y + 1) - Math.max(ya, y);
        for (let x = Math.floor(xa); x < Math.min(f.width, Math.ceil(xb)); x++) {
          const w = wy * (Math.min(xb, x + 1) - Math.max(xa, x));
          const i = (y * f.width + x) * 3;
          r += w * f.rgb[i];
          g += w * f.rgb[i + 1];
          b += w * f.rgb[i + 2];
          wsum += w;
        }
      }
      const o = ((y0 + ty) * img.width + x0 + tx) * 4;
      img.data[o] = Math.min(1, r / wsum);
      img.data[o + 1] = Math.min(1, g / wsum);
      img.data[o + 2] = Math.min(1, b / wsum);
    }
  }
}
