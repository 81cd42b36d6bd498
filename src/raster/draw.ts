// Anti-aliased lines and discs for plots (the lens cross-section, visibility curves): coverage
// from each pixel centre's distance to the segment.

import type { FloatImage } from './image.js';

export type Rgb = readonly [number, number, number];

/** Blend a segment of the given width (px) over the image in `colour`. */
export function drawLine(img: FloatImage, x0: number, y0: number, x1: number, y1: number, widthPx: number, colour: Rgb): void {
  const half = widthPx / 2;
  const minX = Math.max(0, Math.floor(Math.min(x0, x1) - half - 1));
  const maxX = Math.min(img.width - 1, Math.ceil(Math.max(x0, x1) + half + 1));
  const minY = Math.max(0, Math.floor(Math.min(y0, y1) - half - 1));
  const maxY = Math.min(img.height - 1, Math.ceil(Math.max(y0, y1) + half + 1));
  const dx = x1 - x0;
  const dy = y1 - y0;
  const len2 = dx * dx + dy * dy;
  for (let y = minY; y <= maxY; y++) {
    for (let x = minX; x <= maxX; x++) {
      const px = x + 0.5 - x0;
      const py = y + 0.5 - y0;
      const t = len2 > 0 ? Math.max(0, Math.min(1, (px * dx + py * dy) / len2)) : 0;
      const dist = Math.hypot(px - t * dx, py - t * dy);
      const cover = Math.max(0, Math.min(1, half + 0.5 - dist));
      if (cover <= 0) continue;
      const i = (y * img.width + x) * 4;
      for (let c = 0; c < 3; c++) img.data[i + c] = img.data[i + c] * (1 - cover) + colour[c] * cover;
      img.data[i + 3] = Math.max(img.data[i + 3], cover);
    }
  }
}

/** Draw a polyline through (x, y) pairs. */
export function drawPolyline(img: FloatImage, xy: readonly number[], widthPx: number, colour: Rgb): void {
  for (let k = 2; k + 1 < xy.length; k += 2) drawLine(img, xy[k - 2], xy[k - 1], xy[k], xy[k + 1], widthPx, colour);
}

/** Fill the image with one colour (opaque). */
export function fill(img: FloatImage, colour: Rgb): void {
  for (let i = 0; i < img.data.length; i += 4) {
    img.data[i] = colour[0];
    img.data[i + 1] = colour[1];
    img.data[i + 2] = colour[2];
    img.data[i + 3] = 1;
  }
}
