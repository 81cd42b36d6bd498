// Motion blur across the shutter, and mattes read from PNG sequences through the shot file.
// Shutter: exposure = (angle / 360) / fps (Cook, Porter & Carpenter 1984 define the exposure
// interval; 180 deg at 24 fps = 1/48 s, computed); a point moving 48 px a frame leaves 24 px.

import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ShotError } from '../../src/errors.js';
import { encodePng } from '../../src/io/png.js';
import { loadShot } from '../../src/io/load-shot.js';
import { FloatImage } from '../../src/raster/image.js';
import { lightVisibility, renderFrame } from '../../src/render/render-frame.js';
import { exposureSeconds, shutterTimes } from '../../src/timeline/shutter.js';
import { visibilityRows } from '../../src/render/visibility-curves.js';
import { tempDir } from '../helpers.js';

const moving = (shutter: string) => `version: 1
frame: { width: 200, height: 40, rate: 24, first: 1, last: 3 }
lights:
  - name: dot
    path: linear
    position: [{ frame: 0, x: 4, y: 20 }, { frame: 4, x: 196, y: 20 }]
    intensity: 0
    radius: 0.5
flare: { glow: { fraction: 0 } }
${shutter}
output: { path: "f.####.png" }
`;

async function shotFrom(text: string, files: Record<string, FloatImage> = {}) {
  const dir = tempDir();
  for (const [name, img] of Object.entries(files)) {
    mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
    writeFileSync(path.join(dir, name), encodePng(img, { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
  }
  writeFileSync(path.join(dir, 'shot.yaml'), text);
  return await loadShot(path.join(dir, 'shot.yaml'));
}

/** Lit columns of the middle row. */
function extent(img: FloatImage): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let x = 0; x < img.width; x++) {
    if (img.data[(20 * img.width + x) * 4] > 1e-4) {
      lo = Math.min(lo, x);
      hi = Math.max(hi, x + 1);
    }
  }
  return hi - lo;
}

describe('shutter', () => {
  it('is open 1/48 s at 180 degrees and 24 fps (computed)', async () => {
    expect(exposureSeconds({ angleDeg: 180 }, { num: 24, den: 1 })).toBeCloseTo(1 / 48, 12);
    expect(exposureSeconds({ angleDeg: 360 }, { num: 24000, den: 1001 })).toBeCloseTo(1001 / 24000, 12);
  });
  it('samples stratified times across the open interval, centred on the frame by default, the same every time', async () => {
    const t = shutterTimes({ angleDeg: 180, samples: 8, phaseDeg: -90 }, 10, 7);
    expect(t).toHaveLength(8);
    t.forEach((v, i) => {
      expect(v).toBeGreaterThanOrEqual(10 - 0.25 + (0.5 * i) / 8);
      expect(v).toBeLessThan(10 - 0.25 + (0.5 * (i + 1)) / 8);
    });
    expect(shutterTimes({ angleDeg: 180, samples: 8, phaseDeg: -90 }, 10, 7)).toEqual(t);
  });
  it('a point moving 48 px a frame leaves a 24 px streak at 180 degrees', async () => {
    const shot = await shotFrom(moving('shutter: { angle: 180, samples: 96 }'));
    // the dot is 1 px across: the streak covers its 24 px path plus the dot
    expect(extent(renderFrame(shot, 2))).toBeGreaterThanOrEqual(24);
    expect(extent(renderFrame(shot, 2))).toBeLessThanOrEqual(26);
  });
  it('0 degrees gives no blur', async () => {
    const shot = await shotFrom(moving('shutter: { angle: 0, samples: 16 }'));
    expect(extent(renderFrame(shot, 2))).toBeLessThanOrEqual(2);
  });
  it('blur keeps the energy: the streak holds what the still dot does', async () => {
    const still = renderFrame(await shotFrom(moving('shutter: { angle: 0 }')), 2).channelSums()[0];
    const blurred = renderFrame(await shotFrom(moving('shutter: { angle: 180, samples: 32 }')), 2).channelSums()[0];
    expect(blurred / still).toBeCloseTo(1, 3);
  });
});

/** An image sequence of one matte: value(frame, x, y). */
function sequence(name: string, frames: number[], w: number, h: number, value: (f: number, x: number, y: number) => number): Record<string, FloatImage> {
  const out: Record<string, FloatImage> = {};
  for (const f of frames) {
    const img = new FloatImage(w, h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) img.data.fill(value(f, x, y), (y * w + x) * 4, (y * w + x) * 4 + 3);
    out[`${name}.${String(f).padStart(4, '0')}.png`] = img;
  }
  return out;
}

const lit = (mattes: string, light = '') => `version: 1
frame: { width: 64, height: 32, rate: 24, first: 1, last: 6 }
lights:
  - { name: lamp, position: [32, 16], intensity: 0, radius: 6${light} }
mattes:
${mattes}
output: { path: "f.####.png" }
`;

describe('mattes from PNG sequences', () => {
  it('an alpha matte covers the light; invert flips it; the offset picks the matte frame', async () => {
    // frames 1-3 clear, 4-6 covered
    const files = sequence('m/fg', [1, 2, 3, 4, 5, 6], 64, 32, (f) => (f >= 4 ? 1 : 0));
    const shot = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png }'), files);
    expect([2, 5].map((f) => lightVisibility(shot, shot.lights[0], f))).toEqual([1, 0]);
    const inverted = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png, invert: true }'), files);
    expect(lightVisibility(inverted, inverted.lights[0], 2)).toBe(0);
    const shifted = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png, offset: 2 }'), files);
    expect(lightVisibility(shifted, shifted.lights[0], 2)).toBe(0);
  });

  it('outside the matte sequence: hold its first and last frames, or clear', async () => {
    const files = sequence('m/fg', [3, 4], 64, 32, () => 1);
    const hold = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png }'), files);
    expect([1, 6].map((f) => lightVisibility(hold, hold.lights[0], f))).toEqual([0, 0]);
    const clear = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png, before: clear, after: clear }'), files);
    expect([1, 3, 6].map((f) => lightVisibility(clear, clear.lights[0], f))).toEqual([1, 0, 1]);
  });

  it('a normalised depth matte covers only where the scene is nearer than the light', async () => {
    // stored 0.1 -> depth 10 + 0.1 x 990 = 109; the light at 50 is in front, at 200 behind
    const files = sequence('m/z', [1], 64, 32, () => 0.1);
    const m = '  - { name: z, kind: depth, path: m/z.####.png, encoding: normalised, near: 10, far: 1000, tolerance: 1 }';
    const front = await shotFrom(lit(m, ', depth: 50'), files);
    expect(lightVisibility(front, front.lights[0], 1)).toBe(1);
    const behind = await shotFrom(lit(m, ', depth: 200'), files);
    expect(lightVisibility(behind, behind.lights[0], 1)).toBe(0);
    const inverted = await shotFrom(lit(m.replace('normalised', 'inverted'), ', depth: 200'), files);
    expect(lightVisibility(inverted, inverted.lights[0], 1)).toBe(1); // stored 0.1 -> 1000 - 99 = 901
  });

  it('a matte of another size is a clear error at its path, unless stretched', async () => {
    const files = sequence('m/fg', [1], 32, 16, (f, x) => (x >= 16 ? 1 : 0));
    try {
      await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png }'), files);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ShotError);
      expect((e as ShotError).message).toMatch(/shot\.yaml:6:36: mattes\[0\]\.path: the matte is 32x16 px, the frame 64x32; give resize: stretch to stretch it over the frame$/);
    }
    const stretched = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png, resize: stretch }'), files);
    expect(lightVisibility(stretched, stretched.lights[0], 1)).toBeCloseTo(0.5, 1);
  });

  it('a light that needs a depth gets a located error without one', async () => {
    const files = sequence('m/z', [1], 64, 32, () => 0.1);
    await expect(shotFrom(lit('  - { name: z, kind: depth, path: m/z.####.png, near: 1, far: 2 }'), files)).rejects.toThrow(/lights\[0\]: missing key "depth"/);
  });

  it('the covered part of the disk is not drawn; glow scales with what is seen', async () => {
    // the right half of the frame is covered
    const files = sequence('m/fg', [1], 64, 32, (f, x) => (x >= 32 ? 1 : 0));
    const shot = await shotFrom(lit('  - { name: fg, kind: alpha, path: m/fg.####.png }'), files);
    const img = renderFrame(shot, 1);
    expect(img.data[(16 * 64 + 36) * 4]).toBeLessThan(0.05); // inside the disk, covered: only glow
    expect(img.data[(16 * 64 + 28) * 4]).toBeGreaterThan(0.9); // inside the disk, clear
    expect(readFileSync).toBeDefined();
  });
});

describe('effective intensity over the shutter', () => {
  it('is the light that gets through at each instant, averaged: not visibility times mean gain', async () => {
    // the dot crosses a matte edge (x = 100) at frame 2 while its linear intensity ramps from 0 at
    // t = 1.75 to 2 at t = 2.25; a 180-degree shutter opens over exactly that interval. Covered
    // while t < 2 and lit after: mean visibility 1/2, mean gain 1, but the light through is
    // (1 / 0.5) x integral from 2 to 2.25 of 4 (t - 1.75) dt = 0.75 (computed)
    const text = moving('shutter: { angle: 180, samples: 64 }')
      .replace('    intensity: 0\n', '    intensity_unit: linear\n    intensity: [{ frame: 1.75, value: 0 }, { frame: 2.25, value: 2 }]\n')
      .replace('output:', 'mattes: [{ name: edge, kind: alpha, path: m/e.####.png }]\noutput:');
    const shot = await shotFrom(text, sequence('m/e', [1, 2, 3], 200, 40, (f, x) => (x < 100 ? 1 : 0)));
    const row = visibilityRows(shot).find((r) => r.frame === 2)!;
    expect(row.visibility).toBeCloseTo(0.5, 1);
    expect(row.effectiveIntensity).toBeGreaterThan(0.72);
    expect(row.effectiveIntensity).toBeLessThan(0.78);
  });
});
