// Keyframe tracks: holds outside the keys, linear and eased segments, smooth paths through keys.

import { describe, expect, it } from 'vitest';
import { LINEAR, parseEasing, type Easing } from '../../src/timeline/easing.js';
import { catmullRom, type Vec2 } from '../../src/timeline/path.js';
import { evalScalar, evalVec2, type Key } from '../../src/timeline/track.js';

const e = (t: string) => parseEasing(t) as Easing;

describe('scalar tracks', () => {
  const keys: Key<number>[] = [
    { frame: 10, value: 0, ease: LINEAR },
    { frame: 20, value: 10, ease: e('hold') },
    { frame: 30, value: 40, ease: e('ease-in') },
    { frame: 40, value: 0, ease: LINEAR },
  ];
  it('holds the first value before the first key and the last after the last', () => {
    expect(evalScalar(keys, -100)).toBe(0);
    expect(evalScalar(keys, 1e6)).toBe(0);
  });
  it('interpolates linearly at fractional frames', () => {
    expect(evalScalar(keys, 12.5)).toBeCloseTo(2.5, 12);
  });
  it('a hold key keeps its value until the next key, then jumps', () => {
    expect(evalScalar(keys, 29.999)).toBe(10);
    expect(evalScalar(keys, 30)).toBe(40);
  });
  it('an eased segment hits both ends and starts slowly (ease-in)', () => {
    expect(evalScalar(keys, 30)).toBe(40);
    expect(evalScalar(keys, 40)).toBe(0);
    // ease-in leaves slowly: at a quarter of the way, well under a quarter of the change
    const quarter = (40 - evalScalar(keys, 32.5)) / 40;
    expect(quarter).toBeLessThan(0.25 / 2);
  });
  it('a single key is a constant', () => {
    expect(evalScalar([{ frame: 0, value: 3, ease: LINEAR }], 99)).toBe(3);
  });
});

describe('paths', () => {
  const pts: Vec2[] = [[0, 0], [100, 0], [100, 100], [0, 100]];
  const keys: Key<Vec2>[] = pts.map((p, i) => ({ frame: i * 10, value: p, ease: LINEAR }));

  it('a smooth path passes through every key', () => {
    for (let i = 0; i < pts.length; i++) {
      const [x, y] = evalVec2(keys, i * 10, 'smooth');
      expect(x).toBeCloseTo(pts[i][0], 9);
      expect(y).toBeCloseTo(pts[i][1], 9);
    }
  });
  it('a linear path runs straight between keys', () => {
    expect(evalVec2(keys, 15, 'linear')).toEqual([100, 50]);
  });
  it('a smooth path has no corner at an inner key (tangent continuity)', () => {
    const h = 1e-4;
    const before = evalVec2(keys, 10 - h, 'smooth');
    const at = evalVec2(keys, 10, 'smooth');
    const after = evalVec2(keys, 10 + h, 'smooth');
    const d1 = [at[0] - before[0], at[1] - before[1]];
    const d2 = [after[0] - at[0], after[1] - at[1]];
    const cos = (d1[0] * d2[0] + d1[1] * d2[1]) / (Math.hypot(d1[0], d1[1]) * Math.hypot(d2[0], d2[1]));
    expect(cos).toBeGreaterThan(0.999);
  });
  it('collinear keys give a straight smooth path', () => {
    const [x, y] = catmullRom([0, 0], [10, 0], [20, 0], [30, 0], 0.5);
    expect(x).toBeCloseTo(15, 9);
    expect(y).toBeCloseTo(0, 12);
  });
  it('a repeated key (a light that stops) stays put, without division by zero', () => {
    expect(catmullRom([0, 0], [5, 5], [5, 5], [9, 9], 0.3)).toEqual([5, 5]);
    const p = catmullRom([5, 5], [5, 5], [9, 9], undefined, 0.5);
    expect(Number.isFinite(p[0]) && Number.isFinite(p[1])).toBe(true);
  });
});
