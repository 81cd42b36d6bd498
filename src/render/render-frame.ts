// renderFrame: ResolvedShot x frame number (x the shot's mattes) -> premultiplied linear float
// image of the pass. Deterministic: the same inputs give the same pixels in any order or worker.
// With the shutter open, the exact method draws every light at each shutter sample; the smear
// method (the default, shutter-smear.ts) draws each light's elements once per span of the open
// shutter and smears them along the light's and each ghost's own motion.

import type { GhostStats } from '../elements/ghosts/index.js';
import { addVeil } from '../elements/streak.js';
import type { MatteProvider } from '../io/matte-provider.js';
import { FloatImage } from '../raster/image.js';
import type { ResolvedShot } from '../shot/types.js';
import { shutterTimes } from '../timeline/shutter.js';
import { drawLightAt, elementGains, ensureClear, matteProvider, type FrameTarget } from './light-draw.js';
import { smearLight, smearApplies } from './shutter-smear.js';

export { adoptShotAssets, coverageFor, ghostPathMultipliers, lightVisibility, matteProvider, shotAssets, shotAssetsKey, type ShotAssets } from './light-draw.js';

/**
 * Render a frame. `target`, when given, is cleared and drawn into (a caller that renders frame
 * after frame reuses one image instead of faulting in fresh memory every frame).
 */
export function renderFrame(shot: ResolvedShot, frame: number, stats?: GhostStats, mattes: MatteProvider = matteProvider(shot), target?: FloatImage): FloatImage {
  const { widthPx, heightPx, pixelAspect } = shot.frame;
  // a reused target is cleared by the first glow drawn (which overwrites), or else before the
  // first other element; a fresh image is clear already
  const out: FrameTarget = target && target.width === widthPx && target.height === heightPx ? { img: target, clear: false } : { img: new FloatImage(widthPx, heightPx), clear: true };
  const times = shutterTimes(shot.shutter, frame, shot.seed);
  if (smearApplies(shot)) {
    ensureClear(out);
    const veil = [0, 0, 0];
    for (const light of shot.lights) {
      if (smearLight(out.img, shot, light, frame, mattes, veil, stats)) continue;
      // what the smear cannot follow (a light passing behind the camera) is drawn sample by sample
      for (const t of times) drawLightAt(out, shot, light, t, 1 / times.length, elementGains(shot, t), mattes, veil, stats);
    }
    if (veil[0] > 0 || veil[1] > 0 || veil[2] > 0) addVeil(out.img, veil as [number, number, number], pixelAspect);
    return out.img;
  }
  const share = 1 / times.length;
  for (const t of times) {
    const veil = [0, 0, 0];
    // each element's gain at this instant (0 when switched off), the shot's and each light's own
    const shotGains = elementGains(shot, t);
    for (const light of shot.lights) drawLightAt(out, shot, light, t, share, shotGains, mattes, veil, stats);
    ensureClear(out);
    if (veil[0] > 0 || veil[1] > 0 || veil[2] > 0) addVeil(out.img, veil as [number, number, number], pixelAspect);
  }
  ensureClear(out);
  return out.img;
}
