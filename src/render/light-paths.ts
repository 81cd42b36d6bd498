// Where each light lands on the frame over the shot's range, for `check`: the first and last
// frames it is on the frame, and its nearest approach to the optical centre. Most useful for lights
// placed in the world, where a wrong camera or frame offset shows at once.

import type { ResolvedShot } from '../shot/types.js';
import { atInfinity, cameraPose } from '../scene/camera.js';
import { lightState } from './frame-state.js';

export interface LightPathSummary {
  name: string;
  /** frames on which the light's centre is on the frame */
  onFrames: number;
  first?: number;
  last?: number;
  /** the frame of nearest approach to the optical centre, and the distance (px) */
  nearest?: { frame: number; distancePx: number; xPx: number; yPx: number };
  /** frames behind the camera */
  behindFrames: number;
  /** depth range from the camera over the frames it is in front (lights in the world) */
  depth?: [number, number];
}

export function lightPaths(shot: ResolvedShot): LightPathSummary[] {
  const { widthPx, heightPx, opticalCentre, first, last } = shot.frame;
  return shot.lights.map((light) => {
    const out: LightPathSummary = { name: light.name, onFrames: 0, behindFrames: 0 };
    for (let f = first; f <= last; f++) {
      const s = lightState(shot, light, f);
      if (!s.placed) {
        out.behindFrames++;
        continue;
      }
      if (s.depth !== undefined && light.world && !atInfinity(light.world)) {
        out.depth = out.depth ? [Math.min(out.depth[0], s.depth), Math.max(out.depth[1], s.depth)] : [s.depth, s.depth];
      }
      if (s.xPx >= 0 && s.yPx >= 0 && s.xPx < widthPx && s.yPx < heightPx) {
        out.onFrames++;
        out.first ??= f;
        out.last = f;
      }
      const d = Math.hypot(s.xPx - opticalCentre[0], s.yPx - opticalCentre[1]);
      if (!out.nearest || d < out.nearest.distancePx) out.nearest = { frame: f, distancePx: d, xPx: s.xPx, yPx: s.yPx };
    }
    return out;
  });
}

/** The camera's horizontal field, as a focal length on its sensor width, at time t. */
export function cameraFocalMm(shot: ResolvedShot, t: number): number | undefined {
  const cam = shot.camera;
  if (!cam) return undefined;
  const { widthPx, heightPx, pixelAspect } = shot.frame;
  return cam.sensorWidthMm / (2 * cameraPose(cam, t, (widthPx * pixelAspect) / heightPx).tanHalfWidth);
}
