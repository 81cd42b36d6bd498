// The anamorphic streak: the horizontal line spread of cylindrical optics. Its profile is an
// exponential along x (e-folding length L) times a Gaussian across (sigma), each integrating to 1,
// integrated over every pixel in closed form, so its energy is exactly its fraction of the light's
// flux, less what falls outside the frame.

import type { FloatImage } from '../raster/image.js';

export interface StreakSource {
  xPx: number;
  yPx: number;
  energy: readonly [number, number, number];
  /** e-folding length along the streak, display units (pixel heights) */
  lengthPx: number;
  /** standard deviation across it, pixels */
  thicknessPx: number;
}

function erf(x: number): number {
  // Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7)
  const s = Math.sign(x);
  const t = 1 / (1 + 0.3275911 * Math.abs(x));
  const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return s * y;
}

/** Integral of e^{-|u|/L} / (2L) from a to b. */
function expShare(a: number, b: number, L: number): number {
  const F = (u: number) => (u < 0 ? 0.5 * Math.exp(u / L) : 1 - 0.5 * Math.exp(-u / L));
  return F(b) - F(a);
}

export function addStreak(img: FloatImage, s: StreakSource, pixelAspect: number): void {
  const { xPx, yPx, lengthPx, thicknessPx, energy } = s;
  const d = img.data;
  const sq = Math.SQRT2 * thicknessPx;
  const xs = new Float64Array(img.width);
  // share of the energy in each column (its display extent is pixelAspect wide)
  for (let x = 0; x < img.width; x++) xs[x] = expShare((x - xPx) * pixelAspect, (x + 1 - xPx) * pixelAspect, lengthPx);
  const rows = Math.ceil(6 * thicknessPx) + 1;
  for (let y = Math.max(0, Math.floor(yPx) - rows); y <= Math.min(img.height - 1, Math.floor(yPx) + rows); y++) {
    const wy = 0.5 * (erf((y + 1 - yPx) / sq) - erf((y - yPx) / sq));
    if (wy <= 0) continue;
    let i = y * img.width * 4;
    for (let x = 0; x < img.width; x++, i += 4) {
      // the pixel's share of the energy over its own area (pixelAspect in display units)
      const w = (wy * xs[x]) / pixelAspect;
      d[i] += energy[0] * w;
      d[i + 1] += energy[1] * w;
      d[i + 2] += energy[2] * w;
    }
  }
}

/** The veil: a uniform lift of the whole frame carrying `energy` in all. */
export function addVeil(img: FloatImage, energy: readonly [number, number, number], pixelAspect: number): void {
  const per = 1 / (img.width * img.height * pixelAspect);
  const r = energy[0] * per;
  const g = energy[1] * per;
  const b = energy[2] * per;
  const d = img.data;
  for (let i = 0; i < d.length; i += 4) {
    d[i] += r;
    d[i + 1] += g;
    d[i + 2] += b;
  }
}
