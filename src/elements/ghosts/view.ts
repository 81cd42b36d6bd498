// What the ghost renderer is told about the frame, the light and the settings, and the mapping
// from frame pixels to the lens's sensor and incoming ray slopes.

import type { GhostQuality, LensSystem } from '../../optics/ghost-system.js';

export interface GhostView {
  widthPx: number;
  heightPx: number;
  pixelAspect: number;
  opticalCentre: readonly [number, number];
}

export interface GhostLight {
  xPx: number;
  yPx: number;
  /** RGB flux of the light's image (disk radiance x area), display units */
  flux: readonly [number, number, number];
}

export interface GhostFrameSettings {
  fNumber: number;
  gain: number;
  quality: GhostQuality;
  /** the faint-ghost threshold (default FAINT_PEAK; 0 draws every ghost in full) */
  faintPeak?: number;
  /**
   * per-ghost RGB multipliers by name ("11-5", as `straylight lens` lists them); a ghost whose
   * multiplier is 0 in every channel is not drawn. With `only`, ghosts not listed are not drawn.
   */
  paths?: ReadonlyMap<string, readonly [number, number, number]>;
  only?: boolean;
  /** draw only the ghosts of rank index modulo count (see GhostSettings.share) */
  share?: { index: number; count: number };
}

export interface GhostStats {
  drawn: number;
  skipped: number;
}

/** Pixels per sensor millimetre, horizontally and vertically. */
export function pxPerMm(system: LensSystem, view: GhostView): [number, number] {
  const sx = view.widthPx / system.lens.sensorWidthMm;
  return [sx, sx * view.pixelAspect];
}

/** Incoming ray slopes for a light seen at (xPx, yPx): its paraxial image lands there. */
export function lightSlopes(system: LensSystem, view: GhostView, xPx: number, yPx: number): [number, number] {
  const [sx, sy] = pxPerMm(system, view);
  const f = system.focalLengthMm;
  // the image is inverted on the sensor and shown upright: display offset D (mm) needs slope -D/f;
  // an anamorphic front squeezes the horizontal field angle by its squeeze factor
  return [-((xPx - view.opticalCentre[0]) / sx / f) / system.lens.squeeze, -((yPx - view.opticalCentre[1]) / sy / f)];
}
