// The per-ghost level-of-detail decision: which ghosts are invisible (skipped), which are faint
// (traced on the lighter grid with fewer wavelengths, colour-matched, drawn one resolution step
// coarser), and at which resolution each is drawn (large ghosts are smooth inside). The thresholds
// and what they cost in accuracy are measured in DEVELOPERS.md ("Ghost level of detail").

import type { GhostGrid } from './grid.js';

/** Pixel values below this are not worth drawing (a quarter of one 16-bit code). */
export const INVISIBLE = 1 / (4 * 65535);
/** Ghost sizes (largest side, px) above which it is drawn at half and at quarter resolution. */
const HALF_RES_PX = 240;
const QUARTER_RES_PX = 600;
/**
 * Below `high`, a ghost whose paraxial peak is under this (linear display value) is faint: it is
 * traced on the quality's lighter grid with fewer wavelengths and drawn one resolution step
 * coarser (down to an eighth). Its colour fringes and edges then differ by less than the quality
 * step itself (measured in DEVELOPERS.md), and such ghosts are most of the cost: large, dim discs.
 */
export const FAINT_PEAK = 2e-3;

export interface GhostDrawing {
  /** traced on the lighter grid and wavelength set, colour-matched to the full set */
  faint: boolean;
  /** the layer it is drawn into: 0 full resolution, 1 half, 2 quarter, 3 an eighth */
  level: number;
}

/**
 * How to draw a ghost whose box `coarse` has just fitted (its last trace is that box).
 * `peak` is the paraxial peak estimate (display units); the grid's traced irradiance times
 * `entrance` (the light's irradiance on the entrance pupil) and `gain` is the traced one;
 * `multiRes` is false at `high`, which draws every ghost in full.
 */
export function ghostDrawing(coarse: GhostGrid, peak: number, entrance: number, gain: number, multiRes: boolean, faintPeak: number): GhostDrawing {
  // faint by the paraxial estimate and by the traced one: a ghost can focus into bright caustic
  // rims that the paraxial peak does not see, and those need the full grid and spectrum
  const faint = multiRes && peak < faintPeak && entrance * coarse.tracedPeak() * gain < faintPeak;
  let level = 0;
  if (multiRes) {
    const size = coarse.passingSizePx();
    level = size > QUARTER_RES_PX ? 2 : size > HALF_RES_PX ? 1 : 0;
    if (faint && size > HALF_RES_PX / 2) level++;
  }
  return { faint, level };
}
