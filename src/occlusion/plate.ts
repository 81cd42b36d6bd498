// How much of a light's bright core shows in the plate at a place: the pixels within `radius` of
// it that are bright, each weighted by how far inside the circle it is and by how bright it is
// (0 at half the threshold, 1 at the threshold and above), so that a core's anti-aliased rim
// counts in part and the measure moves smoothly as the light moves by a fraction of a pixel.

import type { MatteImage } from './matte.js';

export function brightCore(plate: MatteImage, xPx: number, yPx: number, radius: number, threshold: number): number {
  let sum = 0;
  const x0 = Math.max(0, Math.floor(xPx - radius - 1));
  const x1 = Math.min(plate.width - 1, Math.ceil(xPx + radius + 1));
  const y0 = Math.max(0, Math.floor(yPx - radius - 1));
  const y1 = Math.min(plate.height - 1, Math.ceil(yPx + radius + 1));
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      const v = plate.values[y * plate.width + x];
      if (!(v > 0.5 * threshold)) continue;
      const w = radius + 0.5 - Math.hypot(x + 0.5 - xPx, y + 0.5 - yPx);
      if (w > 0) sum += Math.min(1, w) * Math.min(1, (v - 0.5 * threshold) / (0.5 * threshold));
    }
  }
  return sum;
}
