// Burn-in on review frames: the strip along the bottom names the shot, frame, timecode, lens and
// version; it changes only the strip's rows of the composite, and never the pass itself.

import { readFileSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { encodePng } from '../../src/io/png.js';
import { FloatImage } from '../../src/raster/image.js';
import { burnInText, stripHeight } from '../../src/review/burn-in.js';
import { cli, tempDir } from '../helpers.js';

const SHOT = `version: 1
frame: { width: 320, height: 180, rate: 25, first: 1, last: 2, timecode: "10:00:00:00" }
lights: [{ name: lamp, position: [160, 60], intensity: 2, radius: 6 }]
lens: { preset: triplet-50, f_number: 5.6 }
flare: { ghosts: { quality: draft } }
output: { path: out/f.####.png }
`;

describe('--burn-in', () => {
  it('says the shot, frame, timecode, lens and version', () => {
    const line = burnInText({ shot: 'shot.yaml', lens: 'preset triplet-50 f/5.6', version: 'straylight 0.3.0', timecode: () => '10:00:00:01' }, 2);
    expect(line).toBe('shot.yaml  |  frame 2  |  10:00:00:01  |  preset triplet-50 f/5.6  |  straylight 0.3.0');
  });

  it('marks only the strip of the review frames, and leaves the pass alone', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    mkdirSync(path.join(dir, 'plate'));
    const grey = new FloatImage(320, 180);
    for (let i = 0; i < grey.data.length; i += 4) grey.data.set([0.05, 0.05, 0.05, 0], i);
    for (const f of [1, 2]) writeFileSync(path.join(dir, 'plate', `p.${f}.png`), encodePng(grey, { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
    const plate = path.join(dir, 'plate', 'p.#.png');
    expect((await cli(['render', path.join(dir, 'shot.yaml'), '--quiet', '--jobs', '1', '--over', plate])).code).toBe(0);
    const plain = decode(readFileSync(path.join(dir, 'out', 'f.over.0002.png')));
    const pass = readFileSync(path.join(dir, 'out', 'f.0002.png'));
    expect((await cli(['render', path.join(dir, 'shot.yaml'), '--quiet', '--jobs', '1', '--over', plate, '--burn-in'])).code).toBe(0);
    const marked = decode(readFileSync(path.join(dir, 'out', 'f.over.0002.png')));
    expect(readFileSync(path.join(dir, 'out', 'f.0002.png')).equals(pass)).toBe(true);
    const strip = 180 - stripHeight(180);
    let outside = 0;
    let bright = 0;
    for (let y = 0; y < 180; y++) {
      for (let x = 0; x < 320; x++) {
        const i = (y * 320 + x) * plain.channels;
        const d = Math.abs((marked.data[i] as number) - (plain.data[i] as number));
        if (y < strip && d > 0) outside++;
        if (y >= strip && (marked.data[i] as number) > 200) bright++;
      }
    }
    expect(outside).toBe(0);
    expect(bright).toBeGreaterThan(50);
  });

  it('needs --movie or --over', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    const r = await cli(['render', path.join(dir, 'shot.yaml'), '--burn-in']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('--burn-in marks review frames: give --movie or --over too (the pass itself is never marked)\n');
  });
});
