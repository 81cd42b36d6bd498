// What the ghost renderer is told about the frame, the light and the settings, and the mapping
// from frame pixels to the lens's sensor and incoming ray slopes.

import type { GhostQuality, LensSystem } from '../../optics/ghost-system.js';
import type { FloatImage } from '../../raster/image.js';

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
  /** draw only the ghosts whose place is in [from, to) (see GhostShare in shot/types.ts) */
  share?: { from: number; to: number };
  /**
   * the share of the frame's exposure this drawing carries (1 / samples for one shutter sample):
   * which ghosts are skipped or drawn lighter is judged on the light over the whole exposure, so
   * a blurred frame keeps the ghosts its sharp frame has
   */
  exposure?: number;
  /** smear each ghost along its own motion over a span of the open shutter (render/shutter-smear.ts) */
  motion?: GhostMotion;
}

/**
 * A span of the open shutter, as the ghosts smear over it: the light is drawn where GhostLight
 * puts it and moves by s * (to - from) over the pieces [a_j, b_j] of s, each carrying mass_j of
 * the light drawn. Each ghost's own motion is traced from `from` and `to` (ghosts move at their
 * own rate, some against the light).
 */
export interface GhostMotion {
  from: readonly [number, number];
  to: readonly [number, number];
  a: readonly number[];
  b: readonly number[];
  mass: readonly number[];
  /**
   * a cleared image to draw full-resolution ghosts into before they are smeared (left cleared):
   * the frame with `pad` pixels (a multiple of 8) on every side, so what the motion carries into
   * the frame from outside it is there
   */
  scratch: FloatImage;
  pad: number;
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

/** Whether the ghost of this rank is in the share: its place frac(rank x 0.618...) in [from, to). */
export function inShare(rank: number, share: { from: number; to: number }): boolean {
  const p = rank * 0.6180339887498949;
  const place = p - Math.floor(p);
  return place >= share.from && place < share.to;
}
