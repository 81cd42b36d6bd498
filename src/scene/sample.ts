// A glTF node's world transform at any time: its animation samplers evaluated with the file's own
// interpolation (glTF 2.0 specification, 3.11 "Animations" and Appendix C "Animation Sampler
// Interpolation Modes": LINEAR with spherical linear interpolation for rotations, STEP, and
// CUBICSPLINE Hermite splines whose tangents are scaled by the key interval), then composed
// down the node's chain of parents (world = parent x T x R x S).

import type { NodeChain, Quat, SceneData, SceneSampler, Vec3 } from './types.js';

/** Rows of a 4x4 affine matrix (the last row is 0 0 0 1 and not stored): 12 numbers. */
export type Affine = Float64Array;

/** The sampler's value at time s (seconds); before the first key the first holds, after the last the last. */
export function sampleAt(smp: SceneSampler, s: number): number[] {
  const { times, values, size } = smp;
  const n = times.length;
  const cubic = smp.interpolation === 'CUBICSPLINE';
  const stride = cubic ? 3 * size : size;
  const valueAt = (k: number) => values.slice(k * stride + (cubic ? size : 0), k * stride + (cubic ? size : 0) + size);
  if (n === 1 || s <= times[0]) return valueAt(0);
  if (s >= times[n - 1]) return valueAt(n - 1);
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (times[mid] <= s) lo = mid;
    else hi = mid;
  }
  const td = times[lo + 1] - times[lo];
  const u = td > 0 ? (s - times[lo]) / td : 0;
  if (smp.interpolation === 'STEP') return valueAt(lo);
  if (smp.interpolation === 'LINEAR') {
    const a = valueAt(lo);
    const b = valueAt(lo + 1);
    return size === 4 ? slerp(a as Quat, b as Quat, u) : a.map((v, k) => v + (b[k] - v) * u);
  }
  // Hermite: p(u) = (2u^3 - 3u^2 + 1) v0 + td (u^3 - 2u^2 + u) b0 + (-2u^3 + 3u^2) v1 + td (u^3 - u^2) a1
  const u2 = u * u;
  const u3 = u2 * u;
  const h00 = 2 * u3 - 3 * u2 + 1;
  const h10 = u3 - 2 * u2 + u;
  const h01 = -2 * u3 + 3 * u2;
  const h11 = u3 - u2;
  const base0 = lo * stride;
  const base1 = (lo + 1) * stride;
  const out: number[] = [];
  for (let c = 0; c < size; c++) {
    const v0 = values[base0 + size + c];
    const b0 = values[base0 + 2 * size + c];
    const a1 = values[base1 + c];
    const v1 = values[base1 + size + c];
    out.push(h00 * v0 + td * h10 * b0 + h01 * v1 + td * h11 * a1);
  }
  return size === 4 ? normalise(out as Quat) : out;
}

/** Spherical linear interpolation along the shorter arc (glTF 2.0, Appendix C). */
export function slerp(a: Quat, b: Quat, u: number): Quat {
  let d = a[0] * b[0] + a[1] * b[1] + a[2] * b[2] + a[3] * b[3];
  let bb: number[] = b;
  if (d < 0) {
    d = -d;
    bb = b.map((v) => -v);
  }
  if (d > 0.9995) {
    // nearly parallel: linear, then normalised (the arc is too short for sin to be stable)
    return normalise(a.map((v, k) => v + (bb[k] - v) * u) as Quat);
  }
  const theta = Math.acos(d);
  const s = Math.sin(theta);
  const wa = Math.sin((1 - u) * theta) / s;
  const wb = Math.sin(u * theta) / s;
  return normalise(a.map((v, k) => wa * v + wb * bb[k]) as Quat);
}

function normalise(q: Quat): Quat {
  const l = Math.hypot(q[0], q[1], q[2], q[3]) || 1;
  return [q[0] / l, q[1] / l, q[2] / l, q[3] / l];
}

/** T x R x S as an affine matrix. */
export function compose(t: Vec3, q: Quat, s: Vec3): Affine {
  const [x, y, z, w] = q;
  const m = new Float64Array(12);
  m[0] = (1 - 2 * (y * y + z * z)) * s[0];
  m[1] = 2 * (x * y - z * w) * s[1];
  m[2] = 2 * (x * z + y * w) * s[2];
  m[3] = t[0];
  m[4] = 2 * (x * y + z * w) * s[0];
  m[5] = (1 - 2 * (x * x + z * z)) * s[1];
  m[6] = 2 * (y * z - x * w) * s[2];
  m[7] = t[1];
  m[8] = 2 * (x * z - y * w) * s[0];
  m[9] = 2 * (y * z + x * w) * s[1];
  m[10] = (1 - 2 * (x * x + y * y)) * s[2];
  m[11] = t[2];
  return m;
}

export function multiply(a: Affine, b: Affine): Affine {
  const m = new Float64Array(12);
  for (let r = 0; r < 3; r++) {
    for (let c = 0; c < 4; c++) {
      m[r * 4 + c] = a[r * 4] * b[c] + a[r * 4 + 1] * b[4 + c] + a[r * 4 + 2] * b[8 + c] + (c === 3 ? a[r * 4 + 3] : 0);
    }
  }
  return m;
}

/** The chain's last node's world transform at time s (seconds). */
export function chainWorld(chain: NodeChain, s: number): Affine {
  let world: Affine | undefined;
  for (const node of chain) {
    const t = node.anim.translation ? (sampleAt(node.anim.translation, s) as Vec3) : node.translation;
    const q = node.anim.rotation ? (sampleAt(node.anim.rotation, s) as Quat) : node.rotation;
    const sc = node.anim.scale ? (sampleAt(node.anim.scale, s) as Vec3) : node.scale;
    const local = compose(t, q, sc);
    world = world ? multiply(world, local) : local;
  }
  return world!;
}

/** The node and its ancestors, root first. */
export function nodeChain(scene: SceneData, index: number): NodeChain {
  const chain: NodeChain = [];
  for (let i = index; i >= 0; i = scene.nodes[i].parent) chain.unshift(scene.nodes[i]);
  return chain;
}
