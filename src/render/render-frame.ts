// renderFrame: pure. ResolvedShot x frame number -> premultiplied linear float image of the pass.
// Per-shot precomputation (the prepared lens) is built once and cached on the shot object.

import { addDisk, diskFlux } from '../elements/core.js';
import { addGhosts, type GhostStats } from '../elements/ghosts.js';
import { addGlow } from '../elements/glow.js';
import { prepareLens, type LensSystem } from '../optics/ghost-system.js';
import { FloatImage } from '../raster/image.js';
import type { ResolvedShot } from '../shot/types.js';
import { evalScalar } from '../timeline/track.js';
import { frameState } from './frame-state.js';

/** What a shot needs precomputed before its frames render. */
export interface ShotAssets {
  lens?: LensSystem;
}

const cache = new WeakMap<ResolvedShot, ShotAssets>();

/** Use assets built elsewhere (handed to a worker thread) instead of building them again. */
export function adoptShotAssets(shot: ResolvedShot, assets: ShotAssets): void {
  cache.set(shot, assets);
}

export function shotAssets(shot: ResolvedShot): ShotAssets {
  let a = cache.get(shot);
  if (!a) {
    a = shot.lens && shot.ghosts.enabled ? { lens: prepareLens(shot.lens.model, shot.ghosts.quality, shot.ghosts.threshold) } : {};
    cache.set(shot, a);
  }
  return a;
}

export function renderFrame(shot: ResolvedShot, frame: number, stats?: GhostStats): FloatImage {
  const { widthPx, heightPx, pixelAspect, opticalCentre } = shot.frame;
  const img = new FloatImage(widthPx, heightPx);
  const assets = shotAssets(shot);
  const state = frameState(shot, frame);
  const fNumber = shot.lens ? evalScalar(shot.lens.fNumber, frame) : 0;
  for (const light of state.lights) {
    if (light.gain <= 0) continue;
    const disk = { xPx: light.xPx, yPx: light.yPx, radiusPx: light.radiusPx, radiance: light.radiance };
    addDisk(img, disk, pixelAspect);
    const flux = diskFlux(disk);
    const f = shot.glow.fraction;
    addGlow(
      img,
      { xPx: light.xPx, yPx: light.yPx, energy: [flux[0] * f, flux[1] * f, flux[2] * f], sizePx: shot.glow.sizePx, falloff: shot.glow.falloff },
      pixelAspect,
    );
    if (assets.lens) {
      addGhosts(
        img,
        assets.lens,
        { widthPx, heightPx, pixelAspect, opticalCentre },
        { xPx: light.xPx, yPx: light.yPx, flux },
        { fNumber, gain: shot.ghosts.gain, quality: shot.ghosts.quality },
        stats,
      );
    }
  }
  return img;
}
