// The table-driven quantiser gives exactly round(encode(v) x max), with the IEC 61966-2-1 sRGB
// formula written out here, for many values including the decision boundaries.

import { describe, expect, it } from 'vitest';
import { quantiser } from '../../src/io/quantise.js';

const iecEncode = (v: number) => (v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055);

describe('quantiser', () => {
  for (const max of [255, 65535] as const) {
    it(`sRGB at ${max === 255 ? 8 : 16} bits equals round(encode(v) x ${max})`, () => {
      const q = quantiser('srgb', max);
      let mismatches = 0;
      const check = (v: number) => {
        const c = Math.min(1, Math.max(0, v));
        if (q.code(v) !== Math.round(iecEncode(c) * max)) mismatches++;
      };
      for (let i = 0; i < 200_000; i++) check(i / 200_000);
      for (let i = 0; i < 20_000; i++) check((i / 20_000) * 0.004); // the linear toe
      for (const v of [-1, 0, 1, 2, Number.NaN, 1e-12, 0.0031308, 0.04045]) check(Number.isNaN(v) ? 0 : v);
      expect(mismatches).toBe(0);
    });
  }
  it('linear quantising rounds and clips', () => {
    const q = quantiser('linear', 255);
    expect([q.code(-1), q.code(0.5), q.code(0.998), q.code(7)]).toEqual([0, 128, 254, 255]);
  });
  it('NaN becomes 0, not garbage', () => {
    expect(quantiser('srgb', 65535).code(Number.NaN)).toBe(0);
  });
});
