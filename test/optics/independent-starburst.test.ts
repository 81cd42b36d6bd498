// The starburst kernel against patterns computed without any of straylight's code:
// test/optics/fraunhofer.py gives the exact Fraunhofer pattern of the same 5-, 6- and 9-blade
// irises (the polygon's transform edge by edge, in numpy) and the Airy pattern of a round opening
// from scipy.special.j1 (Born & Wolf 8.5.2), read at the kernel's own bins. On rings through the spikes, at 2, 3.5 and 6 lambda/D, the
// kernel (one wavelength, at the reference scale) agrees with them within 2% of the ring's
// brightest value; the round opening's kernel agrees with the Airy formula within 2% of its peak,
// and the spikes number n for even blade counts and 2n for odd ones.

import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { starburstKernel } from '../../src/optics/diffraction.js';

const here = path.dirname(fileURLToPath(import.meta.url));
const N = 512;
const PUPIL = 64;
const RINGS = [1, 2, 3.5, 5];
/** Far out, where the spikes stand out: rings from 8 to 20 lambda/D, summed weighted by rho^2. */
const SPIKE_RINGS = Array.from({ length: 25 }, (_, k) => 8 + k / 2);
const ANGLES = 720;
const IRISES = [
  { blades: 0, rotation: 0 },
  { blades: 5, rotation: 0 },
  { blades: 6, rotation: 0 },
  { blades: 9, rotation: 20 },
];

const reference: number[][][] = JSON.parse(
  execFileSync('/usr/bin/python3', [path.join(here, 'fraunhofer.py')], { input: JSON.stringify({ irises: IRISES, rings: [...RINGS, ...SPIKE_RINGS], angles: ANGLES, bins: N / PUPIL }), encoding: 'utf8', maxBuffer: 64 << 20 }),
);

/** The kernel's green channel on a ring of radius rho (lambda/D), over its centre. */
function kernelRing(blades: number, rotation: number, rho: number): number[] {
  const k = starburstKernel({ blades, rotationDeg: rotation, roundness: blades < 3 ? 1 : 0 }, { n: N, pupilCells: PUPIL, wavelengths: 1 });
  const g = (x: number, y: number) => k.rgb[(y * N + x) * 3 + 1];
  const c = N / 2;
  const centre = g(c, c);
  const r = (rho * N) / PUPIL;
  const out: number[] = [];
  for (let a = 0; a < ANGLES; a++) {
    const t = (a * 2 * Math.PI) / ANGLES;
    const x = c + r * Math.cos(t);
    const y = c + r * Math.sin(t);
    const x0 = Math.floor(x);
    const y0 = Math.floor(y);
    const tx = x - x0;
    const ty = y - y0;
    out.push(((g(x0, y0) * (1 - tx) + g(x0 + 1, y0) * tx) * (1 - ty) + (g(x0, y0 + 1) * (1 - tx) + g(x0 + 1, y0 + 1) * tx) * ty) / centre);
  }
  return out;
}

/** Local maxima of a closed profile standing above 1.5x its median. */
function peaks(p: number[]): number {
  const median = [...p].sort((a, b) => a - b)[p.length >> 1];
  let n = 0;
  for (let a = 0; a < p.length; a++) {
    let top = p[a] > 1.5 * median;
    for (let d = 1; d <= 8 && top; d++) top = p[a] >= p[(a + d) % p.length] && p[a] > p[(a - d + p.length) % p.length];
    if (top) n++;
  }
  return n;
}

describe('the starburst kernel against numpy FFT and scipy j1', () => {
  IRISES.forEach((iris, i) => {
    RINGS.forEach((rho, j) => {
      const what = iris.blades < 3 ? 'a round opening (Airy, scipy j1)' : `a ${iris.blades}-blade iris at ${iris.rotation} degrees (exact polygon transform)`;
      it(`${what}: the ring at ${rho} lambda/D within 2% of its brightest`, () => {
        const ours = kernelRing(iris.blades, iris.rotation, rho);
        const theirs = reference[i][j];
        const top = Math.max(...theirs);
        let worst = 0;
        for (let a = 0; a < ANGLES; a++) worst = Math.max(worst, Math.abs(ours[a] - theirs[a]));
        expect(worst / top).toBeLessThan(0.02);
      });
    });
    if (iris.blades < 3) return;
    const expected = iris.blades % 2 === 0 ? iris.blades : 2 * iris.blades;
    it(`a ${iris.blades}-blade iris: ${expected} spikes in both (n for an even count, 2n for an odd one)`, () => {
      const ours = new Array<number>(ANGLES).fill(0);
      const theirs = new Array<number>(ANGLES).fill(0);
      SPIKE_RINGS.forEach((rho, j) => {
        const a = kernelRing(iris.blades, iris.rotation, rho);
        const b = reference[i][RINGS.length + j];
        for (let t = 0; t < ANGLES; t++) {
          ours[t] += rho * rho * a[t];
          theirs[t] += rho * rho * b[t];
        }
      });
      expect(peaks(theirs)).toBe(expected);
      expect(peaks(ours)).toBe(expected);
    });
  });

  it('the round opening\'s first dark ring falls where the Airy formula puts it (1.2197 lambda/D)', () => {
    const k = starburstKernel({ blades: 0, rotationDeg: 0, roundness: 1 }, { n: N, pupilCells: PUPIL, wavelengths: 1 });
    const c = N / 2;
    const row = Array.from({ length: 16 }, (_, b) => k.rgb[(c * N + c + b) * 3 + 1]);
    const darkest = row.slice(6, 14).indexOf(Math.min(...row.slice(6, 14))) + 6;
    // 1.2197 x 512 / 64 = 9.76 bins
    expect(darkest).toBe(10);
  });
});
