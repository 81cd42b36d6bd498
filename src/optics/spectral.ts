// Wavelength samples across the visible range and their RGB weights: the CIE 1931 fit converted
// to linear sRGB, negative lobes clipped (a pass must not hold negative light), then normalised
// per channel so that a flat spectrum sums to white (a white source stays neutral).

import { xBar, yBar, zBar } from '../colour/cie.js';
import { xyzToLinearSrgb } from '../colour/srgb.js';

export interface SpectralSample {
  nm: number;
  rgb: [number, number, number];
}

const cache = new Map<number, SpectralSample[]>();

/** n stratified samples over 400-700 nm (midpoints of equal bands). */
export function spectralSamples(n: number): SpectralSample[] {
  let s = cache.get(n);
  if (s) return s;
  const lo = 400;
  const hi = 700;
  const band = (hi - lo) / n;
  const raw: SpectralSample[] = [];
  const sum = [0, 0, 0];
  for (let k = 0; k < n; k++) {
    // integrate the band finely so a few samples still carry the band's whole colour
    let x = 0;
    let y = 0;
    let z = 0;
    for (let t = 0; t < 20; t++) {
      const nm = lo + band * (k + (t + 0.5) / 20);
      x += xBar(nm);
      y += yBar(nm);
      z += zBar(nm);
    }
    const rgb = xyzToLinearSrgb(x, y, z).map((c) => Math.max(0, c)) as [number, number, number];
    rgb.forEach((c, i) => (sum[i] += c));
    raw.push({ nm: lo + band * (k + 0.5), rgb });
  }
  s = raw.map((r) => ({ nm: r.nm, rgb: r.rgb.map((c, i) => c / sum[i]) as [number, number, number] }));
  cache.set(n, s);
  return s;
}
