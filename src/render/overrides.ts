// Quick look-dev overrides of a resolved shot: a lower ghost quality, and a smaller frame with every
// position and size scaled with it (lights' paths and disks, the optical centre, glow, streak and
// dust sizes; the lens maps the frame's width onto its sensor, so ghosts and the starburst scale by
// themselves). Radiance is kept, so a scaled frame is the full frame seen at a lower resolution.
// A scaled or lowered shot has its own hash, so it never passes for the full render's frames.

import type { GhostQuality } from '../optics/ghost-system.js';
import type { ResolvedShot } from '../shot/types.js';
import type { Vec2 } from '../timeline/path.js';

/** The shot at `scale` of its size (0 < scale <= 1); the frame's sides are rounded to whole pixels. */
export function scaleShot(shot: ResolvedShot, scale: number): ResolvedShot {
  if (scale === 1) return shot;
  const f = shot.frame;
  const widthPx = Math.max(1, Math.round(f.widthPx * scale));
  const heightPx = Math.max(1, Math.round(f.heightPx * scale));
  // positions follow the sides as rounded; sizes follow the scale
  const sx = widthPx / f.widthPx;
  const sy = heightPx / f.heightPx;
  const at = ([x, y]: Vec2): Vec2 => [x * sx, y * sy];
  return {
    ...shot,
    frame: { ...f, widthPx, heightPx, opticalCentre: at(f.opticalCentre) },
    lights: shot.lights.map((l) => ({ ...l, position: l.position.map((k) => ({ ...k, value: at(k.value) })), radiusPx: l.radiusPx * scale })),
    glow: { ...shot.glow, sizePx: shot.glow.sizePx * scale },
    streak: { ...shot.streak, lengthPx: shot.streak.lengthPx * scale, thicknessPx: shot.streak.thicknessPx * scale },
    dust: { ...shot.dust, reachPx: shot.dust.reachPx * scale },
    // full-size mattes are laid over the smaller frame
    mattes: shot.mattes.map((m) => ({ ...m, resize: 'stretch' })),
  };
}

export function withGhostQuality(shot: ResolvedShot, quality: GhostQuality): ResolvedShot {
  return quality === shot.ghosts.quality ? shot : { ...shot, ghosts: { ...shot.ghosts, quality } };
}
