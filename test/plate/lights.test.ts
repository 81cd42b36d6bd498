// Finding and tracking lights in plates, against truth we put there and against OpenCV.
// Synthetic plates: Gaussian and disk lights at known sub-pixel places on known paths, with noise
// (invented test data; the truth is the formula that drew them). OpenCV (Debian python3-opencv)
// finds the same blobs on the same frames: cv2.connectedComponentsWithStats for the blobs and
// their areas, cv2.moments for the luminance-weighted centroids.

import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { seeded } from '../../src/elements/dust.js';
import { encodePng } from '../../src/io/png.js';
import { detectBlobs, luminance, type DetectOptions } from '../../src/plate/detect.js';
import { linkTracks } from '../../src/plate/track.js';
import { FloatImage } from '../../src/raster/image.js';
import { readFrameLinear } from '../../src/io/read-frame.js';
import { ExitCode } from '../../src/errors.js';
import { cli, tempDir } from '../helpers.js';

interface Light {
  x: number;
  y: number;
  kind: 'gauss' | 'disk';
  size: number;
  level: number;
  rgb?: [number, number, number];
}

/** A plate frame: a dark background with noise and the lights (disks drawn with exact coverage, 8x8 supersampled). */
function plate(w: number, h: number, lights: Light[], seed: number, noise = 0.01, bg = 0.02): FloatImage {
  const img = new FloatImage(w, h);
  const r = seeded(seed); // the noise: the project's seeded generator (mulberry32)
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let v = [bg, bg, bg];
      for (const l of lights) {
        let a = 0;
        if (l.kind === 'gauss') {
          a = l.level * Math.exp(-((x + 0.5 - l.x) ** 2 + (y + 0.5 - l.y) ** 2) / (2 * l.size * l.size));
        } else {
          let inside = 0;
          for (let sy = 0; sy < 8; sy++) for (let sx = 0; sx < 8; sx++) if (Math.hypot(x + (sx + 0.5) / 8 - l.x, y + (sy + 0.5) / 8 - l.y) <= l.size) inside++;
          a = (l.level * inside) / 64;
        }
        const c = l.rgb ?? [1, 1, 1];
        v = v.map((q, k) => q + a * c[k]);
      }
      const n = (r() - 0.5) * 2 * noise;
      img.data.set([Math.max(0, v[0] + n), Math.max(0, v[1] + n), Math.max(0, v[2] + n), 1], (y * w + x) * 4);
    }
  }
  return img;
}

const OPTS: DetectOptions = { threshold: { absolute: 0.5 }, minArea: 4, maxCount: 8, clip: Infinity };

function asFrame(img: FloatImage) {
  const rgb = new Float32Array(img.width * img.height * 3);
  for (let i = 0; i < img.width * img.height; i++) rgb.set([img.data[i * 4], img.data[i * 4 + 1], img.data[i * 4 + 2]], i * 3);
  return { width: img.width, height: img.height, rgb };
}

describe('finding lights in a frame', () => {
  it('puts a well-exposed Gaussian or disk light within 0.05 px of where it is, through noise (the formula that drew them)', () => {
    let worst = 0;
    for (let k = 0; k < 12; k++) {
      const x = 40.13 + 7.37 * k;
      const y = 30.71 + 3.19 * k;
      const l: Light = k % 2 ? { x, y, kind: 'gauss', size: 2.5, level: 4 } : { x, y, kind: 'disk', size: 5.3, level: 3 };
      const blobs = detectBlobs(asFrame(plate(160, 90, [l], k)), OPTS);
      expect(blobs).toHaveLength(1);
      worst = Math.max(worst, Math.hypot(blobs[0].x - x, blobs[0].y - y));
    }
    expect(worst).toBeLessThan(0.05);
  });

  it('ignores blobs under the minimum area, keeps the brightest up to the count, and reports a disk\'s radius', () => {
    const lights: Light[] = [
      { x: 20.5, y: 20.5, kind: 'disk', size: 6, level: 2 },
      { x: 60.5, y: 20.5, kind: 'disk', size: 4, level: 2 },
      { x: 100.5, y: 20.5, kind: 'disk', size: 0.6, level: 2 }, // about 1 px: under min area 4
    ];
    const blobs = detectBlobs(asFrame(plate(160, 60, lights, 3, 0)), { ...OPTS, maxCount: 1 });
    expect(blobs).toHaveLength(1);
    expect(blobs[0].x).toBeCloseTo(20.5, 2);
    // a disk of radius 6 covers pi 36 = 113 px: the pixels a quarter covered or more (0.5 of level 2) make about that
    expect(blobs[0].radius).toBeGreaterThan(5.5);
    expect(blobs[0].radius).toBeLessThan(6.5);
    const all = detectBlobs(asFrame(plate(160, 60, lights, 3, 0)), OPTS);
    expect(all.map((b) => Math.round(b.x))).toEqual([21, 61]);
  });

  it('a relative threshold follows the frame: the same blobs at a quarter of the exposure', () => {
    const l: Light = { x: 50.3, y: 30.6, kind: 'gauss', size: 3, level: 4 };
    const rel: DetectOptions = { ...OPTS, threshold: { relative: 0.3 } };
    const a = detectBlobs(asFrame(plate(100, 60, [l], 1, 0, 0)), rel);
    const b = detectBlobs(asFrame(plate(100, 60, [{ ...l, level: 1 }], 1, 0, 0)), rel);
    expect(a).toHaveLength(1);
    expect(b[0].area).toBe(a[0].area);
  });
});

describe('OpenCV finds the same blobs (python3-opencv: connectedComponentsWithStats, moments)', () => {
  it('count, areas and centroids (within 0.01 px) on the same thresholded frames', () => {
    const dir = tempDir();
    const files: string[] = [];
    const lights: Light[] = [
      { x: 30.37, y: 25.81, kind: 'disk', size: 6.2, level: 3, rgb: [1.3, 0.95, 0.6] },
      { x: 95.12, y: 40.44, kind: 'gauss', size: 3.1, level: 5 },
      { x: 140.9, y: 70.2, kind: 'disk', size: 3.4, level: 1.5, rgb: [0.6, 1, 1.5] },
      // two lights whose bright parts touch diagonally: one 8-connected blob
      { x: 60.5, y: 75.5, kind: 'disk', size: 2.2, level: 2 },
      { x: 64.9, y: 79.9, kind: 'disk', size: 2.2, level: 2 },
    ];
    for (let f = 0; f < 4; f++) {
      const file = path.join(dir, `p.${f}.png`);
      const moved = lights.map((l) => ({ ...l, x: l.x + 1.7 * f, y: l.y - 0.6 * f }));
      writeFileSync(file, encodePng(plate(180, 100, moved, 10 + f, 0.02), { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
      files.push(file);
    }
    const ref = JSON.parse(execFileSync('/usr/bin/python3', [path.join(__dirname, 'opencv-blobs.py'), '0.5', ...files], { encoding: 'utf8' })) as { blobs: { area: number; x: number; y: number }[] }[];
    files.forEach((file, i) => {
      // the same decoded pixels OpenCV reads: our PNG reader, linear transfer
      const ours = detectBlobs(readFrameLinear(file), { ...OPTS, minArea: 1, maxCount: 100 });
      const theirs = ref[i].blobs;
      expect(ours).toHaveLength(theirs.length);
      for (const b of theirs) {
        const m = ours.find((o) => Math.hypot(o.x - b.x, o.y - b.y) < 1)!;
        expect(m).toBeDefined();
        expect(m.area).toBe(b.area);
        expect(Math.abs(m.x - b.x)).toBeLessThan(0.01);
        expect(Math.abs(m.y - b.y)).toBeLessThan(0.01);
      }
    });
  });
});

describe('tracking lights from frame to frame', () => {
  it('keeps two crossing lights apart and one light through a 5-frame gap, its path predicted and flagged', () => {
    const frames = [];
    for (let f = 1; f <= 30; f++) {
      const a: Light = { x: 20 + 4 * f, y: 40 + 0.5 * f, kind: 'disk', size: 4, level: 2 };
      // light b passes 12.5 px below a at frame 19, well inside the gate: the prediction keeps them apart
      const b: Light = { x: 160 - 3 * f, y: 62, kind: 'gauss', size: 2.5, level: 3 };
      // light a is hidden behind something on frames 12-16
      const hidden = f >= 12 && f <= 16;
      const img = plate(200, 100, hidden ? [b] : [a, b], f, 0.01);
      frames.push({ frame: f, blobs: detectBlobs(asFrame(img), OPTS) });
    }
    const tracks = linkTracks(frames, { gate: 20, maxGap: 8, minFrames: 3 });
    expect(tracks).toHaveLength(2);
    const a = tracks.find((t) => t.points[0].x < 50)!;
    const b = tracks.find((t) => t.points[0].x > 100)!;
    expect(a.points.map((p) => p.frame)).toEqual(Array.from({ length: 30 }, (_, i) => i + 1));
    expect(a.points.filter((p) => p.predicted).map((p) => p.frame)).toEqual([12, 13, 14, 15, 16]);
    // predicted on the straight line between the sightings: within 0.1 px of the true path
    for (const p of a.points) expect(Math.hypot(p.x - (20 + 4 * p.frame), p.y - (40 + 0.5 * p.frame))).toBeLessThan(0.1);
    expect(b.points.every((p) => !p.predicted)).toBe(true);
    for (const p of b.points) expect(Math.hypot(p.x - (160 - 3 * p.frame), p.y - 62)).toBeLessThan(0.1);
  });
});

/** A plate sequence on disk: a lamp on a straight path, hidden on `hidden` frames. */
function plateSequence(dir: string, opts: { frames?: number[]; size?: (f: number) => [number, number]; hidden?: (f: number) => boolean; level?: number } = {}): string {
  mkdirSync(path.join(dir, 'plate'), { recursive: true });
  for (const f of opts.frames ?? Array.from({ length: 12 }, (_, i) => 101 + i)) {
    const [w, h] = opts.size?.(f) ?? [160, 90];
    const lights: Light[] = opts.hidden?.(f) ? [] : [{ x: 30 + 6 * (f - 101), y: 40, kind: 'disk', size: 4, level: opts.level ?? 3, rgb: [1.2, 0.9, 0.6] }];
    writeFileSync(path.join(dir, 'plate', `p.${f}.png`), encodePng(plate(w, h, lights, f, 0.01), { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
  }
  return path.join(dir, 'plate', 'p.###.png');
}

describe('straylight lights', () => {
  it('writes a track per light and a shot that checks and renders, with the plate as the light\'s matte', async () => {
    const dir = tempDir();
    const tpl = plateSequence(dir, { hidden: (f) => f === 106 || f === 107, level: 0.8 });
    const shot = path.join(dir, 'lamp.yaml');
    // unclipped (the brightest channel 0.96 of the PNG's white), so the colour can be read
    const r = await cli(['lights', tpl, '-o', shot, '--json', '--lift', '6', '--threshold', '0.5']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout) as { lights: { name: string; first: number; last: number; predicted: number[]; colour: number[] }[] };
    expect(summary.lights).toHaveLength(1);
    expect(summary.lights[0]).toMatchObject({ name: 'light-1', first: 101, last: 112, predicted: [106, 107] });
    // the colour it was drawn with, at unit luminance (Rec.709 weights)
    const y = 0.2126 * 1.2 + 0.7152 * 0.9 + 0.0722 * 0.6;
    summary.lights[0].colour.forEach((c, k) => expect(c).toBeCloseTo([1.2, 0.9, 0.6][k] / y, 1));
    const csv = readFileSync(path.join(dir, 'lamp.light-1.csv'), 'utf8');
    expect(csv).toMatch(/^# predicted \(hidden wholly or in part; placed between whole sightings\): frames 106-107$/m);
    const rows = csv.split('\n').filter((l) => /^\d/.test(l)).map((l) => l.split(',').map(Number));
    expect(rows).toHaveLength(12);
    for (const [f, x, yy] of rows) expect(Math.hypot(x - (30 + 6 * (f - 101)), yy - 40)).toBeLessThan(0.05);
    const check = await cli(['check', shot]);
    expect(check.stderr).toBe('');
    expect(check.code).toBe(0);
    const vis = await cli(['visibility', shot]);
    const v = vis.stdout.trim().split('\n').slice(1).map((l) => Number(l.split(',')[4]));
    expect(v[5]).toBe(0); // frame 106: hidden in the plate
    expect(v[6]).toBe(0);
    expect(Math.min(...v.filter((_, i) => i !== 5 && i !== 6))).toBeGreaterThan(0.9);
  });

  it('bad plates: one line, exit 3, nothing written', async () => {
    const cases: [string, (dir: string) => string, RegExp][] = [
      ['no light above the threshold', (dir) => plateSequence(dir, { level: 0.3 }), /: no light reaches the threshold \(luminance 0\.95\) on any frame; lower --threshold, or give --relative; nothing was written$/],
      ['frames of two sizes', (dir) => plateSequence(dir, { size: (f) => (f === 105 ? [162, 90] : [160, 90]) }), /\/plate\/p\.105\.png is 162x90 px, the plate's first frame 160x90: a plate has one size; nothing was written$/],
      ['a frame missing in the middle', (dir) => plateSequence(dir, { frames: [101, 102, 103, 105, 106] }), /: frame 104 missing between 101 and 106; a track needs every frame; nothing was written$/],
    ];
    for (const [, make, message] of cases) {
      const dir = tempDir();
      const tpl = make(dir);
      const r = await cli(['lights', tpl, '-o', path.join(dir, 'out.yaml')]);
      expect(r.code).toBe(3);
      expect(r.stderr.trim().split('\n')[0]).toMatch(message);
      expect(existsSync(path.join(dir, 'out.yaml'))).toBe(false);
    }
  });

  it('never replaces a shot file already there without --force', async () => {
    const dir = tempDir();
    const tpl = plateSequence(dir);
    const shot = path.join(dir, 'lamp.yaml');
    writeFileSync(shot, '# mine\n');
    const r = await cli(['lights', tpl, '-o', shot]);
    expect(r.code).toBe(3);
    expect(readFileSync(shot, 'utf8')).toBe('# mine\n');
    expect((await cli(['lights', tpl, '-o', shot, '--force'])).code).toBe(0);
  });
});

describe('the luminance a plate frame is read with', () => {
  it('is Rec.709-weighted (ITU-R BT.709: 0.2126, 0.7152, 0.0722)', () => {
    const y = luminance({ width: 1, height: 1, rgb: Float32Array.from([1, 2, 4]) });
    expect(y[0]).toBeCloseTo(0.2126 + 2 * 0.7152 + 4 * 0.0722, 6);
  });
});

describe('a light tracked from a flickering plate', () => {
  it("is the flickering case: the render's flash screening flags it (WCAG 2.x SC 2.3.1: more than 3 flashes a second)", async () => {
    const dir = tempDir();
    mkdirSync(path.join(dir, 'plate'), { recursive: true });
    // a lamp seen through leaves that cover it 3 frames in every 6: 4 Hz at 24 fps
    for (let f = 1; f <= 48; f++) {
      const shown = Math.floor((f - 1) / 3) % 2 === 0;
      const lamp: Light[] = shown ? [{ x: 80 + 0.5 * f, y: 45, kind: 'disk', size: 5, level: 3 }] : [];
      writeFileSync(path.join(dir, 'plate', `leaves.${String(f).padStart(4, '0')}.png`), encodePng(plate(160, 90, lamp, f, 0.005), { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
    }
    const shot = path.join(dir, 'leaves.yaml');
    const made = await cli(['lights', path.join(dir, 'plate', 'leaves.####.png'), '-o', shot, '--lift', '12', '--max-gap', '4']);
    expect(made.code).toBe(0);
    expect(made.stdout).toMatch(/light-1: frames 1-45; predicted behind something on 4-6, 10-12, 16-18, 22-24, 28-30, 34-36, 40-42;/);
    const r = await cli(['render', shot, '--quiet', '--fail-on-flash']);
    expect(r.code).toBe(ExitCode.flashes);
    expect(r.stderr).toMatch(/FLAGGED general flashing: frames 1-48 .*up to \d(\.\d)? flashes a second/);
  });
});
