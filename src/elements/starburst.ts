// The starburst: the iris's diffraction kernel (optics/diffraction.ts) laid over the light, its
// bins scaled to pixels by the physical size (lambda N_f D / N on the sensor) times an artistic
// size. Energy is the element's fraction of the light's flux; the kernel carries unit energy.

import type { StarburstKernel } from '../optics/diffraction.js';
import type { FloatImage } from '../raster/image.js';

export interface StarburstSplat {
  xPx: number;
  yPx: number;
  energy: readonly [number, number, number];
  /** one kernel bin, in pixels (horizontal) */
  binPx: number;
}

export function addStarburst(img: FloatImage, k: StarburstKernel, s: StarburstSplat, pixelAspect: number): void {
  const n = k.n;
  const h = n / 2;
  const [er, eg, eb] = s.energy;
  if (er <= 0 && eg <= 0 && eb <= 0) return;
  const binX = s.binPx;
  const binY = s.binPx * pixelAspect; // a bin is square on the sensor: more rows when pixels are wide
  if (binX < 1 || binY < 1) {
    // bins smaller than pixels: each bin's energy goes to the pixels around it (exact energy)
    for (let by = 0; by < n; by++) binRow(img, k.rgb, n, by, s.xPx, s.yPx, binX, binY, er, eg, eb);
    return;
  }
  // bins larger than pixels: each pixel reads the kernel (density per bin / pixels per bin)
  const scale = 1 / (binX * binY);
  const x0 = Math.max(0, Math.floor(s.xPx - h * binX));
  const x1 = Math.min(img.width - 1, Math.ceil(s.xPx + h * binX));
  const y0 = Math.max(0, Math.floor(s.yPx - h * binY));
  const y1 = Math.min(img.height - 1, Math.ceil(s.yPx + h * binY));
  for (let y = y0; y <= y1; y++) pixelRow(img.data, img.width, y, x0, x1, k.rgb, n, s.xPx, s.yPx, binX, binY, scale, s.energy);
}

// The two paths' rows are functions of their own: called hundreds of times a frame, V8 optimises
// them by call count in a thread's first frame, where frame-long loops would be compiled on stack
// replacement again in each new thread.

/** Kernel row `by` splatted onto the pixels (bins smaller than pixels). */
function binRow(img: FloatImage, rgb: Float32Array, n: number, by: number, xPx: number, yPx: number, binX: number, binY: number, er: number, eg: number, eb: number): void {
  const h = n / 2;
  const d = img.data;
  // bin n/2 (zero frequency) lands on the light: bin by's centre is (by - n/2) bins from it
  const fy = yPx + (by - h) * binY - 0.5;
  const iy = Math.floor(fy);
  const ty = fy - iy;
  if (iy < -1 || iy >= img.height) return;
  for (let bx = 0; bx < n; bx++) {
    const kk = (by * n + bx) * 3;
    const g = rgb[kk + 1];
    if (g === 0 && rgb[kk] === 0 && rgb[kk + 2] === 0) continue;
    const fx = xPx + (bx - h) * binX - 0.5;
    const ix = Math.floor(fx);
    const tx = fx - ix;
    if (ix < -1 || ix >= img.width) continue;
    const r = rgb[kk] * er;
    const gg = g * eg;
    const b = rgb[kk + 2] * eb;
    for (let oy = 0; oy < 2; oy++) {
      const y = iy + oy;
      if (y < 0 || y >= img.height) continue;
      const wy = oy ? ty : 1 - ty;
      for (let ox = 0; ox < 2; ox++) {
        const x = ix + ox;
        if (x < 0 || x >= img.width) continue;
        const w = (ox ? tx : 1 - tx) * wy;
        const i = (y * img.width + x) * 4;
        d[i] += r * w;
        d[i + 1] += gg * w;
        d[i + 2] += b * w;
      }
    }
  }
}

/** Pixel row y reading the kernel bilinearly (bins larger than pixels). */
function pixelRow(d: Float32Array, width: number, y: number, x0: number, x1: number, rgb: Float32Array, n: number, xPx: number, yPx: number, binX: number, binY: number, scale: number, energy: readonly [number, number, number]): void {
  const h = n / 2;
  // the pixel centre's place in bin-index coordinates (bin k's centre at k; the light at n/2)
  const fy = (y + 0.5 - yPx) / binY + h;
  const ky = Math.floor(fy);
  if (ky < 0 || ky + 1 >= n) return;
  const ty = fy - ky;
  for (let x = x0; x <= x1; x++) {
    const fx = (x + 0.5 - xPx) / binX + h;
    const kx = Math.floor(fx);
    if (kx < 0 || kx + 1 >= n) continue;
    const tx = fx - kx;
    const a = (ky * n + kx) * 3;
    const b = a + 3;
    const c = a + n * 3;
    const e = c + 3;
    const i = (y * width + x) * 4;
    for (let ch = 0; ch < 3; ch++) {
      const top = rgb[a + ch] + (rgb[b + ch] - rgb[a + ch]) * tx;
      const bot = rgb[c + ch] + (rgb[e + ch] - rgb[c + ch]) * tx;
      d[i + ch] += (top + (bot - top) * ty) * scale * energy[ch];
    }
  }
}
