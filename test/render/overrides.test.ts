// Quick look-dev overrides: --scale renders the frame at a fraction of its size with positions and
// sizes scaled, so it matches the full frame box-filtered down (radiance is kept: a pixel of the
// small frame is the mean of the full pixels it covers); --quality changes the ghosts only; and
// neither ever writes into the shot's own output or touches its manifest.

import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { PNG } from 'pngjs';
import { decodeExr } from '../../src/format/exr-read.js';
import { cli, tempDir } from '../helpers.js';

const SHOT = `version: 1
frame: { width: 256, height: 128, rate: 24, first: 1, last: 2 }
lights:
  - { name: lamp, position: [{ frame: 1, x: 90, y: 60 }, { frame: 2, x: 100, y: 64 }], intensity: 3, radius: 12 }
  - { name: far, position: [200, 30], intensity: 1, radius: 6 }
flare:
  glow: { fraction: 0.05, size: 10, falloff: 2.8 }
  starburst: { enabled: false }
  veil: { fraction: 0.001 }
output: { path: out/f.####.exr, format: exr, exr: { type: float } }
`;

function read(file: string) {
  const img = decodeExr(readFileSync(file));
  return { w: img.width, h: img.height, g: img.channels.get('G')! };
}

describe('look-dev overrides', () => {
  it('--scale 0.5 equals the full frame box-filtered by 2 (RMS within 0.1% of the image RMS; energy within 0.1%)', async () => {
    // Metric: a relative RMS in linear light. The elements here (disks with exact coverage, a
    // glow, a veil) have no detail below 2 px, so box filtering commutes with rendering up to the
    // glow's sampling; an 8-bit code metric would hide errors in the dark tail.
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    for (const [args, out] of [[[], 'full.exr'], [['--scale', '0.5'], 'half.exr']] as const) {
      const r = await cli(['still', path.join(dir, 'shot.yaml'), '--frame', '2', '--out', path.join(dir, out), ...args]);
      expect(r.code).toBe(0);
    }
    const full = read(path.join(dir, 'full.exr'));
    const half = read(path.join(dir, 'half.exr'));
    expect([half.w, half.h]).toEqual([128, 64]);
    let diff2 = 0;
    let ref2 = 0;
    let sumFull = 0;
    let sumHalf = 0;
    for (let y = 0; y < half.h; y++) {
      for (let x = 0; x < half.w; x++) {
        const i = (2 * y) * full.w + 2 * x;
        const box = (full.g[i] + full.g[i + 1] + full.g[i + full.w] + full.g[i + full.w + 1]) / 4;
        const v = half.g[y * half.w + x];
        diff2 += (v - box) ** 2;
        ref2 += box ** 2;
        sumFull += box;
        sumHalf += v;
      }
    }
    expect(Math.sqrt(diff2 / ref2)).toBeLessThan(1e-3);
    expect(Math.abs(sumHalf / sumFull - 1)).toBeLessThan(1e-3);
  });

  it('render with overrides needs --out away from the shot\'s output, and leaves the full render alone', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    expect((await cli(['render', path.join(dir, 'shot.yaml'), '--quiet', '--jobs', '1'])).code).toBe(0);
    const manifest = readFileSync(path.join(dir, 'out', 'f.manifest.json'), 'utf8');
    const noOut = await cli(['render', path.join(dir, 'shot.yaml'), '--scale', '0.5']);
    expect(noOut.code).toBe(2);
    expect(noOut.stderr).toBe("--scale makes a quick look, not the shot's frames: give --out a template in another folder\n");
    const same = await cli(['render', path.join(dir, 'shot.yaml'), '--quality', 'draft', '--scale', '0.5', '--out', path.join(dir, 'out', 'x.####.exr')]);
    expect(same.code).toBe(2);
    expect(same.stderr).toContain("--quality and --scale: --out is the shot's own output folder");
    const look = await cli(['render', path.join(dir, 'shot.yaml'), '--scale', '0.5', '--quiet', '--jobs', '1', '--out', path.join(dir, 'look', 'f.####.exr')]);
    expect(look.code).toBe(0);
    expect(read(path.join(dir, 'look', 'f.0001.exr')).w).toBe(128);
    expect(readFileSync(path.join(dir, 'out', 'f.manifest.json'), 'utf8')).toBe(manifest);
    expect(existsSync(path.join(dir, 'out', 'x.0001.exr'))).toBe(false);
  });

  it('refuses a scale outside (0, 1]', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    const r = await cli(['still', path.join(dir, 'shot.yaml'), '--frame', '1', '--out', path.join(dir, 'a.png'), '--scale', '2']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('--scale: expected a fraction of the frame\'s size above 0 and at most 1 (e.g. 0.5), found "2"\n');
  });

  it('sheet --quality/--scale draws the shot now: without a render, the same tiles the render gives, and the render untouched', async () => {
    const dir = tempDir();
    const shot = path.join(dir, 'shot.yaml');
    writeFileSync(shot, SHOT);
    // no render yet: a plain sheet is refused, a drawn one is made, and nothing is written to out/
    expect((await cli(['sheet', shot, '-o', path.join(dir, 'plain.png')])).code).toBe(3);
    const drawn = await cli(['sheet', shot, '-o', path.join(dir, 'drawn.png'), '--quality', 'medium']);
    expect(drawn.code).toBe(0);
    expect(existsSync(path.join(dir, 'out'))).toBe(false);
    const half = await cli(['sheet', shot, '-o', path.join(dir, 'half.svg'), '--scale', '0.5', '--quality', 'draft']);
    expect(half.code).toBe(0);
    expect(half.stdout).toMatch(/2 frames/);
    expect(readFileSync(path.join(dir, 'half.svg'), 'utf8')).toContain('drawn at draft quality, scale 0.5, not the render');
    // the render's own sheet (float OpenEXR frames) has the same tiles as the one drawn in memory
    expect((await cli(['render', shot, '--quiet', '--jobs', '1'])).code).toBe(0);
    expect((await cli(['sheet', shot, '-o', path.join(dir, 'rendered.png')])).code).toBe(0);
    const a = PNG.sync.read(readFileSync(path.join(dir, 'drawn.png')));
    const b = PNG.sync.read(readFileSync(path.join(dir, 'rendered.png')));
    expect([a.width, a.height]).toEqual([b.width, b.height]);
    // the title differs (it says the sheet was drawn); the tiles, below the title band, do not
    const top = 8 + 24;
    let worst = 0;
    for (let y = top; y < a.height; y++) for (let x = 0; x < a.width * 4; x++) worst = Math.max(worst, Math.abs(a.data[y * a.width * 4 + x] - b.data[y * a.width * 4 + x]));
    expect(worst).toBeLessThanOrEqual(1);
    // a sequence on disk cannot be drawn again
    const seq = await cli(['sheet', path.join(dir, 'out', 'f.####.exr'), '-o', path.join(dir, 'x.png'), '--scale', '0.5']);
    expect(seq.code).toBe(2);
    expect(seq.stderr).toMatch(/--quality and --scale draw a shot's frames: give a shot file/);
  });
});
