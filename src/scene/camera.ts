// The shot's camera (from a glTF scene or from keys in the shot) and the pinhole projection of a
// light through it onto the frame. Conventions are glTF 2.0's (3.10 Cameras): metres, right-handed,
// +Y up, the camera looking down its local -Z with +X to the right of the picture.
//
// The frame is fitted horizontally: the camera's horizontal field of view spans the frame's width
// (display width, i.e. width x pixel aspect); the vertical follows from square display pixels, so
// a frame of another aspect than the camera's shows more or less above and below.

import type { Key, PathShape } from '../timeline/track.js';
import { evalScalar, evalVec3 } from '../timeline/track.js';
import { chainWorld } from './sample.js';
import type { NodeChain, SceneCamera, SceneLight, Vec3 } from './types.js';

export interface CameraTiming {
  /** scene time (s) = (shot frame - frameOffset) / sceneRate */
  frameOffset: number;
  sceneRate: number;
}

export type ResolvedCamera = CameraTiming & {
  /** for the focal length in reports (mm) */
  sensorWidthMm: number;
  /** illuminance at the lens (lux) that a scene light needs to be drawn at 0 stops */
  whiteLux: number;
  /** where it came from, for reports: "scene.glb node ShotCam" or "keys" */
  source: string;
} & (
    | { kind: 'scene'; chain: NodeChain; camera: SceneCamera }
    | {
        kind: 'keys';
        path: PathShape;
        position: Key<readonly number[]>[];
        /** pan, tilt, roll in degrees (rotations about +Y, then +X, then +Z), or a point looked at and a roll */
        aim: { rotation: Key<readonly number[]>[] } | { lookAt: Key<readonly number[]>[]; roll: Key<number>[] };
        focalMm: Key<number>[];
      }
  );

/** Where a light comes from in the world. */
export type WorldPlacement =
  | { kind: 'point'; path: PathShape; position: Key<readonly number[]>[] }
  /** a light at infinity: the unit vector towards it */
  | { kind: 'direction'; direction: Key<readonly number[]>[] }
  | { kind: 'scene'; chain: NodeChain; light?: SceneLight; nodeName: string };

/** A light at infinity: given by direction, or a directional light of the scene. */
export function atInfinity(place: WorldPlacement): boolean {
  return place.kind === 'direction' || (place.kind === 'scene' && place.light?.type === 'directional');
}

/** The camera at one instant: its position, axes (unit) and the tangent of half its horizontal field. */
export interface CameraPose {
  origin: Vec3;
  right: Vec3;
  up: Vec3;
  /** the camera's +Z: it looks along -back */
  back: Vec3;
  tanHalfWidth: number;
}

export function sceneSeconds(timing: CameraTiming, t: number): number {
  return (t - timing.frameOffset) / timing.sceneRate;
}

/** The camera at time t (fractional shot frames); displayAspect: the frame's width over height as shown. */
export function cameraPose(cam: ResolvedCamera, t: number, displayAspect: number): CameraPose {
  if (cam.kind === 'scene') {
    const m = chainWorld(cam.chain, sceneSeconds(cam, t));
    const col = (c: number): Vec3 => unit([m[c], m[4 + c], m[8 + c]]);
    const tanHalfHeight = Math.tan(cam.camera.yfov / 2);
    return { origin: [m[3], m[7], m[11]], right: col(0), up: col(1), back: col(2), tanHalfWidth: tanHalfHeight * (cam.camera.aspectRatio ?? displayAspect) };
  }
  const origin = evalVec3(cam.position, t, cam.path);
  const tanHalfWidth = cam.sensorWidthMm / (2 * evalScalar(cam.focalMm, t));
  if ('rotation' in cam.aim) {
    const [pan, tilt, roll] = evalVec3(cam.aim.rotation, t, 'linear').map((d) => (d * Math.PI) / 180);
    // R = Ry(pan) Rx(tilt) Rz(roll); the camera's axes are R's columns
    const axes = rotationYXZ(pan, tilt, roll);
    return { origin, right: axes[0], up: axes[1], back: axes[2], tanHalfWidth };
  }
  const target = evalVec3(cam.aim.lookAt, t, cam.path);
  const roll = (evalScalar(cam.aim.roll, t) * Math.PI) / 180;
  const fwd = unit(sub(target, origin));
  // looking straight up or down: the picture's up is taken from -Z instead of +Y
  const worldUp: Vec3 = Math.abs(fwd[1]) > 0.999999 ? [0, 0, -Math.sign(fwd[1])] : [0, 1, 0];
  let right = unit(cross(fwd, worldUp));
  let up = cross(right, fwd);
  if (roll !== 0) {
    const c = Math.cos(roll);
    const s = Math.sin(roll);
    [right, up] = [add(scale(right, c), scale(up, s)), add(scale(up, c), scale(right, -s))];
  }
  return { origin, right, up, back: scale(fwd, -1), tanHalfWidth };
}

export function rotationYXZ(pan: number, tilt: number, roll: number): [Vec3, Vec3, Vec3] {
  const [cy, sy, cx, sx, cz, sz] = [Math.cos(pan), Math.sin(pan), Math.cos(tilt), Math.sin(tilt), Math.cos(roll), Math.sin(roll)];
  // Ry Rx Rz, written out by columns
  const r: number[][] = [
    [cy * cz + sy * sx * sz, -cy * sz + sy * sx * cz, sy * cx],
    [cx * sz, cx * cz, -sx],
    [-sy * cz + cy * sx * sz, sy * sz + cy * sx * cz, cy * cx],
  ];
  return [0, 1, 2].map((c) => [r[0][c], r[1][c], r[2][c]] as Vec3) as [Vec3, Vec3, Vec3];
}

/** A light seen from the camera. */
export interface Projection {
  /** on the frame in pixels; absent when the light is behind the camera or on its plane */
  xPx?: number;
  yPx?: number;
  /** distance along the view axis (planar depth; Infinity for a light at infinity) */
  depth: number;
  /** straight-line distance from the camera (Infinity at infinity) */
  distance: number;
  /** cosine of the angle between the view axis and the light (1 on the axis, <= 0 behind) */
  cosField: number;
  /** tangent of that angle (Infinity at or behind the camera's plane) */
  tanField: number;
}

/**
 * Project a point (or, with `atInfinity`, a direction) through the pose onto a frame of the given
 * size, pixel aspect and principal point. Never NaN: a light at the camera's own position or on
 * its plane has no position in the frame and tanField Infinity.
 */
export function project(pose: CameraPose, p: Vec3, atInfinity: boolean, frame: { widthPx: number; pixelAspect: number; centre: readonly [number, number] }): Projection {
  const d = atInfinity ? p : sub(p, pose.origin);
  const xc = dot(d, pose.right);
  const yc = dot(d, pose.up);
  const zc = dot(d, pose.back);
  const len = Math.hypot(xc, yc, zc);
  if (!(len > 0)) return { depth: 0, distance: 0, cosField: 0, tanField: Infinity };
  const ahead = -zc;
  const cosField = ahead / len;
  const depth = atInfinity ? Infinity : ahead;
  const distance = atInfinity ? Infinity : len;
  // on or behind the camera's plane (to within 1e-9 of the distance): no place in the frame
  if (ahead <= 1e-9 * len) return { depth, distance, cosField, tanField: Infinity };
  const pxPerTan = frame.widthPx / (2 * pose.tanHalfWidth);
  return {
    xPx: frame.centre[0] + (xc / ahead) * pxPerTan,
    yPx: frame.centre[1] - (yc / ahead) * pxPerTan * frame.pixelAspect,
    depth,
    distance,
    cosField,
    tanField: Math.hypot(xc, yc) / ahead,
  };
}

/** Illuminance (lux) a KHR_lights_punctual light gives at the camera (glTF KHR_lights_punctual: candela / d^2 with the range window and the spot cone; lux for directional). */
export function illuminanceAt(light: SceneLight, lightToCamera: Vec3, spotAxis: Vec3): number {
  if (light.type === 'directional') return light.intensity;
  const d = Math.hypot(...lightToCamera);
  if (!(d > 0)) return 0;
  let e = light.intensity / (d * d);
  if (light.range !== undefined) e *= Math.max(Math.min(1 - (d / light.range) ** 4, 1), 0);
  if (light.type === 'spot') {
    const scaleA = 1 / Math.max(0.001, Math.cos(light.innerCone) - Math.cos(light.outerCone));
    const offset = -Math.cos(light.outerCone) * scaleA;
    const cd = dot(spotAxis, lightToCamera) / d;
    const a = Math.min(1, Math.max(0, cd * scaleA + offset));
    e *= a * a;
  }
  return e;
}

export const sub = (a: Vec3, b: Vec3): Vec3 => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
export const add = (a: Vec3, b: Vec3): Vec3 => [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
export const scale = (a: Vec3, k: number): Vec3 => [a[0] * k, a[1] * k, a[2] * k];
export const dot = (a: Vec3, b: Vec3): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
export const cross = (a: Vec3, b: Vec3): Vec3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
export function unit(a: Vec3): Vec3 {
  const l = Math.hypot(a[0], a[1], a[2]);
  return l > 0 ? [a[0] / l, a[1] / l, a[2] / l] : [0, 0, 0];
}
