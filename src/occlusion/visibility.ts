// Visibility of a light's disk: the mean of (1 - coverage) over a fixed, well-spread pattern of
// points on the disk (a golden-angle spiral, Vogel's model), with the matte looked up bilinearly.
// The pattern is the same every frame, so a static occluder gives a steady value (no shimmer).
// Limb darkening (I(mu)/I(1) = 1 - u (1 - mu)) weights the points for sun-like lights.

import type { MatteImage } from './matte.js';

/** Points on the unit disk: golden-angle spiral with equal-area radii. */
export function diskPattern(n: number): { x: Float64Array; y: Float64Array } {
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const golden = Math.PI * (3 - Math.sqrt(5));
  for (let i = 0; i < n; i++) {
    const r = Math.sqrt((i + 0.5) / n);
    x[i] = r * Math.cos(i * golden);
    y[i] = r * Math.sin(i * golden);
  }
  return { x, y };
}

export const DEFAULT_SAMPLES = 128;

/** What covers the light at a point outside the matte's area. */
export type OffFramePolicy = 'clear' | 'hold' | 'hidden';

/** How much one matte covers a point (0..1); bilinear, with the off-frame policy outside. */
export interface CoverageLookup {
  (xPx: number, yPx: number): number;
}

/** Coverage from an alpha matte (1 = covered), bilinear. */
export function alphaCoverage(m: MatteImage, invert: boolean, off: OffFramePolicy): CoverageLookup {
  return (x, y) => {
    const v = sample(m, x, y, off);
    if (v === undefined) return off === 'hidden' ? 1 : 0;
    return invert ? 1 - v : v;
  };
}

/**
 * Coverage from a depth matte: only what lies nearer than the light covers it, softly across
 * `tolerance` scene units (half covered where the scene is exactly at the light's depth). Each of
 * the four nearest depth pixels is compared with the light first and the results are blended
 * (percentage-closer filtering, Reeves, Salesin & Cook 1987): blending the depths first would
 * invent in-between depths along an occluder's silhouette (halfway between a mast at 20 m and a
 * sky at 10^9 m is far behind any light) and shave half a pixel off every edge.
 */
export function depthCoverage(m: MatteImage, lightDepth: number, tolerance: number, off: OffFramePolicy): CoverageLookup {
  const tol = Math.max(tolerance, 1e-9);
  const test = (d: number) => {
    const c = 0.5 + (lightDepth - d) / tol;
    return c <= 0 ? 0 : c >= 1 ? 1 : c;
  };
  return (x, y) => {
    const c = sample(m, x, y, off, test);
    return c === undefined ? (off === 'hidden' ? 1 : 0) : c;
  };
}

/**
 * Bilinear lookup at pixel position (x, y) (pixel centres at +0.5) of the stored values, or of
 * `per(value)` when given (applied to each pixel before blending). Outside the matte: undefined
 * for 'clear' and 'hidden' (the caller decides), the nearest edge value for 'hold' (what covered
 * the light at the edge keeps covering it as it leaves).
 */
export function sample(m: MatteImage, x: number, y: number, off: OffFramePolicy, per?: (v: number) => number): number | undefined {
  if (x < 0 || y < 0 || x > m.width || y > m.height) {
    if (off !== 'hold') return undefined;
    x = Math.min(m.width, Math.max(0, x));
    y = Math.min(m.height, Math.max(0, y));
  }
  const fx = Math.min(m.width - 1, Math.max(0, x - 0.5));
  const fy = Math.min(m.height - 1, Math.max(0, y - 0.5));
  const x0 = Math.floor(fx);
  const y0 = Math.floor(fy);
  const x1 = Math.min(m.width - 1, x0 + 1);
  const y1 = Math.min(m.height - 1, y0 + 1);
  const tx = fx - x0;
  const ty = fy - y0;
  const v = m.values;
  let a = v[y0 * m.width + x0];
  let b = v[y0 * m.width + x1];
  let c = v[y1 * m.width + x0];
  let d = v[y1 * m.width + x1];
  if (per) {
    a = per(a);
    b = per(b);
    c = per(c);
    d = per(d);
  }
  const top = a + (b - a) * tx;
  const bot = c + (d - c) * tx;
  return top + (bot - top) * ty;
}

/**
 * Visibility (0..1) of a disk at (x, y) of radius r (display units; pixels are `pixelAspect`
 * wide), under every coverage lookup given (coverages combine as 1 - prod(1 - c)).
 */
export function diskVisibility(
  xPx: number,
  yPx: number,
  radiusPx: number,
  lookups: CoverageLookup[],
  opts: { samples?: number; limbDarkening?: number; pixelAspect?: number } = {},
): number {
  if (lookups.length === 0) return 1;
  const n = opts.samples ?? DEFAULT_SAMPLES;
  const { x, y } = pattern(n);
  const u = opts.limbDarkening ?? 0;
  const pa = opts.pixelAspect ?? 1;
  let sum = 0;
  let wsum = 0;
  for (let i = 0; i < n; i++) {
    const px = xPx + (x[i] * radiusPx) / pa;
    const py = yPx + y[i] * radiusPx;
    let clear = 1;
    for (const look of lookups) clear *= 1 - look(px, py);
    // limb darkening weight: mu = cos of the angle on the sun's sphere = sqrt(1 - rho^2)
    const w = u > 0 ? 1 - u * (1 - Math.sqrt(Math.max(0, 1 - x[i] * x[i] - y[i] * y[i]))) : 1;
    sum += w * clear;
    wsum += w;
  }
  return sum / wsum;
}

const patterns = new Map<number, { x: Float64Array; y: Float64Array }>();
function pattern(n: number) {
  let p = patterns.get(n);
  if (!p) {
    p = diskPattern(n);
    patterns.set(n, p);
  }
  return p;
}
