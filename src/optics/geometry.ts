// Whether a lens could be built: each glass element thick enough at its centre and at its rim, no
// two surfaces crossing inside their clear apertures (in glass or across an air gap, the stop
// plane included), and every clear semi-diameter short of its sphere's radius. Minimums are the
// optical shop's common practice for small camera lenses (from memory, no one standard): about a
// millimetre at the centre of a negative element and at the edge of a positive one.

import type { LensModel } from './lens.js';

/** Thinnest centre an element may have, mm (common practice). */
export const MIN_CENTRE_MM = 1;
/** Thinnest edge an element may have at its rim, mm (common practice). */
export const MIN_EDGE_MM = 1;
/**
 * An element this many times thicker at its rim than at its centre is hard to make (a warning; from
 * memory: the thick-edged menisci of fast double-Gauss lenses run to about five).
 */
const THICK_EDGE_RATIO = 6;

export interface GeometryProblem {
  /** the surface (0-based) the problem is reported at */
  surface: number;
  severity: 'error' | 'warning';
  message: string;
}

/** Sag of a sphere of radius r at height h (0 for a plane); NaN beyond the sphere. */
export function sag(r: number, h: number): number {
  if (r === 0) return 0;
  if (h >= Math.abs(r)) return NaN;
  return r - Math.sign(r) * Math.sqrt(r * r - h * h);
}

/** The thinnest axial distance from surface k to surface k + 1 over heights 0..h, and where. */
function thinnest(lens: LensModel, k: number, h: number): { mm: number; atMm: number } {
  const a = lens.surfaces[k];
  const b = lens.surfaces[k + 1];
  let best = { mm: Infinity, atMm: 0 };
  const steps = 32;
  for (let i = 0; i <= steps; i++) {
    const y = (h * i) / steps;
    const t = a.gapMm + sag(b.radiusMm, y) - sag(a.radiusMm, y);
    if (t < best.mm) best = { mm: t, atMm: y };
  }
  return best;
}

/** The rim of the element after surface k: its larger clear aperture (0 when air follows k). */
export function elementRim(lens: LensModel, k: number): number {
  const s = lens.surfaces;
  return k + 1 < s.length && !s[k].stop && s[k].glass.kind !== 'air' ? Math.max(s[k].semiDiameterMm, s[k + 1].semiDiameterMm) : 0;
}

/**
 * The thinnest surfaces k and k + 1 are apart over the heights where both must exist: an element's
 * rim, or across an air gap (the stop's plane included) the smaller of the two apertures.
 */
export function spanThinnest(lens: LensModel, k: number): { mm: number; atMm: number } {
  const s = lens.surfaces;
  const rim = elementRim(lens, k);
  return thinnest(lens, k, rim > 0 ? rim : Math.min(s[k].semiDiameterMm, s[k + 1].semiDiameterMm));
}

const mm = (v: number) => `${v.toFixed(2)} mm`;

/** Every reason the lens could not be built (errors), and what would be hard (warnings). */
export function lensGeometry(lens: LensModel): GeometryProblem[] {
  const out: GeometryProblem[] = [];
  const s = lens.surfaces;
  for (let k = 0; k < s.length; k++) {
    if (!s[k].stop && s[k].radiusMm !== 0 && s[k].semiDiameterMm >= Math.abs(s[k].radiusMm)) {
      out.push({ surface: k, severity: 'error', message: `the semi-diameter ${mm(s[k].semiDiameterMm)} reaches the radius of curvature ${mm(Math.abs(s[k].radiusMm))}` });
    }
  }
  if (out.length) return out;
  for (let k = 0; k + 1 < s.length; k++) {
    const a = s[k];
    const b = s[k + 1];
    const glass = a.glass.kind !== 'air';
    if (glass) {
      // an element: its rim is the larger clear aperture; both surfaces must reach it
      const rim = elementRim(lens, k);
      const short = [k, k + 1].find((j) => s[j].radiusMm !== 0 && rim >= Math.abs(s[j].radiusMm));
      if (short !== undefined) {
        out.push({ surface: short, severity: 'error', message: `the element's rim (${mm(rim)}, the other surface's semi-diameter) reaches this surface's radius of curvature ${mm(Math.abs(s[short].radiusMm))}` });
        continue;
      }
      const centre = a.gapMm;
      const edge = a.gapMm + sag(b.radiusMm, rim) - sag(a.radiusMm, rim);
      const thin = spanThinnest(lens, k);
      if (thin.mm < 0) {
        out.push({ surface: k, severity: 'error', message: `the element's surfaces (${k + 1} and ${k + 2}) cross inside its clear aperture: ${mm(thin.mm)} thick at ${mm(thin.atMm)} from the axis` });
      } else if (centre < MIN_CENTRE_MM) {
        out.push({ surface: k, severity: 'error', message: `the element after this surface is ${mm(centre)} thick at its centre, under the ${mm(MIN_CENTRE_MM)} a lens can be made with (common practice)` });
      } else if (edge < MIN_EDGE_MM) {
        out.push({ surface: k, severity: 'error', message: `the element after this surface is ${mm(edge)} thick at its rim (${mm(rim)} from the axis), under the ${mm(MIN_EDGE_MM)} a lens can be made with (common practice)` });
      } else if (edge > THICK_EDGE_RATIO * centre) {
        out.push({ surface: k, severity: 'warning', message: `the element after this surface is ${(edge / centre).toFixed(1)} times thicker at its rim (${mm(edge)}) than at its centre (${mm(centre)}): hard to make` });
      }
    } else {
      // an air space (or the stop's plane): the two surfaces must not meet where both exist
      const thin = spanThinnest(lens, k);
      if (thin.mm < 0) {
        const what = a.stop || b.stop ? `surface ${a.stop ? k + 2 : k + 1} passes through the stop's plane` : `surfaces ${k + 1} and ${k + 2} cross`;
        out.push({ surface: k, severity: 'error', message: `the air gap after this surface closes: ${what} ${mm(thin.atMm)} from the axis (${mm(thin.mm)} apart)` });
      }
    }
  }
  return out;
}
