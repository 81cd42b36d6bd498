// Starburst, streak, veil and dust: energy is the configured fraction of the light's flux, also
// when the light is off frame (energy leaves the frame, it is not renormalised), and dust is
// deterministic for a seed.

import { describe, expect, it } from 'vitest';
import { addDust, dustTexture } from '../../src/elements/dust.js';
import { addStarburst } from '../../src/elements/starburst.js';
import { addStreak, addVeil } from '../../src/elements/streak.js';
import { starburstKernel } from '../../src/optics/diffraction.js';
import { FloatImage } from '../../src/raster/image.js';

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
