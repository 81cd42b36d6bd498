// A lens prepared for rendering: its focal length and pupil, every two-reflection ghost ranked by
// a paraxial estimate of its peak irradiance, and each kept ghost's ray-tracing plans per
// wavelength. Built once per shot (per lens and quality); plain data, so it crosses to workers.

import { reflectance } from './coating.js';
import { defaultHood, ghostPairs, ghostPath, indexAfter, indexBefore, stopIndex, type GhostPair, type LensModel } from './lens.js';
import { focalLength, pathMatrix, stopHeightRatio } from './paraxial.js';
import { spectralSamples, type SpectralSample } from './spectral.js';
import { planPath, type PathPlan } from './trace.js';

export type GhostQuality = 'draft' | 'low' | 'medium' | 'high';

/**
 * Ray grid cells per side and wavelength samples for each quality, and for faint ghosts (see
 * FAINT_PEAK in elements/ghosts/lod.ts) the lighter grid and wavelength count used below `high`.
 * `draft` traces faint ghosts at one wavelength (550 nm), tinted to the full set's colour by the
 * colour match: they lose their colour fringes, not their colour, and the frame takes 0.6 of the
 * time (measured in DEVELOPERS.md, "Ghost level of detail").
 */
export const QUALITY: Readonly<Record<GhostQuality, { grid: number; wavelengths: number; faintGrid: number; faintWavelengths: number }>> = {
  draft: { grid: 12, wavelengths: 3, faintGrid: 12, faintWavelengths: 1 },
  low: { grid: 16, wavelengths: 3, faintGrid: 12, faintWavelengths: 3 },
  medium: { grid: 20, wavelengths: 5, faintGrid: 12, faintWavelengths: 3 },
  high: { grid: 48, wavelengths: 7, faintGrid: 48, faintWavelengths: 7 },
};

export interface RankedGhost extends GhostPair {
  /**
   * position ratio: ghost centre over the light's image height (paraxial, 550 nm). The rays that
   * pass the iris enter around y = -(b_c / a_c) u, so the centre is (B - A b_c / a_c) u, not B u,
   * unless the stop is met before the reflections.
   */
  k: number;
  /** paraxial magnification of the pupil onto the sensor (A of the ghost matrix) */
  a: number;
  /** estimated peak irradiance over the irradiance entering the lens (on axis) */
  strength: number;
  /** R_i R_j at normal incidence, 550 nm */
  reflectance: number;
  /** linear RGB tint of R_i R_j at normal incidence, largest channel 1 */
  tint: [number, number, number];
  /** for each stop crossing: y_stop = A y + B u from the entrance plane (550 nm) */
  stopCrossings: { a: number; b: number }[];
  /** one ray-tracing plan per wavelength sample */
  plans: PathPlan[];
  /** plans for the faint-ghost wavelength samples */
  faintPlans: PathPlan[];
  /**
   * RGB factors that give the faint-ghost samples the colour the full samples give (both from
   * R_i R_j at normal incidence): fewer samples see the coatings' reflectance curves at fewer
   * points, which shifts a ghost's tint without this
   */
  faintColour: [number, number, number];
}

export interface LensSystem {
  lens: LensModel;
  focalLengthMm: number;
  stop: number;
  /** stop semi-diameter over entrance-pupil radius */
  stopRatio: number;
  samples: SpectralSample[];
  grid: number;
  /** wavelength samples and grid for faint ghosts */
  faintSamples: SpectralSample[];
  faintGrid: number;
  /** every ghost ranked, strongest first (plans only for those kept) */
  ranked: RankedGhost[];
  /** how many are rendered: strength at or above the threshold */
  kept: number;
}

/** Normal-incidence reflectance of surface k seen from its front at one wavelength. */
function surfaceR(lens: LensModel, k: number, nm: number, fromFront: boolean): number {
  const s = lens.surfaces[k];
  const front = indexBefore(lens, k, nm);
  const back = indexAfter(lens, k, nm);
  return fromFront ? reflectance(front, back, s.coating, nm, 1) : reflectance(back, front, [...s.coating].reverse(), nm, 1);
}

/** Smallest |A| used in ranking: a focused ghost is still a spot of some size (about 20 um). */
const MIN_SPOT_MM = 0.02;

export function prepareLens(lensIn: LensModel, quality: GhostQuality, threshold: number): LensSystem {
  const f = focalLength(lensIn);
  // a lens without a hood given gets one matched to its format; { depthMm: 0 } means none
  const lens: LensModel = lensIn.hood === undefined ? { ...lensIn, hood: defaultHood(lensIn, f) } : lensIn.hood.depthMm > 0 ? lensIn : { ...lensIn, hood: undefined };
  const stop = stopIndex(lens);
  const stopRatio = stopHeightRatio(lens, stop);
  const q = QUALITY[quality];
  const samples = spectralSamples(q.wavelengths);
  const epRadius = f / (2 * lens.fNumberMin);
  const ranked: RankedGhost[] = ghostPairs(lens).map((pair) => {
    const path = ghostPath(lens, pair);
    const m = pathMatrix(lens, path, 550);
    // i is met from the front on the way in; j from behind on the way back
    const r550 = surfaceR(lens, pair.i, 550, true) * surfaceR(lens, pair.j, 550, false);
    const spotA = Math.max(Math.abs(m[0]), MIN_SPOT_MM / epRadius);
    const strength = r550 / (spotA * spotA);
    const tint = [0, 0, 0] as [number, number, number];
    for (const s of spectralSamples(9)) {
      const r = surfaceR(lens, pair.i, s.nm, true) * surfaceR(lens, pair.j, s.nm, false);
      for (let c = 0; c < 3; c++) tint[c] += r * s.rgb[c];
    }
    const tmax = Math.max(...tint) || 1;
    // paraxial matrices to each crossing of the stop plane along the ghost path
    const crossings: { a: number; b: number }[] = [];
    path.forEach((ev, e) => {
      if (ev.surface !== stop) return;
      crossings.push(crossingMatrix(lens, path, e));
    });
    // the crossing that limits the bundle most (largest |a_c|) sets where it enters
    const limiting = crossings.reduce((best, c) => (Math.abs(c.a) > Math.abs(best.a) ? c : best), crossings[0]);
    const entryShift = limiting && Math.abs(limiting.a) > 1e-9 ? limiting.b / limiting.a : 0;
    return { ...pair, k: (m[1] - m[0] * entryShift) / f, a: m[0], strength, reflectance: r550, tint: tint.map((t) => t / tmax) as [number, number, number], stopCrossings: crossings, plans: [], faintPlans: [], faintColour: [1, 1, 1] };
  });
  ranked.sort((x, y) => y.strength - x.strength || x.i - y.i || x.j - y.j);
  const faintSamples = spectralSamples(q.faintWavelengths);
  let kept = 0;
  for (const g of ranked) {
    if (g.strength < threshold) break;
    g.plans = samples.map((s) => planPath(lens, ghostPath(lens, g), s.nm, 1));
    g.faintPlans = faintSamples === samples ? g.plans : faintSamples.map((s) => planPath(lens, ghostPath(lens, g), s.nm, 1));
    const full = pairColour(lens, g, samples);
    const lite = pairColour(lens, g, faintSamples);
    g.faintColour = [0, 1, 2].map((c) => (lite[c] > 0 ? full[c] / lite[c] : 1)) as [number, number, number];
    kept++;
  }
  return { lens, focalLengthMm: f, stop, stopRatio, samples, grid: q.grid, faintSamples, faintGrid: q.faintGrid, ranked, kept };
}

/** R_i R_j at normal incidence weighted into RGB over the given wavelength samples. */
function pairColour(lens: LensModel, pair: GhostPair, samples: SpectralSample[]): [number, number, number] {
  const out: [number, number, number] = [0, 0, 0];
  for (const s of samples) {
    const r = surfaceR(lens, pair.i, s.nm, true) * surfaceR(lens, pair.j, s.nm, false);
    for (let c = 0; c < 3; c++) out[c] += r * s.rgb[c];
  }
  return out;
}

/** Paraxial (A, B) from the entrance plane to the stop plane at path event e. */
function crossingMatrix(lens: LensModel, path: ReturnType<typeof ghostPath>, e: number): { a: number; b: number } {
  const z = lens.surfaces.reduce<number[]>((acc, s) => [...acc, acc[acc.length - 1] + s.gapMm], [0]);
  const m = pathMatrix(lens, path.slice(0, e), 550, z[path[e].surface]);
  return { a: m[0], b: m[1] };
}
