// A lens: spherical surfaces front (object side) to back, one of them the aperture stop, and the
// light paths through it (the image path and the two-reflection ghost paths) as event lists that
// both the paraxial and the real ray tracer follow.

import type { Coating } from './coating.js';
import { AIR, refractiveIndex, type GlassModel } from './glass.js';

export interface LensSurface {
  /** radius of curvature, mm; positive when the centre lies towards the sensor; 0 = flat */
  radiusMm: number;
  /** distance to the next surface's vertex, mm (the last one reaches the sensor) */
  gapMm: number;
  /** medium after this surface */
  glass: GlassModel;
  /** clear semi-diameter, mm: rays beyond it are vignetted by the barrel */
  semiDiameterMm: number;
  /** coating layers listed from the front (object side) of the surface */
  coating: Coating;
  /** the aperture stop: a flat pseudo-surface that never reflects or refracts */
  stop: boolean;
}

export interface Iris {
  blades: number;
  /** rotation of the polygon, degrees */
  rotationDeg: number;
  /** 0 = straight blades (a polygon), 1 = a circle */
  roundness: number;
}

export interface LensModel {
  name: string;
  /** the lens file's own description, e.g. who designed it */
  note: string;
  surfaces: LensSurface[];
  iris: Iris;
  /** widest aperture the design is drawn for (its semi-diameters) */
  fNumberMin: number;
  sensorWidthMm: number;
  /** horizontal squeeze of an anamorphic lens (1 = spherical) */
  squeeze: number;
  /**
   * the front barrel or hood: a circular opening `depthMm` ahead of the first vertex; light from
   * far outside the field is cut here, so ghosts fade smoothly as the light leaves. Absent: a
   * default matched to the format (defaultHood); depthMm 0: none.
   */
  hood?: { depthMm: number; radiusMm: number };
}

/** A default hood closes completely at this multiple of the frame corner's field (tan). */
export const HOOD_CUTOFF = 2;

/**
 * A hood matched to the format, like a matte box: it never vignettes the image-forming beam inside
 * the frame corner (its opening is the front element's plus the corner chief ray's travel to it)
 * and it cuts every ray through the front element at HOOD_CUTOFF x the corner's field (tan):
 * depth D = 2 S / (tan_cut - tan_corner), radius R = D tan_corner + S, S the front semi-diameter.
 */
export function defaultHood(lens: LensModel, focalLengthMm: number): { depthMm: number; radiusMm: number } {
  const s = lens.surfaces[0].semiDiameterMm;
  const tanCorner = Math.hypot(lens.sensorWidthMm / 2, lens.sensorWidthMm / 3) / focalLengthMm;
  const depthMm = (2 * s) / ((HOOD_CUTOFF - 1) * tanCorner);
  return { depthMm, radiusMm: depthMm * tanCorner + s };
}

/** One step of a light path: what happens at a surface, and the direction of travel before it. */
export interface PathEvent {
  surface: number;
  action: 'refract' | 'reflect';
  /** +1 travelling towards the sensor, -1 back towards the object */
  dir: 1 | -1;
}

export type LightPath = PathEvent[];

/** A ghost: reflected first at surface i, then at surface j (j < i), then on to the sensor. */
export interface GhostPair {
  i: number;
  j: number;
}

export function stopIndex(lens: LensModel): number {
  return lens.surfaces.findIndex((s) => s.stop);
}

/** z of each surface's vertex (the first at 0) and of the sensor (last entry). */
export function vertexZ(lens: LensModel): number[] {
  const z = [0];
  for (const s of lens.surfaces) z.push(z[z.length - 1] + s.gapMm);
  return z;
}

/** Index of the medium in front of surface k, and behind it. */
export function mediumBefore(lens: LensModel, k: number): GlassModel {
  return k === 0 ? AIR : lens.surfaces[k - 1].glass;
}

export function indexBefore(lens: LensModel, k: number, nm: number): number {
  return refractiveIndex(mediumBefore(lens, k), nm);
}

export function indexAfter(lens: LensModel, k: number, nm: number): number {
  return refractiveIndex(lens.surfaces[k].glass, nm);
}

/** The image-forming path: refract at every surface in turn. */
export function imagePath(lens: LensModel): LightPath {
  return lens.surfaces.map((_, k) => ({ surface: k, action: 'refract' as const, dir: 1 as const }));
}

/** Every two-reflection path: N reflecting surfaces give N(N-1)/2 (the stop never reflects). */
export function ghostPairs(lens: LensModel): GhostPair[] {
  const reflecting = lens.surfaces.map((s, k) => (s.stop ? -1 : k)).filter((k) => k >= 0);
  const pairs: GhostPair[] = [];
  for (let a = 0; a < reflecting.length; a++) {
    for (let b = 0; b < a; b++) pairs.push({ i: reflecting[a], j: reflecting[b] });
  }
  return pairs;
}

/** Forward to i, reflect; back to j, reflect; forward to the last surface. */
export function ghostPath(lens: LensModel, { i, j }: GhostPair): LightPath {
  const path: LightPath = [];
  for (let k = 0; k < i; k++) path.push({ surface: k, action: 'refract', dir: 1 });
  path.push({ surface: i, action: 'reflect', dir: 1 });
  for (let k = i - 1; k > j; k--) path.push({ surface: k, action: 'refract', dir: -1 });
  path.push({ surface: j, action: 'reflect', dir: -1 });
  for (let k = j + 1; k < lens.surfaces.length; k++) path.push({ surface: k, action: 'refract', dir: 1 });
  return path;
}

/**
 * The fraction of the front element's clear aperture (semi-diameter s) that a parallel beam still
 * fills after passing a hood opening of radius r set `depth` ahead of it, for a beam of slope
 * `tan`: the area shared by two circles whose centres are depth x tan apart, over the front's
 * area. 1 while the hood clears the beam, 0 once it cuts it off.
 */
export function hoodPassFraction(tan: number, depth: number, r: number, s: number): number {
  const d = depth * tan;
  if (!(d < r + s)) return 0;
  if (d <= Math.abs(r - s)) return r >= s ? 1 : (r * r) / (s * s);
  const a1 = s * s * Math.acos(Math.min(1, Math.max(-1, (d * d + s * s - r * r) / (2 * d * s))));
  const a2 = r * r * Math.acos(Math.min(1, Math.max(-1, (d * d + r * r - s * s) / (2 * d * r))));
  const k = 0.5 * Math.sqrt(Math.max(0, (-d + s + r) * (d + s - r) * (d - s + r) * (d + s + r)));
  return Math.min(1, Math.max(0, (a1 + a2 - k) / (Math.PI * s * s)));
}
