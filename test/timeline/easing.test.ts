// Easing against W3C CSS Easing Functions Level 1: the cubic Bezier through (0,0), P1, P2, (1,1),
// where the output at input x is y(t) for the t with x(t) = x. The reference here solves x(t) = x
// by bisection on its own, independently of bezier-easing's Newton/subdivision solver.

import { describe, expect, it } from 'vitest';
import { NAMED_CUBIC, easeAt, parseEasing, type Easing } from '../../src/timeline/easing.js';

function bezier1d(t: number, p1: number, p2: number): number {
  const u = 1 - t;
  return 3 * u * u * t * p1 + 3 * u * t * t * p2 + t * t * t;
}

/** CSS Easing Level 1 cubic-bezier output, by bisection (x(t) is monotone for x1, x2 in [0, 1]). */
function cssReference(x: number, [x1, y1, x2, y2]: readonly number[]): number {
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    if (bezier1d(mid, x1, x2) < x) lo = mid;
    else hi = mid;
  }
  return bezier1d((lo + hi) / 2, y1, y2);
}

function parsed(text: string): Easing {
  const e = parseEasing(text);
  if (typeof e === 'string') throw new Error(e);
  return e;
}

describe('easing', () => {
  it('names the control points CSS Easing Level 1 gives for the named easings', () => {
    // CSS Easing Functions Level 1, section 2.2 (cubic-bezier easing functions)
    expect(NAMED_CUBIC).toEqual({
      ease: [0.25, 0.1, 0.25, 1],
      'ease-in': [0.42, 0, 1, 1],
      'ease-out': [0, 0, 0.58, 1],
      'ease-in-out': [0.42, 0, 0.58, 1],
    });
  });

  const curves: [string, number[]][] = [
    ['ease', [0.25, 0.1, 0.25, 1]],
    ['ease-in', [0.42, 0, 1, 1]],
    ['ease-out', [0, 0, 0.58, 1]],
    ['ease-in-out', [0.42, 0, 0.58, 1]],
    ['cubic-bezier(0.1, 0.7, 1, 0.1)', [0.1, 0.7, 1, 0.1]],
    ['cubic-bezier(0.3, -0.5, 0.7, 1.5)', [0.3, -0.5, 0.7, 1.5]],
  ];
  for (const [text, points] of curves) {
    it(`${text} matches an independent solve of the CSS definition`, () => {
      const e = parsed(text);
      for (let i = 0; i <= 50; i++) {
        const x = i / 50;
        expect(easeAt(e, x)).toBeCloseTo(cssReference(x, points), 4);
      }
    });
    it(`${text} starts at 0 and ends at 1`, () => {
      const e = parsed(text);
      expect(easeAt(e, 0)).toBeCloseTo(0, 10);
      expect(easeAt(e, 1)).toBeCloseTo(1, 10);
    });
  }

  it('is monotone in x for curves whose y control points lie in [0, 1]', () => {
    for (const name of ['ease', 'ease-in', 'ease-out', 'ease-in-out']) {
      const e = parsed(name);
      let prev = -Infinity;
      for (let i = 0; i <= 200; i++) {
        const y = easeAt(e, i / 200);
        expect(y).toBeGreaterThanOrEqual(prev - 1e-12);
        prev = y;
      }
    }
  });

  it('linear is the identity and hold stays at the first value', () => {
    expect(easeAt(parsed('linear'), 0.37)).toBe(0.37);
    expect(easeAt(parsed('hold'), 0.99)).toBe(0);
  });

  it('refuses x control points outside [0, 1] and words it does not know', () => {
    expect(parseEasing('cubic-bezier(-0.1, 0, 1, 1)')).toMatch(/x1 and x2 from 0 to 1/);
    expect(parseEasing('bounce')).toMatch(/^expected one of linear, hold/);
    expect(parseEasing('cubic-bezier(a, 0, 1, 1)')).toBe('cubic-bezier() takes four finite numbers');
  });
});
