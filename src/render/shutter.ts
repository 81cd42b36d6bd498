// Motion blur: the times at which a frame is sampled across the open shutter (Cook, Porter &
// Carpenter, "Distributed ray tracing", SIGGRAPH 1984). The shutter is open for angle/360 of a
// frame interval: at 180 degrees and 24 fps, 1/48 s. K strata, each jittered by a hash of (shot
// seed, frame, sample), so a frame's times never depend on render order or worker.

import type { ShutterSettings } from '../shot/types.js';
import { frameRateValue, type FrameRate } from '../timeline/frame-rate.js';

export function exposureSeconds(shutter: { angleDeg: number }, rate: FrameRate): number {
  return shutter.angleDeg / 360 / frameRateValue(rate);
}

/** A 32-bit integer hash (splitmix-style finaliser) of three integers, as a number in [0, 1). */
export function hash01(a: number, b: number, c: number): number {
  let h = (Math.imul(a | 0, 0x9e3779b1) ^ Math.imul(b | 0, 0x85ebca77) ^ Math.imul(c | 0, 0xc2b2ae3d)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x7feb352d) >>> 0;
  h = Math.imul(h ^ (h >>> 15), 0x846ca68b) >>> 0;
  h = (h ^ (h >>> 16)) >>> 0;
  return h / 4294967296;
}

/** Sample times (fractional frames) for a frame. One sample, or a closed shutter, gives the centre. */
export function shutterTimes(shutter: ShutterSettings, frame: number, seed: number): number[] {
  const k = shutter.angleDeg > 0 ? shutter.samples : 1;
  const times: number[] = [];
  for (let i = 0; i < k; i++) {
    const jitter = k === 1 ? 0.5 : hash01(seed, frame, i);
    times.push(frame + (shutter.phaseDeg + (shutter.angleDeg * (i + jitter)) / k) / 360);
  }
  return times;
}
