// The iris's diffraction pattern (the starburst): Fraunhofer diffraction, |Fourier transform of the
// pupil|^2 (Goodman, "Introduction to Fourier Optics"; for glare rendering Kakimoto et al. 2005,
// Ritschel et al. 2009). The iris mask is supersampled (4 x 4 per cell, or straight blade edges
// alias into false spikes), transformed on an N x N grid with a pupil D cells across (fft.js), and
// each wavelength's copy is magnified by lambda / lambda_ref at equal energy and weighted into RGB.
// On the sensor one bin is lambda N_f D / N long, so stopping down enlarges the pattern.

import FFT from 'fft.js';
import { irisMargin, irisShape, type IrisShape } from './iris.js';
import type { Iris } from './lens.js';
import { spectralSamples } from './spectral.js';

export const REFERENCE_NM = 550;

/**
 * In-place 2-D FFT of a complex n x n field (separate real and imaginary planes), unnormalised.
 * Rows that are zero throughout are left as they are (their transform is zero): a pupil fills only
 * the middle eighth of the kernel's rows, so this skips most of the row pass.
 */
export function fft2(re: Float64Array, im: Float64Array, n: number): void {
  const f = new FFT(n);
  const input = f.createComplexArray() as number[];
  const output = f.createComplexArray() as number[];
  for (let row = 0, base = 0; row < n; row++, base += n) {
    let zero = true;
    for (let k = 0; k < n && zero; k++) zero = re[base + k] === 0 && im[base + k] === 0;
    if (zero) continue;
    for (let k = 0; k < n; k++) {
      input[2 * k] = re[base + k];
      input[2 * k + 1] = im[base + k];
    }
    f.transform(output, input);
    for (let k = 0; k < n; k++) {
      re[base + k] = output[2 * k];
      im[base + k] = output[2 * k + 1];
    }
  }
  for (let col = 0; col < n; col++) {
    for (let k = 0, i = col; k < n; k++, i += n) {
      input[2 * k] = re[i];
      input[2 * k + 1] = im[i];
    }
    f.transform(output, input);
    for (let k = 0, i = col; k < n; k++, i += n) {
      re[i] = output[2 * k];
      im[i] = output[2 * k + 1];
    }
  }
}

/**
 * The iris's open fraction in each cell of an n x n grid with a pupil `pupilCells` across. A cell
 * that only straight blade edges cross gets its exact share (the square clipped by each blade's
 * half-plane); a cell that the rounded rim crosses is sampled `supersample` x `supersample` times.
 * Sampling alone put a systematic error along edges that lie on the grid (a 6-blade iris's
 * horizontal edges, sampled 16 x 16, made its vertical spike 4-9% too bright at 3.5-7 lambda/D
 * against the exact transform, test/optics/independent-starburst).
 */
export function irisMask(iris: Iris, n: number, pupilCells: number, supersample = 16): Float64Array {
  const shape = irisShape(iris);
  const mask = new Float64Array(n * n);
  const c = n / 2;
  const r = pupilCells / 2;
  const inv = 1 / (supersample * supersample);
  // half a cell's diagonal, in stop-radius units: a cell whose centre is further than this from
  // an edge lies wholly on one side of it
  const reach = Math.SQRT1_2 / r;
  for (let y = 0; y < n; y++) {
    for (let x = 0; x < n; x++) {
      const u0 = (x + 0.5 - c) / r;
      const v0 = (y + 0.5 - c) / r;
      if (u0 * u0 + v0 * v0 > 1.2) continue;
      const m = irisMargin(shape, u0, v0);
      if (m >= reach) {
        mask[y * n + x] = 1;
        continue;
      }
      if (m <= -reach) continue;
      const nearRim = shape.circle && Math.abs(1 - Math.hypot(u0, v0)) < reach;
      if (!nearRim) {
        mask[y * n + x] = clippedShare(shape, u0, v0, 1 / r);
        continue;
      }
      let open = 0;
      for (let sy = 0; sy < supersample; sy++) {
        for (let sx = 0; sx < supersample; sx++) {
          const u = (x + (sx + 0.5) / supersample - c) / r;
          const v = (y + (sy + 0.5) / supersample - c) / r;
          if (irisMargin(shape, u, v) >= 0) open++;
        }
      }
      mask[y * n + x] = open * inv;
    }
  }
  return mask;
}

/** The share of a square cell (centre u, v; side `side`) inside every blade's half-plane, exactly. */
function clippedShare(shape: IrisShape, u: number, v: number, side: number): number {
  const h = side / 2;
  let poly: number[] = [u - h, v - h, u + h, v - h, u + h, v + h, u - h, v + h];
  for (let k = 0; k < shape.nx.length && poly.length >= 6; k++) {
    // keep u nx + v ny <= offset (Sutherland-Hodgman against one half-plane)
    const nx = shape.nx[k];
    const ny = shape.ny[k];
    const out: number[] = [];
    const count = poly.length / 2;
    for (let i = 0; i < count; i++) {
      const ax = poly[2 * i];
      const ay = poly[2 * i + 1];
      const bx = poly[(2 * i + 2) % poly.length];
      const by = poly[(2 * i + 3) % poly.length];
      const da = shape.offset - (ax * nx + ay * ny);
      const db = shape.offset - (bx * nx + by * ny);
      if (da >= 0) out.push(ax, ay);
      if (da >= 0 !== db >= 0) {
        const t = da / (da - db);
        out.push(ax + t * (bx - ax), ay + t * (by - ay));
      }
    }
    poly = out;
  }
  let area = 0;
  const count = poly.length / 2;
  for (let i = 0; i < count; i++) {
    const j = (i + 1) % count;
    area += poly[2 * i] * poly[2 * j + 1] - poly[2 * j] * poly[2 * i + 1];
  }
  return count < 3 ? 0 : Math.abs(area) / 2 / (side * side);
}

/** |F|^2 of the mask, centred (zero frequency at n/2, n/2). */
export function powerSpectrum(mask: Float64Array, n: number): Float64Array {
  const re = Float64Array.from(mask);
  const im = new Float64Array(n * n);
  fft2(re, im, n);
  const p = new Float64Array(n * n);
  const h = n / 2;
  for (let y = 0; y < n; y++) {
    for (let x = 0; x < n; x++) {
      const i = y * n + x;
      p[((y + h) % n) * n + ((x + h) % n)] = re[i] * re[i] + im[i] * im[i];
    }
  }
  return p;
}

export interface StarburstKernel {
  n: number;
  /** pupil diameter in grid cells */
  pupilCells: number;
  /** RGB, n x n, each channel summing to 1 (bins at the reference wavelength's scale) */
  rgb: Float32Array;
}

/** Bilinear sample of an n x n plane at bin-index coordinates (bin i's centre is at i); 0 outside. */
function bilinear(p: Float64Array, n: number, fx: number, fy: number): number {
  const x0 = Math.floor(fx);
  const y0 = Math.floor(fy);
  if (x0 < 0 || y0 < 0 || x0 + 1 >= n || y0 + 1 >= n) return 0;
  const tx = fx - x0;
  const ty = fy - y0;
  const a = p[y0 * n + x0] + (p[y0 * n + x0 + 1] - p[y0 * n + x0]) * tx;
  const b = p[(y0 + 1) * n + x0] + (p[(y0 + 1) * n + x0 + 1] - p[(y0 + 1) * n + x0]) * tx;
  return a + (b - a) * ty;
}

/**
 * Undo the cell averaging of the mask: a mask of cell means is the opening convolved with a
 * cell-sized box, whose transform multiplies the pattern by sinc^2 in x and in y (3% darker at
 * 6 lambda/D, 40% at the kernel's taper). Dividing by it gives the opening's own Fraunhofer pattern.
 */
function undoCellAverage(p: Float64Array, n: number): void {
  const h = n / 2;
  const sinc = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const f = (Math.PI * (k - h)) / n;
    sinc[k] = f === 0 ? 1 : Math.sin(f) / f;
  }
  for (let y = 0; y < n; y++) {
    const sy = sinc[y] * sinc[y];
    for (let x = 0; x < n; x++) p[y * n + x] /= sy * sinc[x] * sinc[x];
  }
}

export function starburstKernel(iris: Iris, opts: { n?: number; pupilCells?: number; wavelengths?: number } = {}): StarburstKernel {
  const n = opts.n ?? 512;
  const pupilCells = opts.pupilCells ?? n / 8;
  const p = powerSpectrum(irisMask(iris, n, pupilCells), n);
  undoCellAverage(p, n);
  const rgb = new Float32Array(n * n * 3);
  // zero frequency is bin n/2 (whose centre, not its corner, is the light's image): the taper
  // and each wavelength's magnification are centred on it, so every channel's pattern is too
  const h = n / 2;
  // the grid ends where the pattern does not: taper the outer quarter smoothly to zero (cos^2) so
  // no square edge shows at high dynamic range; energy is renormalised below
  for (let y = 0; y < n; y++) {
    for (let x = 0; x < n; x++) {
      const r = Math.hypot(x - h, y - h) / h;
      const w = r <= 0.75 ? 1 : r >= 1 ? 0 : Math.cos(((r - 0.75) / 0.25) * (Math.PI / 2)) ** 2;
      p[y * n + x] *= w;
    }
  }
  for (const s of spectralSamples(opts.wavelengths ?? 9)) {
    // this wavelength's pattern is the reference one magnified by lambda / lambda_ref
    const m = s.nm / REFERENCE_NM;
    const plane = new Float64Array(n * n);
    let sum = 0;
    for (let y = 0; y < n; y++) {
      for (let x = 0; x < n; x++) {
        const v = bilinear(p, n, h + (x - h) / m, h + (y - h) / m);
        plane[y * n + x] = v;
        sum += v;
      }
    }
    if (sum <= 0) continue;
    for (let i = 0; i < n * n; i++) {
      const e = plane[i] / sum;
      rgb[i * 3] += e * s.rgb[0];
      rgb[i * 3 + 1] += e * s.rgb[1];
      rgb[i * 3 + 2] += e * s.rgb[2];
    }
  }
  return { n, pupilCells, rgb };
}

/** Size of one kernel bin on the sensor, mm: lambda_ref N_f D / N. */
export function binSizeMm(kernel: StarburstKernel, fNumber: number): number {
  return REFERENCE_NM * 1e-6 * fNumber * (kernel.pupilCells / kernel.n);
}
