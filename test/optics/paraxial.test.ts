// Paraxial matrices against the thick-lens check case of OPTICS.md section 2 (computed from the
// lensmaker's equation; Hecht, "Optics", formula from memory).

import { describe, expect, it } from 'vitest';
import { quarterWave } from '../../src/optics/coating.js';
import { AIR, type GlassModel } from '../../src/optics/glass.js';
import { ghostPairs, ghostPath, imagePath, type LensModel, type LensSurface } from '../../src/optics/lens.js';
import { backFocalDistance, det, focalLength, pathMatrix } from '../../src/optics/paraxial.js';

/** n = 1.5168 at every wavelength, so the check values apply exactly. */
const FLAT_BK7: GlassModel = { kind: 'abbe', name: 'n1.5168', nd: 1.5168, vd: 1e12 };

const surf = (radiusMm: number, gapMm: number, glass: GlassModel, extra: Partial<LensSurface> = {}): LensSurface => ({
  radiusMm,
  gapMm,
  glass,
  semiDiameterMm: 20,
  coating: [],
  stop: false,
  ...extra,
});

export function biconvex(bfd = 46.6683): LensModel {
  return {
    name: 'biconvex check lens',
    note: 'OPTICS.md section 2 check case',
    surfaces: [surf(50, 10, FLAT_BK7), surf(-50, bfd, AIR)],
    iris: { blades: 6, rotationDeg: 0, roundness: 0 },
    fNumberMin: 2.5,
    sensorWidthMm: 36,
    squeeze: 1,
  };
}

describe('paraxial optics', () => {
  const lens = biconvex();
  it('the lens matrix is A = D = 0.931857, B = 6.592827, C = -0.0199677 (computed)', () => {
    const m = pathMatrix(lens, imagePath(lens), 550, 10);
    expect(m[0]).toBeCloseTo(0.931857, 6);
    expect(m[1]).toBeCloseTo(6.592827, 6);
    expect(m[2]).toBeCloseTo(-0.0199677, 7);
    expect(m[3]).toBeCloseTo(0.931857, 6);
  });
  it('focal length 50.0810 mm, back focal distance 46.6683 mm (lensmaker\'s equation, Hecht)', () => {
    // lensmaker, thick lens: 1/f = (n-1)[1/R1 - 1/R2 + (n-1) t / (n R1 R2)], written out here
    const n = 1.5168;
    const f = 1 / ((n - 1) * (1 / 50 - 1 / -50 + ((n - 1) * 10) / (n * 50 * -50)));
    expect(focalLength(lens)).toBeCloseTo(f, 9);
    expect(focalLength(lens)).toBeCloseTo(50.081, 3);
    expect(backFocalDistance(lens)).toBeCloseTo(46.6683, 4);
  });
  it('ghost (reflect at 2, then 1) has the matrix [[-4.58677, 3.45707], [-0.095150, -0.146304]] (computed)', () => {
    const m = pathMatrix(lens, ghostPath(lens, { i: 1, j: 0 }), 550);
    expect(m[0]).toBeCloseTo(-4.58677, 4);
    expect(m[1]).toBeCloseTo(3.45707, 4);
    expect(m[2]).toBeCloseTo(-0.09515, 5);
    expect(m[3]).toBeCloseTo(-0.146304, 5);
  });
  it('that ghost: radius 45.87 mm for a 10 mm stop at surface 1, centre k = +0.0690 of the image height (computed)', () => {
    const m = pathMatrix(lens, ghostPath(lens, { i: 1, j: 0 }), 550);
    expect(Math.abs(m[0] * 10)).toBeCloseTo(45.87, 2);
    expect(m[1] / focalLength(lens)).toBeCloseTo(0.069, 3);
  });
  it('every ghost matrix with air at both ends has determinant 1 (computed)', () => {
    const many: LensModel = {
      ...lens,
      surfaces: [surf(40, 5, FLAT_BK7), surf(-80, 3, AIR), surf(0, 4, AIR, { stop: true }), surf(-30, 2, { kind: 'abbe', name: 'f', nd: 1.67, vd: 32 }), surf(60, 30, AIR)],
    };
    for (const g of ghostPairs(many)) {
      for (const nm of [450, 550, 650]) expect(det(pathMatrix(many, ghostPath(many, g), nm))).toBeCloseTo(1, 10);
    }
  });
  it('N reflecting surfaces give N(N-1)/2 ghosts; the stop never reflects (combinatorics)', () => {
    const mk = (n: number): LensModel => ({
      ...lens,
      surfaces: [...Array(n)].map((_, k) => surf(k % 2 ? -50 : 50, 5, k % 2 ? AIR : FLAT_BK7)).concat([surf(0, 5, AIR, { stop: true })]),
    });
    for (const n of [2, 5, 14, 20]) expect(ghostPairs(mk(n))).toHaveLength((n * (n - 1)) / 2);
    expect(ghostPairs(mk(5)).some((g) => g.i === 5 || g.j === 5)).toBe(false);
    void quarterWave;
  });
});
