// The starburst kernel against Fourier optics: the FFT against the DFT summed by its definition
// (with rows of zeros, which the FFT skips), Parseval's theorem for the unnormalised FFT (exact),
// the Airy pattern's first dark ring at 1.2197 N / D bins for a circular pupil (first zero of J1 at
// 3.8317 / pi; Goodman, Introduction to Fourier Optics; computed, OPTICS.md section 6), and the
// spike count of a polygon iris: n blades give n spikes when n is even, 2n when odd (computed by
// FFT; common photographic knowledge).

import { describe, expect, it } from 'vitest';
import { fft2, irisMask, powerSpectrum, starburstKernel, binSizeMm } from '../../src/optics/diffraction.js';

/** Reproducible values in [-0.5, 0.5) (Park-Miller minimal standard generator). */
function uniform(seed: number): () => number {
  let s = seed;
  return () => ((s = (s * 16807) % 2147483647) / 2147483647) - 0.5;
}

describe('diffraction', () => {
  it('Parseval: sum |F|^2 = N^2 sum |P|^2 for the unnormalised FFT (exact)', () => {
    const n = 64;
    const re = new Float64Array(n * n);
    const im = new Float64Array(n * n);
    const rnd = uniform(12345);
    for (let i = 0; i < n * n; i++) {
      re[i] = rnd();
      im[i] = rnd();
    }
    const before = re.reduce((a, v, i) => a + v * v + im[i] * im[i], 0);
    fft2(re, im, n);
    const after = re.reduce((a, v, i) => a + v * v + im[i] * im[i], 0);
    expect(after / (n * n * before)).toBeCloseTo(1, 10);
  });

  it('fft2 equals the DFT by its definition on a field with rows of zeros (which it skips)', () => {
    // F(u, v) = sum over (y, x) of f(y, x) exp(-2 pi i (u x + v y) / n): the definition, summed directly
    const n = 16;
    const re = new Float64Array(n * n);
    const im = new Float64Array(n * n);
    const rnd = uniform(777);
    // rows 5-8 carry values; row 7 only an imaginary part, so a skip test on re alone would fail
    for (let y = 5; y <= 8; y++) for (let x = 0; x < n; x++) {
      re[y * n + x] = y === 7 ? 0 : rnd();
      im[y * n + x] = rnd();
    }
    const fRe = Float64Array.from(re);
    const fIm = Float64Array.from(im);
    fft2(re, im, n);
    let worst = 0;
    for (let v = 0; v < n; v++) for (let u = 0; u < n; u++) {
      let sr = 0;
      let si = 0;
      for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) {
        const ph = (-2 * Math.PI * (u * x + v * y)) / n;
        const c = Math.cos(ph);
        const d = Math.sin(ph);
        sr += fRe[y * n + x] * c - fIm[y * n + x] * d;
        si += fRe[y * n + x] * d + fIm[y * n + x] * c;
      }
      worst = Math.max(worst, Math.abs(sr - re[v * n + u]), Math.abs(si - im[v * n + u]));
    }
    expect(worst).toBeLessThan(1e-12);
  });

  it('a circular pupil D = 128 on N = 1024 has its first dark ring at 9.76 bins (1.2197 N / D)', () => {
    const n = 1024;
    const mask = irisMask({ blades: 0, rotationDeg: 0, roundness: 1 }, n, 128);
    // the transform along the frequency axis at fractional bins k (a direct sum over the open
    // cells: the same transform the kernel samples at whole bins, without their spacing)
    const cells: [number, number][] = [];
    for (let i = 0; i < n * n; i++) if (mask[i] > 0) cells.push([i % n, mask[i]]);
    let best = Infinity;
    let at = 0;
    for (let k = 8; k <= 11.5; k += 0.005) {
      let re = 0;
      let im = 0;
      for (const [x, m] of cells) {
        const ph = (-2 * Math.PI * k * x) / n;
        re += m * Math.cos(ph);
        im += m * Math.sin(ph);
      }
      const pw = re * re + im * im;
      if (pw < best) [best, at] = [pw, k];
    }
    expect(at).toBeCloseTo((1.2197 * n) / 128, 1);
    // and on the kernel's own whole bins the darkest one near there is bin 10
    const p = powerSpectrum(mask, n);
    const c = n / 2;
    const row = [9, 10, 11].map((k) => p[c * n + c + k]);
    expect(row[1]).toBeLessThan(Math.min(row[0], row[2]));
  });

  const spikes = (blades: number) => {
    const k = starburstKernel({ blades, rotationDeg: 0, roundness: 0 }, { n: 256, pupilCells: 32, wavelengths: 1 });
    const n = k.n;
    const at = (x: number, y: number) => {
      const x0 = Math.floor(x);
      const y0 = Math.floor(y);
      const tx = x - x0;
      const ty = y - y0;
      const g = (xx: number, yy: number) => k.rgb[(yy * n + xx) * 3 + 1];
      return (g(x0, y0) * (1 - tx) + g(x0 + 1, y0) * tx) * (1 - ty) + (g(x0, y0 + 1) * (1 - tx) + g(x0 + 1, y0 + 1) * tx) * ty;
    };
    // angular profile far out, each radius weighted by r^2 (spikes fall as r^-2), in half degrees
    const prof: number[] = [];
    for (let a = 0; a < 720; a++) {
      const t = (a * Math.PI) / 360;
      let v = 0;
      for (let r = 50; r <= 120; r += 5) v += r * r * at(n / 2 + r * Math.cos(t), n / 2 + r * Math.sin(t));
      prof.push(v);
    }
    const sorted = [...prof].sort((x, y) => x - y);
    const floor = sorted[Math.floor(prof.length / 2)];
    let count = 0;
    for (let a = 0; a < 720; a++) {
      const v = prof[a];
      // spikes lying along the grid axes stand out less (about 1.3x the median) than the others
      let isPeak = v > 1.2 * floor;
      for (let d = 1; d <= 10 && isPeak; d++) isPeak = v >= prof[(a + d) % 720] && v > prof[(a - d + 720) % 720];
      if (isPeak) count++;
    }
    return count;
  };
  for (const [blades, expected] of [[5, 10], [6, 6], [7, 14], [8, 8]]) {
    it(`a ${blades}-blade iris gives ${expected} spikes`, () => {
      expect(spikes(blades)).toBe(expected);
    });
  }

  it('each channel of the kernel carries unit energy; stopping down enlarges it on the sensor', () => {
    const k = starburstKernel({ blades: 6, rotationDeg: 0, roundness: 0 }, { n: 128, pupilCells: 16, wavelengths: 3 });
    for (let c = 0; c < 3; c++) {
      let s = 0;
      for (let i = 0; i < k.n * k.n; i++) s += k.rgb[i * 3 + c];
      expect(s).toBeCloseTo(1, 4);
    }
    // f/8 is twice f/4; Airy radius on the sensor 1.22 lambda N: 5.37 um at f/8, 550 nm (computed)
    expect(binSizeMm(k, 8) / binSizeMm(k, 4)).toBeCloseTo(2, 12);
    expect(1.2197 * (k.n / k.pupilCells) * binSizeMm(k, 8) * 1000).toBeCloseTo(5.37, 2);
  });
});
