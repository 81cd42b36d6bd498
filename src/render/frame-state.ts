// ResolvedShot x time -> what every light is doing at that instant.

import type { ResolvedLight, ResolvedShot } from '../shot/types.js';
import { evalScalar, evalVec2 } from '../timeline/track.js';

export interface LightState {
  name: string;
  xPx: number;
  yPx: number;
  radiusPx: number;
  /** linear multiplier of the disk's radiance over the frame's white (1.0) */
  gain: number;
  /** linear RGB radiance of the disk: gain x unit-luminance colour */
  radiance: [number, number, number];
}

export interface FrameState {
  /** time in fractional frames */
  time: number;
  lights: LightState[];
}

/** Linear gain of a light at time t: stops are interpolated in stops, then 2^stops. */
export function lightGain(light: ResolvedLight, t: number): number {
  const v = evalScalar(light.intensity, t);
  return light.intensityUnit === 'stops' ? Math.pow(2, v) : v;
}

export function lightState(light: ResolvedLight, t: number): LightState {
  const [x, y] = evalVec2(light.position, t, light.path);
  const gain = lightGain(light, t);
  return {
    name: light.name,
    xPx: x,
    yPx: y,
    radiusPx: light.radiusPx,
    gain,
    radiance: [light.colour[0] * gain, light.colour[1] * gain, light.colour[2] * gain],
  };
}

export function frameState(shot: ResolvedShot, t: number): FrameState {
  return { time: t, lights: shot.lights.map((l) => lightState(l, t)) };
}
