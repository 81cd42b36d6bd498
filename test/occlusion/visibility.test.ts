// The visibility sampler against circle geometry (OPTICS.md section 8): a straight matte edge at
// signed distance d from the centre of a disk of radius r hides
// [r^2 acos(d/r) - d sqrt(r^2 - d^2)] / (pi r^2) of it (circle-segment formula, from memory):
// d = 0 -> 0.5 hidden; d = r/2 -> 0.19550 hidden, 0.80450 visible.

import { describe, expect, it } from 'vitest';
import type { MatteImage } from '../../src/occlusion/matte.js';
import { alphaCoverage, depthCoverage, diskVisibility, sample } from '../../src/occlusion/visibility.js';

const hidden = (d: number, r: number) => (r * r * Math.acos(d / r) - d * Math.sqrt(r * r - d * d)) / (Math.PI * r * r);

/** A matte covered (1) right of x = edge, with a one-pixel linear ramp (what a rendered edge is). */
function edgeMatte(w: number, h: number, edge: number): MatteImage {
  const values = new Float32Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) values[y * w + x] = Math.min(1, Math.max(0, x + 0.5 - edge + 0.5));
  return { width: w, height: h, values };
}

describe('disk visibility', () => {
  // 128 golden-angle points: each carries 1/128 of the disk, so a straight edge's share is off by
  // at most a few points' worth; 0.02 is a bound of about 2.5 points (and the one-pixel edge ramp
  // on a 40 px disk adds < 0.005)
  const TOL = 0.02;
  for (const frac of [0, 0.5, -0.5, 0.9]) {
    it(`an edge at d = ${frac} r leaves the circle-segment share visible (128 samples, within ${TOL})`, () => {
      const r = 40;
      const cx = 100;
      const m = edgeMatte(200, 100, cx + frac * r);
      const v = diskVisibility(cx, 50, r, [alphaCoverage(m, false, 'clear')]);
      expect(Math.abs(v - (1 - hidden(frac * r, r)))).toBeLessThan(TOL);
    });
  }
  it('d = r/2 leaves 0.80450 visible (OPTICS.md section 8)', () => {
    const m = edgeMatte(200, 100, 120);
    expect(diskVisibility(100, 50, 40, [alphaCoverage(m, false, 'clear')])).toBeCloseTo(0.8045, 1);
  });
  it('an edge sweeping across the light gives a smooth, monotone curve', () => {
    const vals: number[] = [];
    for (let e = 40; e <= 160; e += 1) vals.push(diskVisibility(100, 50, 40, [alphaCoverage(edgeMatte(200, 100, e), false, 'clear')]));
    for (let k = 1; k < vals.length; k++) {
      expect(vals[k]).toBeGreaterThanOrEqual(vals[k - 1] - 1e-9);
      // a 1 px move of the edge uncovers a chord's worth, 2r / (pi r^2) = 0.016, and the sampled
      // value can lag or lead it by the points of a 1 px band: up to about 3 of 128 (0.023)
      expect(vals[k] - vals[k - 1]).toBeLessThan(0.016 + 3 / 128 + 1e-9);
    }
    expect(vals[0]).toBeLessThan(0.01);
    expect(vals[vals.length - 1]).toBeGreaterThan(0.99);
  });
  it('a static occluder gives the same value every time (no shimmer)', () => {
    const m = edgeMatte(200, 100, 110);
    const a = diskVisibility(100, 50, 40, [alphaCoverage(m, false, 'clear')]);
    const b = diskVisibility(100, 50, 40, [alphaCoverage(m, false, 'clear')]);
    expect(a).toBe(b);
  });
  it('invert flips what covers', () => {
    const m = edgeMatte(200, 100, 100);
    const v = diskVisibility(100, 50, 40, [alphaCoverage(m, false, 'clear')]);
    const w = diskVisibility(100, 50, 40, [alphaCoverage(m, true, 'clear')]);
    expect(v + w).toBeCloseTo(1, 9);
  });
  it('limb darkening weights the centre: a half-hidden sun keeps half; a ring-covered one keeps more', () => {
    const m = edgeMatte(200, 100, 100);
    expect(diskVisibility(100, 50, 40, [alphaCoverage(m, false, 'clear')], { limbDarkening: 0.6 })).toBeCloseTo(0.5, 1);
    // cover only the outer ring (limb) of the disk
    const ring: MatteImage = { width: 200, height: 100, values: new Float32Array(200 * 100) };
    for (let y = 0; y < 100; y++) for (let x = 0; x < 200; x++) ring.values[y * 200 + x] = Math.hypot(x + 0.5 - 100, y + 0.5 - 50) > 30 ? 1 : 0;
    const plain = diskVisibility(100, 50, 40, [alphaCoverage(ring, false, 'clear')]);
    const limb = diskVisibility(100, 50, 40, [alphaCoverage(ring, false, 'clear')], { limbDarkening: 0.6 });
    expect(limb).toBeGreaterThan(plain);
  });
});

describe('depth mattes', () => {
  const wall = (depth: number): MatteImage => ({ width: 50, height: 50, values: new Float32Array(2500).fill(depth) });
  it('an occluder behind the light does not occlude; one in front does', () => {
    expect(diskVisibility(25, 25, 5, [depthCoverage(wall(150), 100, 1, 'clear')])).toBe(1);
    expect(diskVisibility(25, 25, 5, [depthCoverage(wall(50), 100, 1, 'clear')])).toBe(0);
  });
  it('the tolerance softens it: at the light\'s own depth half covered, a quarter tolerance in front 75%', () => {
    expect(diskVisibility(25, 25, 5, [depthCoverage(wall(100), 100, 10, 'clear')])).toBeCloseTo(0.5, 9);
    expect(diskVisibility(25, 25, 5, [depthCoverage(wall(97.5), 100, 10, 'clear')])).toBeCloseTo(0.25, 9);
  });
  it('compares each depth pixel before blending (percentage-closer filtering, Reeves et al. 1987): a silhouette covers as much as the same edge as alpha', () => {
    // a mast at 20 in front of a sky at 1e9, its edge through the light's disk
    const edge = (near: number, far: number): MatteImage => {
      const values = new Float32Array(2500);
      for (let y = 0; y < 50; y++) for (let x = 0; x < 50; x++) values[y * 50 + x] = x < 23 + y / 10 ? near : far;
      return { width: 50, height: 50, values };
    };
    const alpha = diskVisibility(25, 25, 5, [alphaCoverage(edge(1, 0), false, 'clear')]);
    expect(alpha).toBeGreaterThan(0.3);
    expect(diskVisibility(25, 25, 5, [depthCoverage(edge(20, 1e9), 100, 1, 'clear')])).toBeCloseTo(alpha, 12);
  });
});

describe('off-frame policies', () => {
  const covered: MatteImage = { width: 100, height: 100, values: new Float32Array(10000).fill(1) };
  const clearM: MatteImage = { width: 100, height: 100, values: new Float32Array(10000) };
  it('clear: outside the matte nothing covers the light', () => {
    expect(diskVisibility(-50, 50, 10, [alphaCoverage(covered, false, 'clear')])).toBe(1);
  });
  it('hidden: outside the matte the light is covered', () => {
    expect(diskVisibility(-50, 50, 10, [alphaCoverage(clearM, false, 'hidden')])).toBe(0);
  });
  it('hold: outside, the matte\'s edge keeps covering (or not) as it did', () => {
    expect(diskVisibility(-50, 50, 10, [alphaCoverage(covered, false, 'hold')])).toBe(0);
    expect(diskVisibility(-50, 50, 10, [alphaCoverage(clearM, false, 'hold')])).toBe(1);
  });
  it('the policy changes visibility gradually as the disk crosses the edge', () => {
    const vals = [-12, -6, 0, 6, 12].map((x) => diskVisibility(x, 50, 10, [alphaCoverage(covered, false, 'clear')]));
    expect(vals[0]).toBe(1);
    expect(vals[4]).toBe(0);
    expect(vals[2]).toBeCloseTo(0.5, 1);
    for (let k = 1; k < vals.length; k++) expect(vals[k]).toBeLessThanOrEqual(vals[k - 1]);
  });
});
