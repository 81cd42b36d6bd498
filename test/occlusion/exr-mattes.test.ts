// Depth and alpha mattes from OpenEXR sequences, as a 3-D renderer hands them over. The EXR files
// are written by OpenImageIO's oiiotool (Debian openimageio-tools) from PFM images, so the reader
// is checked against an independent writer; the expected visibility comes from the same geometry
// given as a PNG matte (the path already checked in shutter-mattes.test.ts).

import { spawnSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ShotError } from '../../src/errors.js';
import { encodePng } from '../../src/io/png.js';
import { loadShot } from '../../src/io/load-shot.js';
import { FloatImage } from '../../src/raster/image.js';
import { lightVisibility } from '../../src/render/render-frame.js';
import { tempDir } from '../helpers.js';

const W = 64;
const H = 32;

function pfm(file: string, value: (x: number, y: number) => [number, number, number]): void {
  const head = Buffer.from(`PF\n${W} ${H}\n-1.0\n`, 'latin1');
  const body = Buffer.alloc(W * H * 12);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) value(x, y).forEach((v, c) => body.writeFloatLE(v, (((H - 1 - y) * W + x) * 3 + c) * 4));
  writeFileSync(file, Buffer.concat([head, body]));
}

function oiiotool(args: string[]): void {
  const r = spawnSync('oiiotool', args, { encoding: 'utf8' });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(r.stderr);
}

/** An EXR frame made by oiiotool from value(x, y) = [R, G, B], with the channel and type options given. */
function exrFrame(dir: string, name: string, value: (x: number, y: number) => [number, number, number], opts: string[]): void {
  mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
  const src = path.join(dir, `${name}.pfm`);
  pfm(src, value);
  oiiotool([src, ...opts, '-o', path.join(dir, name)]);
}

function pngFrame(dir: string, name: string, value: (x: number, y: number) => number): void {
  mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
  const img = new FloatImage(W, H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) img.data.fill(value(x, y), (y * W + x) * 4, (y * W + x) * 4 + 3);
  writeFileSync(path.join(dir, name), encodePng(img, { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
}

const shotText = (mattes: string, light = '') => `version: 1
frame: { width: ${W}, height: ${H}, rate: 24, first: 1, last: 2 }
lights:
  - { name: lamp, position: [30, 16], intensity: 0, radius: 6${light} }
mattes:
${mattes}
output: { path: "f.####.png" }
`;

async function load(dir: string, text: string) {
  writeFileSync(path.join(dir, 'shot.yaml'), text);
  return await loadShot(path.join(dir, 'shot.yaml'));
}

// a diagonal edge through the light's disk: covered to the right of x = 24 + y / 4
const covered = (x: number, y: number) => (x + 0.5 > 24 + y / 4 ? 1 : 0);

describe('mattes from OpenEXR sequences (written by oiiotool)', () => {
  it('a float Z depth matte, scene units as stored: covers where the scene is nearer than the light', async () => {
    const dir = tempDir();
    exrFrame(dir, 'm/z.0001.exr', (x, y) => [covered(x, y) ? 20 : 1e9, 0, 0], ['--ch', 'Z=R', '-d', 'float', '--compression', 'zip']);
    pngFrame(dir, 'p/fg.0001.png', covered);
    const ref = await load(dir, shotText('  - { name: fg, kind: alpha, path: p/fg.####.png }'));
    const want = lightVisibility(ref, ref.lights[0], 1);
    expect(want).toBeGreaterThan(0.2);
    expect(want).toBeLessThan(0.8);
    const nearLight = await load(dir, shotText('  - { name: z, kind: depth, path: m/z.####.exr, tolerance: 0.5 }', ', depth: 100'));
    expect(lightVisibility(nearLight, nearLight.lights[0], 1)).toBeCloseTo(want, 6);
    const inFront = await load(dir, shotText('  - { name: z, kind: depth, path: m/z.####.exr, tolerance: 0.5 }', ', depth: 10'));
    expect(lightVisibility(inFront, inFront.lights[0], 1)).toBe(1);
  });

  for (const compression of ['piz', 'rle', 'zips']) {
    it(`a half alpha (A-only) matte with ${compression} compression matches the same matte as PNG`, async () => {
      const dir = tempDir();
      exrFrame(dir, 'm/a.0001.exr', (x, y) => [covered(x, y), 0, 0], ['--ch', 'A=R', '-d', 'half', '--compression', compression]);
      pngFrame(dir, 'p/fg.0001.png', covered);
      const ref = await load(dir, shotText('  - { name: fg, kind: alpha, path: p/fg.####.png }'));
      const shot = await load(dir, shotText('  - { name: a, kind: alpha, path: m/a.####.exr }'));
      expect(lightVisibility(shot, shot.lights[0], 1)).toBeCloseTo(lightVisibility(ref, ref.lights[0], 1), 6);
    });
  }

  it('a named channel (depth.Z beside RGBA) is read when asked for', async () => {
    const dir = tempDir();
    exrFrame(dir, 'm/beauty.0001.exr', (x, y) => [0.3, 0.3, covered(x, y) ? 20 : 1e9], ['--ch', 'R,G,depth.Z=B', '-d', 'half', '-d', 'depth.Z=float', '--compression', 'piz']);
    pngFrame(dir, 'p/fg.0001.png', covered);
    const ref = await load(dir, shotText('  - { name: fg, kind: alpha, path: p/fg.####.png }'));
    const shot = await load(dir, shotText('  - { name: z, kind: depth, path: m/beauty.####.exr, channel: depth.Z, tolerance: 0.5 }', ', depth: 100'));
    expect(lightVisibility(shot, shot.lights[0], 1)).toBeCloseTo(lightVisibility(ref, ref.lights[0], 1), 6);
  });

  it('a missing channel is a located error that lists the channels there are', async () => {
    const dir = tempDir();
    exrFrame(dir, 'm/rgb.0001.exr', () => [1, 1, 1], ['-d', 'half']);
    try {
      await load(dir, shotText('  - { name: z, kind: depth, path: m/rgb.####.exr }', ', depth: 100'));
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ShotError);
      expect((e as Error).message).toMatch(/shot\.yaml:6:35: mattes\[0\]\.path: cannot read .*rgb\.0001\.exr: no Z channel; the file has B, G, R: give the matte a channel: NAME/);
    }
  });

  it('a PNG matte refuses an EXR channel name, at the field', async () => {
    const dir = tempDir();
    pngFrame(dir, 'p/fg.0001.png', covered);
    await expect(load(dir, shotText('  - { name: fg, kind: alpha, path: p/fg.####.png, channel: Z }'))).rejects.toThrow(/shot\.yaml:6:60: mattes\[0\]\.channel: expected one of r, g, b, a/);
  });
});
