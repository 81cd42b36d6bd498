// The light's own disk: uniform radiance over a circle of the apparent radius, anti-aliased by the
// exact area each pixel has inside the circle. Its flux (radiance x area) is what the glare
// elements scale with.

import { diskRectArea } from '../raster/disk-coverage.js';
import type { FloatImage } from '../raster/image.js';

export interface DiskLight {
  xPx: number;
  yPx: number;
  /** radius in display units (pixel heights) */
  radiusPx: number;
  /** linear RGB radiance of the disk */
  radiance: readonly [number, number, number];
}

/** Flux of a disk: radiance x area, in pixel-height units squared. */
export function diskFlux(light: DiskLight): [number, number, number] {
  const area = Math.PI * light.radiusPx * light.radiusPx;
  return [light.radiance[0] * area, light.radiance[1] * area, light.radiance[2] * area];
}

/**
 * Add the disk to img. Geometry is in display units: a pixel is `pixelAspect` wide and 1 high, so
 * the disk is round on the display, and a pixel's value is radiance x covered area / pixel area.
 */
export function addDisk(img: FloatImage, light: DiskLight, pixelAspect: number, clearAt?: (xPx: number, yPx: number) => number): void {
  const { xPx, yPx, radiusPx: r, radiance } = light;
  const rx = r / pixelAspect;
  const x0 = Math.max(0, Math.floor(xPx - rx));
  const x1 = Math.min(img.width - 1, Math.floor(xPx + rx));
  const y0 = Math.max(0, Math.floor(yPx - r));
  const y1 = Math.min(img.height - 1, Math.floor(yPx + r));
  const cx = xPx * pixelAspect;
  const d = img.data;
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      let cover = diskRectArea(cx, yPx, r, x * pixelAspect, y, (x + 1) * pixelAspect, y + 1) / pixelAspect;
      if (cover <= 0) continue;
      if (clearAt) cover *= clearAt(x + 0.5, y + 0.5);
      const i = (y * img.width + x) * 4;
      d[i] += radiance[0] * cover;
      d[i + 1] += radiance[1] * cover;
      d[i + 2] += radiance[2] * cover;
    }
  }
}
