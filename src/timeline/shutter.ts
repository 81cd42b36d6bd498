// Motion blur: the times at which a frame is sampled across the open shutter (Cook, Porter &
// Carpenter, "Distributed ray tracing", SIGGRAPH 1984). The shutter is open for angle/360 of a
// frame interval: at 180 degrees and 24 fps, 1/48 s. K strata, each jittered by a hash of (shot
// seed, frame, sample), so a frame's times never depend on render order or worker.

import { frameRateValue, type FrameRate } from './frame-rate.js';

/** The shutter as a shot gives it (ShutterSettings in shot/types.ts has this shape). */
export interface Shutter {
  angleDeg: number;
  samples: number;
  phaseDeg: number;
}

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

/** The shot frames whose mattes a range's shutter samples read (each sample reads frame round(t)). */
export function matteFramesRead(shutter: Shutter, first: number, last: number, seed: number): { first: number; last: number } {
  return { first: Math.round(Math.min(...shutterTimes(shutter, first, seed))), last: Math.round(Math.max(...shutterTimes(shutter, last, seed))) };
}

/** Sample times (fractional frames) for a frame. One sample, or a closed shutter, gives the centre. */
export function shutterTimes(shutter: Shutter, frame: number, seed: number): number[] {
  const k = shutter.angleDeg > 0 ? shutter.samples : 1;
  const times: number[] = [];
  for (let i = 0; i < k; i++) {
    const jitter = k === 1 ? 0.5 : hash01(seed, frame, i);
    times.push(frame + (shutter.phaseDeg + (shutter.angleDeg * (i + jitter)) / k) / 360);
  }
  return times;
}
