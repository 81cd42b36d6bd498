// ResolvedShot x time -> what every light is doing at that instant: where it is on the frame
// (its pixel keys, or its place in the world projected through the shot's camera), how bright,
// and for a light in the world its depth and how much of it the lens's hood lets in.

import { defaultHood, hoodPassFraction, HOOD_CUTOFF } from '../optics/lens.js';
import { focalLength } from '../optics/paraxial.js';
import { atInfinity, cameraPose, illuminanceAt, project, sceneSeconds, sub, unit, type CameraPose, type Projection, type WorldPlacement } from '../scene/camera.js';
import { chainWorld } from '../scene/sample.js';
import type { Vec3 } from '../scene/types.js';
import type { ResolvedLight, ResolvedShot } from '../shot/types.js';
import { evalScalar, evalVec2, evalVec3 } from '../timeline/track.js';

export interface LightState {
  name: string;
  xPx: number;
  yPx: number;
  radiusPx: number;
  /** linear multiplier of the disk's radiance over the frame's white (1.0) */
  gain: number;
  /** linear RGB radiance of the disk: gain x unit-luminance colour */
  radiance: [number, number, number];
  /** false for a light in the world that is behind the camera (or on its plane): it has no place on the frame */
  placed: boolean;
  /** a light in the world: its planar depth from the camera (Infinity for a light at infinity) */
  depth?: number;
  /**
   * a light in the world: the share of it the lens's hood lets in (1 inside the frame, falling
   * smoothly to 0 as it leaves the hood's field; 0 behind the camera). Already in gain and
   * radiance; the ghosts, whose rays are traced through the hood, take the light without it.
   */
  field: number;
}

export interface FrameState {
  /** time in fractional frames */
  time: number;
  lights: LightState[];
}

/** A light at infinity stands this far away (scene units) for depth mattes: behind any geometry, in front of an empty sky's 1e10. */
export const DEPTH_AT_INFINITY = 1e9;

/** Linear gain of a light at time t from its intensity keys: stops are interpolated in stops, then 2^stops. */
export function lightGain(light: ResolvedLight, t: number): number {
  const v = evalScalar(light.intensity, t);
  return light.intensityUnit === 'stops' ? Math.pow(2, v) : v;
}

export function lightState(shot: ResolvedShot, light: ResolvedLight, t: number): LightState {
  let gain = lightGain(light, t);
  if (!light.world || !shot.camera) {
    const [x, y] = evalVec2(light.position, t, light.path);
    return state(light, x, y, gain, true, 1);
  }
  const { frame } = shot;
  const pose = poseAt(shot, t);
  const w = worldAt(light.world, shot, t);
  const p = project(pose, w.at, w.atInfinity, { widthPx: frame.widthPx, pixelAspect: frame.pixelAspect, centre: frame.opticalCentre });
  if (w.light) {
    // a KHR_lights_punctual light: its illuminance at the lens, in stops over white_lux, under the trim
    const e = illuminanceAt(w.light, w.atInfinity ? [0, 0, 0] : sub(pose.origin, w.at), w.spotAxis);
    gain *= e / shot.camera.whiteLux;
  }
  if (p.xPx === undefined || p.yPx === undefined) {
    // behind the camera: nowhere on the frame, and dark; far off the frame for anything that asks
    const s = state(light, -1e7, -1e7, 0, false, 0);
    s.depth = p.depth;
    return s;
  }
  const field = fieldFactor(shot, pose, p);
  const s = state(light, p.xPx, p.yPx, gain * field, true, field);
  s.depth = Number.isFinite(p.depth) ? p.depth : DEPTH_AT_INFINITY;
  return s;
}

/** The last pose worked out: every light of an instant shares it. */
let lastPose: { shot: ResolvedShot; t: number; pose: CameraPose } | undefined;

function poseAt(shot: ResolvedShot, t: number): CameraPose {
  if (lastPose?.shot !== shot || lastPose.t !== t) {
    const { frame } = shot;
    lastPose = { shot, t, pose: cameraPose(shot.camera!, t, (frame.widthPx * frame.pixelAspect) / frame.heightPx) };
  }
  return lastPose.pose;
}

function state(light: ResolvedLight, x: number, y: number, gain: number, placed: boolean, field: number): LightState {
  return {
    name: light.name,
    xPx: x,
    yPx: y,
    radiusPx: light.radiusPx,
    gain,
    radiance: [light.colour[0] * gain, light.colour[1] * gain, light.colour[2] * gain],
    placed,
    field,
  };
}

/** Where a light in the world is at time t: a point, or a direction (atInfinity); and its scene light. */
export function worldAt(place: WorldPlacement, shot: ResolvedShot, t: number): { at: Vec3; atInfinity: boolean; light?: NonNullable<Extract<WorldPlacement, { kind: 'scene' }>['light']>; spotAxis: Vec3 } {
  if (place.kind === 'point') return { at: evalVec3(place.position, t, place.path), atInfinity: false, spotAxis: [0, 0, -1] };
  if (place.kind === 'direction') return { at: unit(evalVec3(place.direction, t, 'linear')), atInfinity: true, spotAxis: [0, 0, -1] };
  const m = chainWorld(place.chain, sceneSeconds(shot.camera!, t));
  // a light shines along its node's -Z: the direction towards a directional light is +Z
  const z: Vec3 = unit([m[2], m[6], m[10]]);
  const spotAxis: Vec3 = [-z[0], -z[1], -z[2]];
  if (atInfinity(place)) return { at: z, atInfinity: true, light: place.light, spotAxis };
  return { at: [m[3], m[7], m[11]], atInfinity: false, ...(place.light ? { light: place.light } : {}), spotAxis };
}

/** Each lens's focal length, worked out once. */
const focal = new WeakMap<object, number>();

/**
 * How much of a light in the world the lens takes in, from its place on the frame: with a lens,
 * the share of its front element the hood leaves lit for that field angle (the same slopes the
 * ghosts are traced with; the lens's own hood or the default matched to its format); a lens with
 * `hood: none` fades over the last 10 degrees before 90; without a lens, a hood matched to the
 * camera's own frame (full to the frame corner, closed at twice its field).
 */
export function fieldFactor(shot: ResolvedShot, pose: CameraPose, p: Projection): number {
  if (!(p.cosField > 0) || p.xPx === undefined || p.yPx === undefined) return 0;
  const { frame } = shot;
  const lens = shot.lens?.model;
  if (!lens) {
    const tanCorner = pose.tanHalfWidth * Math.hypot(1, frame.heightPx / (frame.widthPx * frame.pixelAspect));
    return hoodPassFraction(p.tanField / tanCorner, 2 / (HOOD_CUTOFF - 1), 2 / (HOOD_CUTOFF - 1) + 1, 1);
  }
  let f = focal.get(lens);
  if (f === undefined) focal.set(lens, (f = focalLength(lens)));
  const hood = lens.hood === undefined ? defaultHood(lens, f) : lens.hood.depthMm > 0 ? lens.hood : undefined;
  if (!hood) {
    const c = Math.min(1, p.cosField / Math.sin((10 * Math.PI) / 180));
    return c * c * (3 - 2 * c);
  }
  // the slopes of the incoming rays for that place on the frame, as the ghosts take them
  const sx = frame.widthPx / lens.sensorWidthMm;
  const dx = (p.xPx - frame.opticalCentre[0]) / sx / f / lens.squeeze;
  const dy = (p.yPx - frame.opticalCentre[1]) / (sx * frame.pixelAspect) / f;
  return hoodPassFraction(Math.hypot(dx, dy), hood.depthMm, hood.radiusMm, lens.surfaces[0].semiDiameterMm);
}

export function frameState(shot: ResolvedShot, t: number): FrameState {
  return { time: t, lights: shot.lights.map((l) => lightState(shot, l, t)) };
}
