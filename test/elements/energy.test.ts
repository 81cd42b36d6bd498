// The light's disk and glow add the energy they should: the disk radiance x pi r^2; the glow its
// fraction of that flux, minus only what falls outside the frame (never renormalised).

import { describe, expect, it } from 'vitest';
import { addDisk } from '../../src/elements/core.js';
import { addGlow, moffat, moffatEnclosed } from '../../src/elements/glow.js';
import { FloatImage } from '../../src/raster/image.js';

/** In-frame share of a Moffat glow (b = 2) whose centre lies a px outside a half-plane's edge:
 * the marginal profile integrates in closed form to 0.5 (1 - u / sqrt(1 + u^2)), u = a / s
 * (computed from the profile's definition). */
function halfPlaneShare(a: number, s: number): number {
  const u = a / s;
  return 0.5 * (1 - u / Math.sqrt(1 + u * u));
}

describe('light disk', () => {
  for (const r of [0.7, 2.5, 5, 12.3]) {
    it(`a disk of radius ${r} px adds radiance x pi r^2 (to 1e-6)`, () => {
      const img = new FloatImage(64, 64);
      addDisk(img, { xPx: 31.3, yPx: 30.8, radiusPx: r, radiance: [2, 1, 0.5] }, 1);
      const [sr, sg, sb] = img.channelSums();
      const expected = Math.PI * r * r;
      expect(sr / (2 * expected)).toBeCloseTo(1, 6);
      expect(sg / expected).toBeCloseTo(1, 6);
      expect(sb / (0.5 * expected)).toBeCloseTo(1, 6);
    });
  }

  it('with pixel aspect 2 the disk spans half as many pixels across, same energy per display area', () => {
    const img = new FloatImage(64, 64);
    addDisk(img, { xPx: 32, yPx: 32, radiusPx: 10, radiance: [1, 1, 1] }, 2);
    // each pixel is 2 display units wide: pixel sum x 2 = display-area integral
    expect((img.channelSums()[0] * 2) / (Math.PI * 100)).toBeCloseTo(1, 2);
    let widest = 0;
    for (let x = 0; x < 64; x++) if (img.data[(32 * 64 + x) * 4] > 0) widest++;
    expect(widest).toBeLessThanOrEqual(11);
  });
});

describe('glow energy', () => {
  it('its profile integrates to 1 over the plane (closed form vs quadrature)', () => {
    const s = 3;
    const f = 3.4;
    let sum = 0;
    const dr = 0.01;
    for (let r = dr / 2; r < 4000; r += dr) sum += moffat(r * r, s, f) * 2 * Math.PI * r * dr;
    expect(sum).toBeCloseTo(moffatEnclosed(4000, s, f), 3);
  });

  for (const size of [1, 4, 20]) {
    it(`a centred glow of size ${size} px puts its fraction of the flux in the frame (within 1%)`, () => {
      const img = new FloatImage(801, 801);
      addGlow(img, { xPx: 400.5, yPx: 400.5, energy: [10, 5, 1], sizePx: size, falloff: 4 }, 1);
      const [r, g, b] = img.channelSums();
      // what the frame misses is beyond the inscribed circle at most
      const inCircle = moffatEnclosed(400, size, 4);
      expect(r / (10 * inCircle)).toBeGreaterThan(0.99);
      expect(r / 10).toBeLessThan(1.001);
      expect(g / 5).toBeCloseTo(r / 10, 6);
      expect(b).toBeCloseTo(r / 10, 6);
    });
  }

  for (const a of [0, 5, 40]) {
    it(`a light ${a} px left of the frame leaves exactly the outside share out (within 1%)`, () => {
      const s = 8;
      const img = new FloatImage(1000, 4001);
      addGlow(img, { xPx: -a, yPx: 2000.5, energy: [1, 1, 1], sizePx: s, falloff: 4 }, 1);
      const expected = halfPlaneShare(a, s);
      expect(img.channelSums()[0] / expected).toBeCloseTo(1, 2);
    });
  }

  it('scales linearly with the light', () => {
    const a = new FloatImage(100, 80);
    const b = new FloatImage(100, 80);
    addGlow(a, { xPx: 20, yPx: 30, energy: [1, 1, 1], sizePx: 5, falloff: 3 }, 1);
    addGlow(b, { xPx: 20, yPx: 30, energy: [8, 8, 8], sizePx: 5, falloff: 3 }, 1);
    expect(b.channelSums()[0] / a.channelSums()[0]).toBeCloseTo(8, 9);
  });

  it('keeps its energy with a 2:1 pixel aspect', () => {
    const img = new FloatImage(500, 1000);
    addGlow(img, { xPx: 250, yPx: 500, energy: [1, 1, 1], sizePx: 6, falloff: 4 }, 2);
    expect(img.channelSums()[0]).toBeCloseTo(moffatEnclosed(500, 6, 4), 2);
  });
});
