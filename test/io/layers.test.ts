// Layered OpenEXR output: one file a frame, the combined image as the default layer and each
// element as a layer (glow.R, glow.G, glow.B, ...), checked with OpenImageIO's oiiotool (Debian
// openimageio-tools): the channels it lists, and the element layers summed by oiiotool against the
// combined layer within half-float precision (IEEE 754 binary16: 2^-11 relative).

import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cli, tempDir } from '../helpers.js';

const SHOT = (output: string) => `version: 1
frame: { width: 160, height: 90, rate: 24, first: 1, last: 2 }
lights:
  - { name: lamp, position: [{ frame: 1, x: 40, y: 30 }, { frame: 2, x: 60, y: 35 }], intensity: 10 }
lens: { preset: double-gauss-50, f_number: 4 }
flare: { starburst: { size: 20 }, veil: { fraction: 0.01 }, dust: { fraction: 0.02 } }
${output}
`;

describe('layered OpenEXR frames', () => {
  it('hold the combined image and one layer per element, and the layers add up to it (oiiotool)', async () => {
    const dir = tempDir();
    const f = path.join(dir, 'shot.yaml');
    writeFileSync(f, SHOT('output: { path: "out/f.####.exr", format: exr, passes: layers }'));
    const r = await cli(['render', f, '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    // one sequence: two frames and its manifest, no per-element sequences
    expect(readdirSync(path.join(dir, 'out')).sort()).toEqual(['f.0001.exr', 'f.0002.exr', 'f.manifest.json']);
    const file = path.join(dir, 'out', 'f.0002.exr');
    const info = execFileSync('oiiotool', ['--info', '-v', file], { encoding: 'utf8' });
    const list = /channel list: (.*)/.exec(info)![1].split(', ').map((c) => c.replace(/ \(.*\)$/, ''));
    const elements = ['core', 'dust', 'ghosts', 'glow', 'starburst', 'veil'];
    expect(new Set(list)).toEqual(new Set(['R', 'G', 'B', ...elements.flatMap((e) => [`${e}.R`, `${e}.G`, `${e}.B`])]));
    // the element layers summed by oiiotool, against the default layer
    const sum = path.join(dir, 'sum.exr');
    const args: string[] = [];
    elements.forEach((e, i) => {
      args.push(file, '--ch', `${e}.R,${e}.G,${e}.B`, '--chnames', 'R,G,B');
      if (i > 0) args.push('--add');
    });
    execFileSync('oiiotool', [...args, '-d', 'float', '-o', sum]);
    const stats = execFileSync('oiiotool', [sum, file, '--ch', 'R,G,B', '--absdiff', '--printstats'], { encoding: 'utf8' });
    const maxDiff = Math.max(.../Stats Max: ([\d.e+-]+) ([\d.e+-]+) ([\d.e+-]+)/.exec(stats)![0].split(/\s+/).slice(2).map(Number));
    const peak = Math.max(...execFileSync('oiiotool', [file, '--ch', 'R,G,B', '--printstats'], { encoding: 'utf8' }).match(/Stats Max: ([\d.e+-]+) ([\d.e+-]+) ([\d.e+-]+)/)![0].split(/\s+/).slice(2).map(Number));
    expect(peak).toBeGreaterThan(1);
    // each half value within 2^-11 of its own size, six of them summed: well under 1% of the peak
    expect(maxDiff).toBeLessThan(6 * peak * 2 ** -11);
    // verify sees one sequence
    const v = await cli(['verify', f]);
    expect(v.code).toBe(0);
  });

  it('refuses layers in PNG: one located line', async () => {
    const dir = tempDir();
    const f = path.join(dir, 'shot.yaml');
    writeFileSync(f, SHOT('output: { path: "out/f.####.png", passes: layers }'));
    const r = await cli(['check', f]);
    expect(r.code).toBe(3);
    expect(r.stderr.split('\n')[0]).toMatch(/shot\.yaml:7:\d+: output\.passes: layers are OpenEXR layers: give format: exr, or passes: separate for one PNG sequence per element$/);
    expect(existsSync(path.join(dir, 'out'))).toBe(false);
  });
});
