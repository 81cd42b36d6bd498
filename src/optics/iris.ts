// The iris opening in the stop plane, in units of the stop radius: a regular polygon of `blades`
// straight blades with its corners on the unit circle; `roundness` scales the polygon out and
// keeps only what lies inside the unit circle, so corners become arcs (0 = a sharp polygon,
// 1 = a circle). Expressed as half-planes plus a circle, so a renderer can evaluate each edge's
// signed distance as an affine function of pixel position.

import type { Iris } from './lens.js';

export interface IrisShape {
  /** blade edge normals (cos, sin) and their distance from the centre */
  nx: Float64Array;
  ny: Float64Array;
  offset: number;
  /** whether the unit circle also bounds the opening */
  circle: boolean;
}

export function irisShape(iris: Iris): IrisShape {
  const n = iris.blades;
  if (n < 3) return { nx: new Float64Array(0), ny: new Float64Array(0), offset: 1, circle: true };
  const rot = (iris.rotationDeg * Math.PI) / 180;
  const nx = new Float64Array(n);
  const ny = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    // edge k faces the direction halfway between vertices k and k+1
    const a = rot + ((k + 0.5) * 2 * Math.PI) / n;
    nx[k] = Math.cos(a);
    ny[k] = Math.sin(a);
  }
  const inscribed = Math.cos(Math.PI / n);
  const offset = inscribed + (1 - inscribed) * Math.min(1, Math.max(0, iris.roundness));
  return { nx, ny, offset, circle: iris.roundness > 0 };
}

/** Signed distance-like margin of (u, v) inside the opening (positive inside), stop-radius units. */
export function irisMargin(shape: IrisShape, u: number, v: number): number {
  let m = shape.circle ? 1 - Math.sqrt(u * u + v * v) : Infinity;
  for (let k = 0; k < shape.nx.length; k++) {
    const d = shape.offset - (u * shape.nx[k] + v * shape.ny[k]);
    if (d < m) m = d;
  }
  return m;
}

/** Anti-aliased coverage of a stop-plane point by the opening; `edge` is the blur width. */
export function irisCoverage(shape: IrisShape, u: number, v: number, edge: number): number {
  const c = 0.5 + irisMargin(shape, u, v) / edge;
  return c <= 0 ? 0 : c >= 1 ? 1 : c;
}

/** Radius of the opening in direction phi (radians). */
export function irisRadius(shape: IrisShape, phi: number): number {
  const cx = Math.cos(phi);
  const cy = Math.sin(phi);
  let r = shape.circle ? 1 : Infinity;
  for (let k = 0; k < shape.nx.length; k++) {
    const dot = cx * shape.nx[k] + cy * shape.ny[k];
    if (dot > 1e-12) r = Math.min(r, shape.offset / dot);
  }
  return r;
}

/** Area of the opening in units of the stop radius squared. */
export function irisArea(shape: IrisShape): number {
  const steps = 1440;
  let a = 0;
  for (let k = 0; k < steps; k++) {
    const r = irisRadius(shape, ((k + 0.5) * 2 * Math.PI) / steps);
    a += 0.5 * r * r * ((2 * Math.PI) / steps);
  }
  return a;
}
