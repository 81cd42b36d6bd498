// Paraxial ray-transfer (ABCD) matrices on (height y, angle u), the oracle for the real tracer and
// a cheap way to size and rank ghosts. Translation T(d) = [[1, d], [0, 1]]; refraction n1 -> n2 at
// radius R: [[1, 0], [(n1 - n2) / (n2 R), n1 / n2]]; reflection at R: [[1, 0], [2 / R, 1]]. The path
// is unfolded: on a backward leg distances stay positive and each surface's radius is negated.

import { indexAfter, indexBefore, vertexZ, type LensModel, type LightPath } from './lens.js';

export type Mat2 = [number, number, number, number]; // [A, B, C, D]

export const IDENTITY: Mat2 = [1, 0, 0, 1];

/** a x b (apply b first, then a) */
export function mul(a: Mat2, b: Mat2): Mat2 {
  return [a[0] * b[0] + a[1] * b[2], a[0] * b[1] + a[1] * b[3], a[2] * b[0] + a[3] * b[2], a[2] * b[1] + a[3] * b[3]];
}

export const det = (m: Mat2) => m[0] * m[3] - m[1] * m[2];

export const translate = (d: number): Mat2 => [1, d, 0, 1];

/** Curvature 1/R (0 for a flat surface). */
const curv = (r: number) => (r === 0 ? 0 : 1 / r);

export const refraction = (n1: number, n2: number, radiusMm: number): Mat2 => [1, 0, ((n1 - n2) * curv(radiusMm)) / n2, n1 / n2];

export const reflection = (radiusMm: number): Mat2 => [1, 0, 2 * curv(radiusMm), 1];

/**
 * Matrix of a path from just before the first surface to the plane `toZ` (default: the sensor),
 * at one wavelength.
 */
export function pathMatrix(lens: LensModel, path: LightPath, nm: number, toZ?: number): Mat2 {
  const z = vertexZ(lens);
  let m: Mat2 = IDENTITY;
  let at = z[0];
  for (const ev of path) {
    const k = ev.surface;
    const s = lens.surfaces[k];
    m = mul(translate(Math.abs(z[k] - at)), m);
    at = z[k];
    const r = ev.dir === 1 ? s.radiusMm : -s.radiusMm;
    if (ev.action === 'reflect') {
      m = mul(reflection(r), m);
    } else if (!s.stop) {
      const [n1, n2] = ev.dir === 1 ? [indexBefore(lens, k, nm), indexAfter(lens, k, nm)] : [indexAfter(lens, k, nm), indexBefore(lens, k, nm)];
      m = mul(refraction(n1, n2, r), m);
    }
  }
  const end = toZ ?? z[z.length - 1];
  return mul(translate(Math.abs(end - at)), m);
}

/** Effective focal length: -1 / C of the lens's own matrix (first vertex to last vertex). */
export function focalLength(lens: LensModel, nm = 587.5618): number {
  const z = vertexZ(lens);
  const path = lens.surfaces.map((_, k) => ({ surface: k, action: 'refract' as const, dir: 1 as const }));
  const m = pathMatrix(lens, path, nm, z[z.length - 2]);
  return -1 / m[2];
}

/** Back focal distance: from the last vertex to the paraxial focus of a distant object. */
export function backFocalDistance(lens: LensModel, nm = 587.5618): number {
  const z = vertexZ(lens);
  const path = lens.surfaces.map((_, k) => ({ surface: k, action: 'refract' as const, dir: 1 as const }));
  const m = pathMatrix(lens, path, nm, z[z.length - 2]);
  return -m[0] / m[2];
}

/**
 * Ratio of the marginal ray's height at the stop to its height at the first surface, for a ray
 * parallel to the axis: the stop's semi-diameter is the entrance pupil's radius times this.
 */
export function stopHeightRatio(lens: LensModel, stop: number, nm = 587.5618): number {
  const z = vertexZ(lens);
  const path = lens.surfaces.slice(0, stop).map((_, k) => ({ surface: k, action: 'refract' as const, dir: 1 as const }));
  const m = pathMatrix(lens, path, nm, z[stop]);
  return m[0];
}
