// Keyframe tracks evaluated at any time in fractional frames. Before the first key the first
// value holds; after the last key the last value holds. A key's easing shapes the segment into
// the next key.

import { easeAt, type Easing } from './easing.js';
import { catmullRom, catmullRomN, type Vec2 } from './path.js';

export interface Key<V> {
  frame: number;
  value: V;
  ease: Easing;
}

export type PathShape = 'linear' | 'smooth';

/** Index i of the segment [keys[i], keys[i+1]) holding t, and the eased fraction in it. */
function locate<V>(keys: readonly Key<V>[], t: number): { i: number; s: number } | { at: number } {
  const n = keys.length;
  if (n === 1 || t <= keys[0].frame) return { at: 0 };
  if (t >= keys[n - 1].frame) return { at: n - 1 };
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (keys[mid].frame <= t) lo = mid;
    else hi = mid;
  }
  const k = keys[lo];
  if (k.ease.kind === 'hold') return { at: lo };
  const u = (t - k.frame) / (keys[lo + 1].frame - k.frame);
  return { i: lo, s: easeAt(k.ease, u) };
}

export function evalScalar(keys: readonly Key<number>[], t: number): number {
  const loc = locate(keys, t);
  if ('at' in loc) return keys[loc.at].value;
  const a = keys[loc.i].value;
  const b = keys[loc.i + 1].value;
  return a + (b - a) * loc.s;
}

export function evalVec2(keys: readonly Key<Vec2>[], t: number, shape: PathShape): [number, number] {
  const loc = locate(keys, t);
  if ('at' in loc) {
    const v = keys[loc.at].value;
    return [v[0], v[1]];
  }
  const { i, s } = loc;
  const p1 = keys[i].value;
  const p2 = keys[i + 1].value;
  if (shape === 'linear') return [p1[0] + (p2[0] - p1[0]) * s, p1[1] + (p2[1] - p1[1]) * s];
  return catmullRom(keys[i - 1]?.value, p1, p2, keys[i + 2]?.value, s);
}

/** A 3-D (or any-dimensional) position track: linear, or a smooth centripetal Catmull-Rom path. */
export function evalVec3(keys: readonly Key<readonly number[]>[], t: number, shape: PathShape): [number, number, number] {
  const loc = locate(keys, t);
  if ('at' in loc) {
    const v = keys[loc.at].value;
    return [v[0], v[1], v[2]];
  }
  const { i, s } = loc;
  const p1 = keys[i].value;
  const p2 = keys[i + 1].value;
  const p = shape === 'linear' ? p1.map((v, k) => v + (p2[k] - v) * s) : catmullRomN(keys[i - 1]?.value, p1, p2, keys[i + 2]?.value, s);
  return [p[0], p[1], p[2]];
}
