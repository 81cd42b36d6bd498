// End to end through the installed command (bin/straylight.js over dist/, built by `npm test`):
// render frames as a user would and read them back with an independent PNG decoder.

import { spawnSync } from 'node:child_process';
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { tempDir } from '../helpers.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const bin = path.join(root, 'bin', 'straylight.js');
const demo = path.join(root, 'shots', 'harbour-beacon.yaml');

function straylight(args: string[], cwd = root) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Centre of the brightest spot: centroid of the pixels at the peak value, near the peak. */
function brightestSpot(file: string, near?: [number, number], within = 30): [number, number] {
  const png = decode(readFileSync(file));
  const ch = png.channels;
  const lum = (i: number) => 0.2126 * png.data[i * ch] + 0.7152 * png.data[i * ch + 1] + 0.0722 * png.data[i * ch + 2];
  let best = -1;
  let bi = 0;
  for (let i = 0; i < png.width * png.height; i++) {
    const x = i % png.width;
    const y = Math.floor(i / png.width);
    if (near && Math.hypot(x - near[0], y - near[1]) > within) continue;
    const v = lum(i);
    if (v > best) [best, bi] = [v, i];
  }
  // centroid of the pixels at or above half the peak in a window, re-centred on the centroid a few
  // times (the saturated core can be wider than the window around its first pixel)
  let cx = (bi % png.width) + 0.5;
  let cy = Math.floor(bi / png.width) + 0.5;
  for (let iter = 0; iter < 6; iter++) {
    let sx = 0;
    let sy = 0;
    let sw = 0;
    for (let y = Math.floor(cy) - 30; y <= Math.floor(cy) + 30; y++) {
      for (let x = Math.floor(cx) - 30; x <= Math.floor(cx) + 30; x++) {
        if (x < 0 || y < 0 || x >= png.width || y >= png.height) continue;
        // the fully saturated core only: light around it (glow, ghosts) cannot tilt it
        if (lum(y * png.width + x) < best) continue;
        sx += x + 0.5;
        sy += y + 0.5;
        sw += 1;
      }
    }
    cx = sx / sw;
    cy = sy / sw;
  }
  return [cx, cy];
}

describe('straylight end to end', () => {
  it('renders demo frames as 16-bit RGB PNGs of the shot size, quietly', () => {
    const out = tempDir();
    const r = straylight(['render', demo, '--frames', '1019-1021', '--out', path.join(out, 'beacon.####.png'), '--quiet']);
    expect(r).toEqual({ code: 0, stdout: '', stderr: '' });
    expect(readdirSync(out).sort()).toEqual(['beacon.1019.png', 'beacon.1020.png', 'beacon.1021.png', 'beacon.manifest.json']);
    for (const f of readdirSync(out).filter((n) => n.endsWith('.png'))) {
      const png = decode(readFileSync(path.join(out, f)));
      expect([png.width, png.height, png.depth, png.channels]).toEqual([960, 540, 16, 3]);
    }
    // the smooth path passes through its keys: at frame 1020 the beacon is at the key (380, 120)
    const [x, y] = brightestSpot(path.join(out, 'beacon.1020.png'));
    expect(Math.abs(x - 380)).toBeLessThan(1);
    expect(Math.abs(y - 120)).toBeLessThan(1);
  });

  it('the tracked mast lamp sits on its CSV row (frame 1001: 620.00, 413.39)', () => {
    const out = tempDir();
    const file = path.join(out, 'still.png');
    expect(straylight(['still', demo, '--frame', '1001', '--out', file]).code).toBe(0);
    const [x, y] = brightestSpot(file, [620, 413]);
    expect(Math.abs(x - 620)).toBeLessThan(1);
    expect(Math.abs(y - 413.39)).toBeLessThan(1);
  });

  it('the brightest spot follows a linear keyframed path within a pixel', () => {
    const dir = tempDir();
    writeFileSync(
      path.join(dir, 'line.yaml'),
      `version: 1
frame: { width: 160, height: 90, rate: 24, first: 1, last: 11 }
lights:
  - name: dot
    path: linear
    position:
      - { frame: 1, x: 10, y: 20 }
      - { frame: 11, x: 110, y: 60 }
    intensity: 3
    radius: 3
output: { path: "f.%02d.png", transfer: linear }
`,
    );
    const r = straylight(['render', 'line.yaml', '--quiet'], dir);
    expect(r).toEqual({ code: 0, stdout: '', stderr: '' });
    for (const f of [1, 4, 6, 11]) {
      // linear interpolation by hand: 10 px right and 4 px down per frame
      const expected = [10 + 10 * (f - 1), 20 + 4 * (f - 1)];
      const [x, y] = brightestSpot(path.join(dir, `f.${String(f).padStart(2, '0')}.png`));
      expect(Math.abs(x - expected[0])).toBeLessThan(1);
      expect(Math.abs(y - expected[1])).toBeLessThan(1);
    }
  });

  it('a broken shot exits 3 with a located message and writes nothing', () => {
    const dir = tempDir();
    const text = readFileSync(demo, 'utf8').replace('radius: 5', 'radius: big');
    writeFileSync(path.join(dir, 'bad.yaml'), text);
    const csv = 'harbour-beacon.mast-lamp.csv';
    writeFileSync(path.join(dir, csv), readFileSync(path.join(root, 'shots', csv)));
    const lines = text.split('\n');
    const line = lines.findIndex((l) => l.includes('radius: big')) + 1;
    const col = lines[line - 1].indexOf('big') + 1;
    const r = straylight(['render', 'bad.yaml'], dir);
    expect(r.code).toBe(3);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe(
      `bad.yaml:${line}:${col}: lights[0].radius: expected a number above 0 and at most 10000, found "big"\n` +
        'straylight: 1 problem found; nothing was rendered\n',
    );
    expect(readdirSync(dir).sort()).toEqual(['bad.yaml', csv]);
  });
});
