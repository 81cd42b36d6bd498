// renderFrame: pure. ResolvedShot x frame number -> premultiplied linear float image of the pass.

import { addDisk, diskFlux } from '../elements/core.js';
import { addGlow } from '../elements/glow.js';
import { FloatImage } from '../raster/image.js';
import type { ResolvedShot } from '../shot/types.js';
import { frameState } from './frame-state.js';

export function renderFrame(shot: ResolvedShot, frame: number): FloatImage {
  const { widthPx, heightPx, pixelAspect } = shot.frame;
  const img = new FloatImage(widthPx, heightPx);
  const state = frameState(shot, frame);
  for (const light of state.lights) {
    if (light.gain <= 0) continue;
    const disk = { xPx: light.xPx, yPx: light.yPx, radiusPx: light.radiusPx, radiance: light.radiance };
    addDisk(img, disk, pixelAspect);
    const flux = diskFlux(disk);
    const f = shot.glow.fraction;
    addGlow(
      img,
      {
        xPx: light.xPx,
        yPx: light.yPx,
        energy: [flux[0] * f, flux[1] * f, flux[2] * f],
        sizePx: shot.glow.sizePx,
        falloff: shot.glow.falloff,
      },
      pixelAspect,
    );
  }
  return img;
}
