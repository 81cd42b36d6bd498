// Colour spaces: matrices from published primaries (SMPTE RP 177's method) against the matrices the
// Academy prints, conversions against OpenColorIO (Debian python3-pyopencolorio), frames written in
// each space read back by exrheader and by our own reader, and the bad inputs.

import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { apply, COLOUR_SPACES, convertMatrix, rgbToXyz, SPACE_NAMES, type Mat3 } from '../../src/colour/spaces.js';
import { encodeOutput } from '../../src/io/encode-frame.js';
import { readFrameLinear } from '../../src/io/read-frame.js';
import { loadShot } from '../../src/io/load-shot.js';
import { FloatImage } from '../../src/raster/image.js';
import { cli, MINIMAL_SHOT, tempDir } from '../helpers.js';

const close = (a: readonly number[], b: readonly number[], tol: number) => a.forEach((v, i) => expect(Math.abs(v - b[i])).toBeLessThan(tol));

describe('RGB to XYZ from the primaries (SMPTE RP 177)', () => {
  it('AP0 and AP1 give the matrices printed in the ACES specifications, to their 10 decimals', () => {
    // Academy S-2008-001 (ACES2065-1, AP0) and S-2014-004 (ACEScg, AP1), the NPM each prints (from
    // memory; the same values stand as AP0_2_XYZ_MAT and AP1_2_XYZ_MAT in the ACES reference CTL)
    const ap0: Mat3 = [0.9525523959, 0.0, 0.0000936786, 0.3439664498, 0.7281660966, -0.0721325464, 0.0, 0.0, 1.0088251844];
    const ap1: Mat3 = [0.6624541811, 0.1340042065, 0.156187687, 0.2722287168, 0.6740817658, 0.0536895174, -0.0055746495, 0.0040607335, 1.0103391003];
    close(rgbToXyz(COLOUR_SPACES['aces2065-1']), ap0, 6e-11);
    close(rgbToXyz(COLOUR_SPACES.acescg), ap1, 6e-11);
  });

  it('Rec.709 gives the sRGB matrix IEC 61966-2-1 prints, to its 4 decimals; its middle row is the luminance weights', () => {
    const srgb: Mat3 = [0.4124, 0.3576, 0.1805, 0.2126, 0.7152, 0.0722, 0.0193, 0.1192, 0.9505];
    close(rgbToXyz(COLOUR_SPACES.rec709), srgb, 6e-5);
  });

  it('Rec.2020 from Rec.709: the matrix ITU-R BT.2087 prints, to its 4 decimals (from memory)', () => {
    close(convertMatrix('rec709', 'rec2020'), [0.6274, 0.3293, 0.0433, 0.0691, 0.9195, 0.0114, 0.0164, 0.088, 0.8956], 6e-5);
  });

  it('round trips are the identity: rec709 -> acescg -> rec709 within 1e-6, every pair', () => {
    const v: [number, number, number] = [0.18, 0.7, 2.5];
    for (const a of SPACE_NAMES) for (const b of SPACE_NAMES) close(apply(convertMatrix(b, a), apply(convertMatrix(a, b), v)), v, 1e-6);
  });
});

describe('conversions against OpenColorIO', () => {
  it('every pair of spaces converts the same pixels within 1e-5 (relative)', () => {
    const pixels = [[1, 0, 0], [0, 1, 0], [0, 0, 1], [0.18, 0.18, 0.18], [0.9, 0.4, 0.05], [12, 3.5, 0.2], [0.02, 0.3, 1.7]];
    const ref = JSON.parse(execFileSync('/usr/bin/python3', [path.join(__dirname, 'ocio-convert.py')], { input: JSON.stringify({ pixels }), encoding: 'utf8' })) as Record<string, number[][]>;
    let worst = 0;
    for (const a of SPACE_NAMES) {
      for (const b of SPACE_NAMES) {
        pixels.forEach((p, i) => {
          const ours = apply(convertMatrix(a, b), p as [number, number, number]);
          const theirs = ref[`${a}>${b}`][i];
          const scale = Math.max(...theirs.map(Math.abs), 1e-3);
          ours.forEach((v, k) => (worst = Math.max(worst, Math.abs(v - theirs[k]) / scale)));
        });
      }
    }
    expect(worst).toBeLessThan(1e-5);
  });
});

describe('frames written in a colour space', () => {
  const frame = () => {
    const img = new FloatImage(8, 4);
    for (let i = 0; i < 32; i++) img.data.set([0.05 * i, 0.5, 2 - 0.05 * i, 1], i * 4);
    return img;
  };
  const output = (colourSpace: (typeof SPACE_NAMES)[number]) => ({ template: '/x/f.####.exr', format: 'exr' as const, transfer: 'linear' as const, alpha: 'none' as const, passes: 'combined' as const, exr: { type: 'float' as const, compression: 'zip' as const }, colourSpace });

  it("carry their primaries and white in the chromaticities attribute (exrheader, from Debian's openexr) and read back as the same light", () => {
    const dir = tempDir();
    for (const space of SPACE_NAMES) {
      const file = path.join(dir, `${space}.exr`);
      writeFileSync(file, encodeOutput(frame(), output(space), 1));
      const header = execFileSync('exrheader', [file], { encoding: 'utf8' });
      const s = COLOUR_SPACES[space];
      const m = /chromaticities \(type chromaticities\):\s+red\s+\(([-\d.e]+) ([-\d.e]+)\)\s+green\s+\(([-\d.e]+) ([-\d.e]+)\)\s+blue\s+\(([-\d.e]+) ([-\d.e]+)\)\s+white\s+\(([-\d.e]+) ([-\d.e]+)\)/.exec(header)!;
      close(m.slice(1).map(Number), [...s.red, ...s.green, ...s.blue, ...s.white], 1e-5);
      // our reader converts back to Rec.709 for review: the same pixels (float storage)
      const back = readFrameLinear(file);
      const src = frame().data;
      for (let i = 0; i < 32; i++) close([back.rgb[i * 3], back.rgb[i * 3 + 1], back.rgb[i * 3 + 2]], [src[i * 4], src[i * 4 + 1], src[i * 4 + 2]], 1e-5);
    }
  });

  it('a light colour given in another space is that colour in Rec.709', async () => {
    const dir = tempDir();
    const f = path.join(dir, 'shot.yaml');
    writeFileSync(f, MINIMAL_SHOT.replace('    intensity: 0\n', '    intensity: 0\n    colour: { rgb: [0.2, 0.5, 0.9], space: acescg }\n'));
    const shot = await loadShot(f);
    const expected = apply(convertMatrix('acescg', 'rec709'), [0.2, 0.5, 0.9]);
    const y = 0.2126 * expected[0] + 0.7152 * expected[1] + 0.0722 * expected[2];
    close(shot.lights[0].colour, expected.map((v) => v / y), 1e-12);
  });

  it('bad colour-space input: one located line each, exit 3', async () => {
    const dir = tempDir();
    const cases: [string, string, RegExp][] = [
      ['output: { path: "out/f.####.exr", format: exr, colour_space: acesxyz }', MINIMAL_SHOT, /output\.colour_space: expected one of rec709, rec2020, acescg, aces2065-1, found "acesxyz"/],
      ['output: { path: "out/f.####.png", colour_space: acescg }', MINIMAL_SHOT, /output\.colour_space: PNG frames are display-referred sRGB \(Rec\.709 primaries\); acescg output needs format: exr/],
      ['', MINIMAL_SHOT.replace('    intensity: 0\n', '    intensity: 0\n    colour: { rgb: [1, 1, 1], space: p3 }\n'), /colour\.space: expected one of rec709, rec2020, acescg, aces2065-1, found "p3"/],
    ];
    for (const [out, base, message] of cases) {
      const f = path.join(dir, 'shot.yaml');
      writeFileSync(f, out ? base.slice(0, base.indexOf('output:')) + `${out}\n` : base);
      const r = await cli(['check', f]);
      expect(r.code).toBe(3);
      expect(r.stderr.split('\n')[0]).toMatch(message);
      expect(r.stderr.split('\n')[0]).toMatch(/shot\.yaml:\d+:\d+: /);
    }
    expect(readFileSync(path.join(dir, 'shot.yaml'), 'utf8')).toContain('p3');
  });
});
