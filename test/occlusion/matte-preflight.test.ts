// Every matte frame a render will read is checked before the first frame: gaps are named, each
// frame's header must read and be of the shot's size; a frame that passes its header check but
// will not decode stops the render as bad input (exit 3), in our words, naming the file.

import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { encodePng } from '../../src/io/png.js';
import { FloatImage } from '../../src/raster/image.js';
import { cli, tempDir } from '../helpers.js';

function setup(opts: { missing?: number[]; size?: Record<number, [number, number]>; replace?: Record<number, Buffer>; shutter?: string; offset?: number } = {}) {
  const dir = tempDir();
  mkdirSync(path.join(dir, 'm'));
  for (let f = 1; f <= 8; f++) {
    if (opts.missing?.includes(f)) continue;
    const [w, h] = opts.size?.[f] ?? [32, 16];
    const bytes = opts.replace?.[f] ?? encodePng(new FloatImage(w, h), { bitDepth: 8, transfer: 'linear', alpha: 'none' });
    writeFileSync(path.join(dir, 'm', `fg.${String(f).padStart(4, '0')}.png`), bytes);
  }
  const shot = path.join(dir, 'shot.yaml');
  writeFileSync(shot, `version: 1
frame: { width: 32, height: 16, rate: 24, first: 1, last: 8 }
lights:
  - { name: lamp, position: [16, 8], intensity: 2 }
mattes:
  - { name: fg, kind: alpha, path: m/fg.####.png${opts.offset ? `, offset: ${opts.offset}` : ''} }
${opts.shutter ?? ''}
output: { path: out/f.####.png }
`);
  return { dir, shot };
}

describe('matte sequences checked before the first frame', () => {
  it('names a gap in the frames the render reads', async () => {
    const { dir, shot } = setup({ missing: [3, 6] });
    for (const cmd of ['check', 'render']) {
      const r = await cli([cmd, shot]);
      expect(r.code).toBe(3);
      expect(r.stderr).toBe(`${shot}:6:36: mattes[0].path: fg.0003.png, fg.0006.png missing (the shot reads matte frames 1-8 of this sequence)\nstraylight: 1 problem found; nothing was rendered\n`);
    }
    expect(() => readFileSync(path.join(dir, 'out', 'f.0001.png'))).toThrow();
  });

  it('a missing frame outside what the render reads is fine (the hold rule covers it)', async () => {
    // with offset 2 the shot reads matte frames 3-10; 1 and 2 are never read, 9 and 10 are held
    const { shot } = setup({ missing: [1, 2], offset: 2 });
    expect((await cli(['check', shot])).code).toBe(0);
  });

  it('a centred 360-degree shutter reads one matte frame before the range: a gap there is found', async () => {
    const { shot } = setup({ missing: [2], offset: 1, shutter: 'shutter: { angle: 360, samples: 4 }' });
    // shot frames 1-8 with samples from t - 0.5 to t + 0.5 read frames round(0.5..8.5) + 1 = 2..10
    const r = await cli(['check', shot]);
    expect(r.stderr).toContain('fg.0002.png missing (the shot reads matte frames 2-8 of this sequence)');
  });

  it('names a frame of another size in the middle of the sequence', async () => {
    const { shot } = setup({ size: { 5: [64, 32] } });
    const r = await cli(['check', shot]);
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('mattes[0].path: fg.0005.png is 64x32 px, the frame 32x16; give resize: stretch to stretch it over the frame');
  });

  it('names a frame whose header cannot be read, in our words', async () => {
    const { shot } = setup({ replace: { 4: Buffer.from('GIF89a this is not a png at all') } });
    const r = await cli(['check', shot]);
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('mattes[0].path: cannot read fg.0004.png: not a PNG file (damaged, or another format under a .png name)');
  });

  it('a frame with a good header and damaged data stops the render as bad input, naming the file', async () => {
    const good = encodePng(new FloatImage(32, 16), { bitDepth: 8, transfer: 'linear', alpha: 'none' });
    // keep the signature and IHDR (33 bytes), cut the image data short
    const { dir, shot } = setup({ replace: { 5: good.subarray(0, 45) } });
    expect((await cli(['check', shot])).code).toBe(0);
    const r = await cli(['render', shot, '--jobs', '1', '--quiet']);
    expect(r.code).toBe(3);
    expect(r.stderr).toContain(`frame 5 failed: matte "fg": ${path.join(dir, 'm', 'fg.0005.png')}: not a readable PNG (damaged or truncated)\n`);
    expect(r.stderr).not.toMatch(/zlib|inflate|pngjs|at .*\.js/i);
    // the other frames are rendered and kept
    expect(readFileSync(path.join(dir, 'out', 'f.0004.png')).length).toBeGreaterThan(0);
  });
});
