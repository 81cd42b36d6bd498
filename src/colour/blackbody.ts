// A light's colour from its blackbody temperature: Planck's law x CIE fit -> XYZ -> linear sRGB.

import { xBar, yBar, zBar } from './cie.js';
import { luminance, xyzToLinearSrgb } from './srgb.js';

/** Second radiation constant c2 = h c / k, in metre kelvin (CODATA). */
const C2 = 1.438777e-2;

/** Planck spectral radiance up to a constant factor, wavelength in nm. */
export function planck(nm: number, kelvin: number): number {
  const m = nm * 1e-9;
  return 1 / (Math.pow(m, 5) * (Math.exp(C2 / (m * kelvin)) - 1));
}

/** XYZ of a blackbody, integrated 360-830 nm in 1 nm steps, scaled to Y = 1. */
export function blackbodyXyz(kelvin: number): [number, number, number] {
  let x = 0;
  let y = 0;
  let z = 0;
  for (let nm = 360; nm <= 830; nm++) {
    const p = planck(nm, kelvin);
    x += p * xBar(nm);
    y += p * yBar(nm);
    z += p * zBar(nm);
  }
  return [x / y, 1, z / y];
}

/** Chromaticity (x, y) of a blackbody. */
export function blackbodyChromaticity(kelvin: number): [number, number] {
  const [x, y, z] = blackbodyXyz(kelvin);
  const s = x + y + z;
  return [x / s, y / s];
}

/**
 * Linear Rec.709 RGB of a blackbody with unit luminance. Colours outside the sRGB gamut (below
 * about 1700 K) have negative blue clamped to 0, then luminance restored.
 */
export function blackbodyRgb(kelvin: number): [number, number, number] {
  const [x, y, z] = blackbodyXyz(kelvin);
  const rgb = xyzToLinearSrgb(x, y, z).map((c) => Math.max(0, c)) as [number, number, number];
  const lum = luminance(rgb[0], rgb[1], rgb[2]);
  return [rgb[0] / lum, rgb[1] / lum, rgb[2] / lum];
}
