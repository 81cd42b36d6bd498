// Starburst, streak, veil and dust: energy is the configured fraction of the light's flux, also
// when the light is off frame (energy leaves the frame, it is not renormalised), and dust is
// deterministic for a seed.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { presetNames, presetPath } from '../../src/io/presets.js';
import { addDust, dustTexture } from '../../src/elements/dust.js';
import { addStarburst } from '../../src/elements/starburst.js';
import { addStreak, addVeil } from '../../src/elements/streak.js';
import { starburstKernel } from '../../src/optics/diffraction.js';
import { FloatImage } from '../../src/raster/image.js';


/** Energy centroid of one channel of an image, pixel centres at (x + 0.5, y + 0.5). */
function centroid(img: FloatImage, c: number): { x: number; y: number; sum: number } {
  let sx = 0;
  let sy = 0;
  let s = 0;
  for (let y = 0; y < img.height; y++) {
    for (let x = 0; x < img.width; x++) {
      const v = img.data[(y * img.width + x) * 4 + c];
      sx += v * (x + 0.5);
      sy += v * (y + 0.5);
      s += v;
    }
  }
  return { x: sx / s, y: sy / s, sum: s };
}

const kernel = starburstKernel({ blades: 6, rotationDeg: 15, roundness: 0 }, { n: 128, pupilCells: 16, wavelengths: 5 });

describe('starburst energy', () => {
  for (const binPx of [0.3, 1, 2.5]) {
    it(`puts its fraction of the flux in the frame with ${binPx} px bins (within 1%)`, () => {
      const img = new FloatImage(400, 400);
      addStarburst(img, kernel, { xPx: 200.3, yPx: 199.6, energy: [5, 3, 1], binPx }, 1);
      const [r, g, b] = img.channelSums();
      expect(r / 5).toBeCloseTo(1, 2);
      expect(g / 3).toBeCloseTo(1, 2);
      expect(b / 1).toBeCloseTo(1, 2);
    });
  }
  it('a light off the frame edge leaves the outside part out (the left half of a symmetric pattern)', () => {
    const img = new FloatImage(400, 400);
    addStarburst(img, kernel, { xPx: 0, yPx: 200, energy: [1, 1, 1], binPx: 2 }, 1);
    // the kernel is symmetric about its centre (|F|^2 of a real mask): half falls outside
    expect(img.channelSums()[1]).toBeGreaterThan(0.45);
    expect(img.channelSums()[1]).toBeLessThan(0.55);
  });
});

describe('starburst position', () => {
  // |F|^2 of a real pupil is centrosymmetric about zero frequency (Goodman, Fraunhofer
  // diffraction), so the pattern's energy centroid is the light's image, in every channel and at
  // every wavelength's magnification
  it('the kernel is centred on its zero-frequency bin (n/2) in every channel', () => {
    const k = starburstKernel({ blades: 5, rotationDeg: 10, roundness: 0 }, { n: 128, pupilCells: 16, wavelengths: 9 });
    for (let c = 0; c < 3; c++) {
      let sx = 0;
      let sy = 0;
      let s = 0;
      for (let y = 0; y < k.n; y++) {
        for (let x = 0; x < k.n; x++) {
          const v = k.rgb[(y * k.n + x) * 3 + c];
          sx += v * x;
          sy += v * y;
          s += v;
        }
      }
      expect(Math.abs(sx / s - k.n / 2)).toBeLessThan(0.01);
      expect(Math.abs(sy / s - k.n / 2)).toBeLessThan(0.01);
    }
  });

  for (const binPx of [0.3, 1, 2.5, 6]) {
    it(`lands centred on the light in every channel with ${binPx} px bins (energy centroid within 0.05 px)`, () => {
      const img = new FloatImage(1200, 1200);
      const at = { xPx: 600.3, yPx: 599.6 };
      addStarburst(img, kernel, { ...at, energy: [5, 3, 1], binPx }, 1);
      // a pixel's centre is at (x + 0.5, y + 0.5) (README, Conventions)
      for (let c = 0; c < 3; c++) {
        const m = centroid(img, c);
        expect(Math.abs(m.x - at.xPx)).toBeLessThan(0.05);
        expect(Math.abs(m.y - at.yPx)).toBeLessThan(0.05);
      }
    });
  }
});

describe('starburst position through the renderer', () => {
  for (const [fNumber, size] of [[8, 200], [16, 200], [4, 1000]] as const) {
    it(`sits on the light at f/${fNumber}, size ${size}: every channel's centroid within 0.05 px`, async () => {
      const { resolveShot } = await import('../../src/shot/resolve.js');
      const { renderFrame } = await import('../../src/render/render-frame.js');
      // the light at the frame's centre, so the frame crops the pattern symmetrically
      const shot = resolveShot(
        `version: 1
frame: { width: 960, height: 540, rate: 24, first: 1, last: 1 }
lights: [{ name: a, position: [480, 270], intensity: 8 }]
lens: { preset: triplet-50, f_number: ${fNumber} }
flare: { core: { enabled: false }, glow: { enabled: false }, ghosts: { enabled: false }, starburst: { size: ${size} } }
output: { path: "f.####.png" }
`,
        's.yaml',
        { readText: (p) => readFileSync(p, 'utf8'), presetNames, presetPath },
      );
      const img = renderFrame(shot, 1);
      for (let c = 0; c < 3; c++) {
        const m = centroid(img, c);
        expect(m.sum).toBeGreaterThan(0);
        expect(Math.abs(m.x - 480)).toBeLessThan(0.05);
        expect(Math.abs(m.y - 270)).toBeLessThan(0.05);
      }
    });
  }
});

describe('streak energy', () => {
  it('a centred streak holds its whole energy (within 1%)', () => {
    const img = new FloatImage(4000, 40);
    addStreak(img, { xPx: 2000, yPx: 20, energy: [2, 2, 2], lengthPx: 200, thicknessPx: 1.5 }, 1);
    expect(img.channelSums()[0] / 2).toBeCloseTo(1, 2);
  });
  it('a light a px left of the frame leaves exactly e^{-a/L} / 2 in it (computed from the profile)', () => {
    for (const a of [0, 50, 300]) {
      const img = new FloatImage(4000, 40);
      addStreak(img, { xPx: -a, yPx: 20, energy: [1, 1, 1], lengthPx: 200, thicknessPx: 1 }, 1);
      expect(img.channelSums()[0] / (0.5 * Math.exp(-a / 200))).toBeCloseTo(1, 3);
    }
  });
  it('keeps its energy with a 2:1 pixel aspect', () => {
    const img = new FloatImage(2000, 40);
    addStreak(img, { xPx: 1000, yPx: 20, energy: [1, 1, 1], lengthPx: 200, thicknessPx: 1 }, 2);
    expect(img.channelSums()[0] * 2).toBeCloseTo(1, 2);
  });
});

describe('veil', () => {
  it('lifts the frame uniformly by its energy over the frame area', () => {
    const img = new FloatImage(100, 50);
    addVeil(img, [10, 5, 1], 1);
    expect(img.channelSums()[0]).toBeCloseTo(10, 3);
    expect(img.data[0]).toBeCloseTo(img.data[(49 * 100 + 99) * 4], 9);
  });
});

describe('dust', () => {
  it('the same seed gives identical bytes; different seeds differ', () => {
    const a = dustTexture(200, 100, 7, 2);
    const b = dustTexture(200, 100, 7, 2);
    const c = dustTexture(200, 100, 8, 2);
    expect(Buffer.from(a.buffer).equals(Buffer.from(b.buffer))).toBe(true);
    expect(Buffer.from(a.buffer).equals(Buffer.from(c.buffer))).toBe(false);
    expect(a.some((v) => v > 0)).toBe(true);
  });
  it('lights up near the light and with its brightness', () => {
    const t = dustTexture(200, 100, 3, 5);
    const near = new FloatImage(200, 100);
    const far = new FloatImage(200, 100);
    addDust(near, t, { xPx: 100, yPx: 50, flux: [1, 1, 1] }, 0.1, 30);
    addDust(far, t, { xPx: 900, yPx: 50, flux: [1, 1, 1] }, 0.1, 30);
    expect(near.channelSums()[0]).toBeGreaterThan(100 * far.channelSums()[0]);
    const bright = new FloatImage(200, 100);
    addDust(bright, t, { xPx: 100, yPx: 50, flux: [4, 4, 4] }, 0.1, 30);
    expect(bright.channelSums()[0] / near.channelSums()[0]).toBeCloseTo(4, 6);
  });
});

describe('element gains and switches in the shot', () => {
  it('a glow gain keyed from 0 to 2 scales the glow frame by frame; enabled: false removes an element', async () => {
    const { resolveShot } = await import('../../src/shot/resolve.js');
    const { renderFrame } = await import('../../src/render/render-frame.js');
    const base = `version: 1
frame: { width: 120, height: 80, rate: 24, first: 1, last: 3 }
lights: [{ name: a, position: [60, 40], intensity: 4, radius: 2 }]
flare:
  core: { enabled: false }
  starburst: { enabled: false }
  glow: { fraction: 0.2, size: 6, gain: [{ frame: 1, value: 0 }, { frame: 3, value: 2 }] }
output: { path: "f.####.png" }
`;
    const shot = resolveShot(base, 'g.yaml', { readText: () => '' });
    const sums = [1, 2, 3].map((f) => renderFrame(shot, f).channelSums()[1]);
    expect(sums[0]).toBe(0);
    expect(sums[2] / sums[1]).toBeCloseTo(2, 6);
    const off = resolveShot(base.replace('glow: { fraction: 0.2', 'glow: { enabled: false, fraction: 0.2'), 'g.yaml', { readText: () => '' });
    expect(renderFrame(off, 3).channelSums()[1]).toBe(0);
  });
});
