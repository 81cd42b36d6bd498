// OpenEXR output, read back by independent tools from Debian (OpenEXR's exrheader, OpenImageIO's
// oiiotool and idiff; installed by scripts/install-test-tools.sh), and half floats against
// IEEE 754 binary16.

import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { encodeExr, toHalf } from '../../src/io/exr.js';
import { FloatImage } from '../../src/raster/image.js';
import { cli, tempDir } from '../helpers.js';

const tool = (cmd: string, args: string[]) => {
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  if (r.error) throw r.error;
  return { code: r.status, out: r.stdout + r.stderr };
};

function ramp(): FloatImage {
  const img = new FloatImage(37, 21);
  for (let y = 0; y < 21; y++) for (let x = 0; x < 37; x++) img.data.set([(x / 36) * 4, y / 20, 0.25, 0], (y * 37 + x) * 4);
  return img;
}

describe('half floats (IEEE 754 binary16)', () => {
  const cases: [number, number][] = [
    [1, 0x3c00],
    [-2, 0xc000],
    [0.5, 0x3800],
    [65504, 0x7bff], // largest finite half
    [65520, 0x7c00], // rounds up to infinity
    [2 ** -24, 0x0001], // smallest subnormal
    [2 ** -25, 0x0000], // a tie between 0 and the smallest subnormal: to even, 0
    [0.1, 0x2e66],
    [Infinity, 0x7c00],
  ];
  for (const [v, h] of cases) it(`${v} -> 0x${h.toString(16).padStart(4, '0')}`, () => expect(toHalf(v)).toBe(h));
  it('NaN stays NaN', () => expect(toHalf(NaN) & 0x7c00).toBe(0x7c00));
});

describe('OpenEXR files', () => {
  it('exrheader reads the attributes the file layout requires, and Rec.709 chromaticities', () => {
    const f = path.join(tempDir(), 'h.exr');
    writeFileSync(f, encodeExr(ramp(), { type: 'half', compression: 'zip', alpha: 'derived', pixelAspect: 2 }));
    const { code, out } = tool('exrheader', [f]);
    expect(code).toBe(0);
    expect(out).toContain('channels (type chlist):\n    A, 16-bit floating-point, sampling 1 1\n    B, 16-bit floating-point, sampling 1 1\n    G, 16-bit floating-point, sampling 1 1\n    R, 16-bit floating-point, sampling 1 1');
    expect(out).toContain('compression (type compression): zip, multi-scanline blocks');
    expect(out).toContain('dataWindow (type box2i): (0 0) - (36 20)');
    expect(out).toContain('displayWindow (type box2i): (0 0) - (36 20)');
    expect(out).toContain('lineOrder (type lineOrder): increasing y');
    expect(out).toContain('pixelAspectRatio (type float): 2');
    expect(out).toContain('screenWindowCenter (type v2f): (0 0)');
    expect(out).toContain('screenWindowWidth (type float): 1');
    expect(out).toContain('red   (0.64 0.33)');
    expect(out).toContain('white (0.3127 0.329)');
  });

  it("rendered frames carry OpenEXR's standard timeCode and framesPerSecond, frame by frame, as exrheader reads them", async () => {
    const dir = tempDir();
    // 29.97 drop-frame: labels 00;00 and 00;01 are skipped at the start of minute 1, so the frame
    // after 00:00:59;29 is 00:01:00;02 (SMPTE ST 12-1 drop rule)
    writeFileSync(path.join(dir, 'shot.yaml'), `version: 1
frame: { width: 8, height: 4, rate: "30000/1001", first: 1, last: 2, timecode: "00:00:59;29" }
lights: [{ name: a, position: [4, 2], intensity: 0 }]
output: { path: out/f.####.exr, format: exr }
`);
    expect((await cli(['render', path.join(dir, 'shot.yaml'), '--quiet', '--jobs', '1'])).code).toBe(0);
    const first = tool('exrheader', [path.join(dir, 'out', 'f.0001.exr')]).out;
    const second = tool('exrheader', [path.join(dir, 'out', 'f.0002.exr')]).out;
    expect(first).toContain('framesPerSecond (type rational): 30000/1001 (29.97)');
    expect(first).toContain('timeCode (type timecode):\n    time 00:00:59:29\n    drop frame 1');
    expect(second).toContain('timeCode (type timecode):\n    time 00:01:00:02\n    drop frame 1');
    // 24 fps non-drop from the default timecode (the frame number from 00:00:00:00): frame 1 is 00:00:00:01
    writeFileSync(path.join(dir, 'shot24.yaml'), `version: 1
frame: { width: 8, height: 4, rate: 24, first: 1, last: 1 }
lights: [{ name: a, position: [4, 2], intensity: 0 }]
output: { path: out24/f.####.exr, format: exr }
`);
    expect((await cli(['render', path.join(dir, 'shot24.yaml'), '--quiet', '--jobs', '1'])).code).toBe(0);
    const f24 = tool('exrheader', [path.join(dir, 'out24', 'f.0001.exr')]).out;
    expect(f24).toContain('framesPerSecond (type rational): 24/1 (24)');
    expect(f24).toContain('timeCode (type timecode):\n    time 00:00:00:01\n    drop frame 0');
  });

  for (const [type, compression] of [['half', 'none'], ['half', 'zips'], ['half', 'zip'], ['float', 'none'], ['float', 'zip']] as const) {
    it(`oiiotool reads ${type} / ${compression} back to the values written`, () => {
      const f = path.join(tempDir(), 'v.exr');
      writeFileSync(f, encodeExr(ramp(), { type, compression, alpha: 'none', pixelAspect: 1 }));
      const { code, out } = tool('oiiotool', ['--stats', f]);
      expect(code).toBe(0);
      expect(out).toContain(`37 x   21, 3 channel, ${type} openexr`);
      const row = (name: string) => out.split('\n').find((l) => l.includes(`Stats ${name}:`))!.split(':')[1].trim().split(/\s+/).slice(0, 3).map(Number);
      expect(row('Min')).toEqual([0, 0, 0.25]);
      expect(row('Max')).toEqual([4, 1, 0.25]);
      // the ramps average 2 and 0.5 exactly; half storage is within its precision (1 part in 2048)
      const avg = row('Avg');
      expect(Math.abs(avg[0] - 2)).toBeLessThan(type === 'float' ? 1e-6 : 2 / 2048);
      expect(Math.abs(avg[1] - 0.5)).toBeLessThan(type === 'float' ? 1e-6 : 0.5 / 2048);
    });
  }

  it('a rendered frame as EXR equals the same frame as linear 16-bit PNG (idiff, within half precision)', async () => {
    const dir = tempDir();
    const shot = path.join(dir, 's.yaml');
    writeFileSync(
      shot,
      `version: 1
frame: { width: 64, height: 36, rate: 24, first: 1, last: 1 }
lights: [{ name: a, position: [30, 18], intensity: -1, radius: 6 }]
flare: { starburst: { enabled: false } }   # its peak would pass 1, where the PNG clips
output: { path: "o/f.####.exr", format: exr }
`,
    );
    expect((await cli(['still', shot, '--frame', '1', '--out', path.join(dir, 'a.exr')])).code).toBe(0);
    expect((await cli(['still', shot, '--frame', '1', '--out', path.join(dir, 'a.png')])).code).toBe(0);
    // values stay below 1 here, so the PNG does not clip; half rounds by at most 2^-12 below 1 and
    // 16-bit quantising by 2^-17: 0.0003 bounds both
    const { code, out } = tool('idiff', ['-fail', '0.0003', '-warn', '0.0003', path.join(dir, 'a.exr'), path.join(dir, 'a.png')]);
    expect(out).toContain('PASS');
    expect(code).toBe(0);
  });

  it('never writes NaN or infinity: NaN becomes 0, too-bright values the largest finite number (as the PNG clips)', () => {
    const img = new FloatImage(4, 1);
    img.data.set([NaN, 1e6, Infinity, 0, -Infinity, 0.5, 2, 0, 1, 1, 1, 0, 0, 0, 0, 0]);
    const f = path.join(tempDir(), 'n.exr');
    for (const type of ['half', 'float'] as const) {
      writeFileSync(f, encodeExr(img, { type, compression: 'none', alpha: 'none', pixelAspect: 1 }));
      const { out } = tool('oiiotool', ['--stats', f]);
      // OpenImageIO counts non-finite values in its statistics
      expect(out).toMatch(/NanCount: 0 0 0/);
      expect(out).toMatch(/InfCount: 0 0 0/);
      // oiiotool lists R, G, B: R held NaN (now 0) and -infinity, G 1e6 (past half's range), B +infinity
      const stat = (name: string) => out.split('\n').find((l) => l.includes(`Stats ${name}:`))!.split(':')[1].trim().split(/\s+/).map(Number);
      const top = type === 'half' ? 65504 : 3.4028234663852886e38;
      expect(stat('Max')[2] / top).toBeCloseTo(1, 5);
      expect(stat('Min')[0] / -top).toBeCloseTo(1, 5);
      expect(stat('Max')[1]).toBe(type === 'half' ? 65504 : 1e6);
    }
  });

  it('the command line picks the format and alpha: --format, an --out ending in .exr, --alpha', async () => {
    const dir = tempDir();
    const shot = path.join(dir, 's.yaml');
    writeFileSync(shot, `version: 1\nframe: { width: 32, height: 18, rate: 24, first: 1, last: 1 }\nlights: [{ name: a, position: [16, 9], intensity: 0 }]\noutput: { path: "o/f.####.png" }\n`);
    expect((await cli(['render', shot, '--quiet', '--format', 'exr', '--alpha', 'emission'])).code).toBe(0);
    expect(tool('oiiotool', ['--info', path.join(dir, 'o', 'f.0001.exr')]).out).toContain('32 x   18, 4 channel, half openexr');
    expect((await cli(['render', shot, '--quiet', '--out', path.join(dir, 'p', 'g.####.exr')])).code).toBe(0);
    expect(tool('oiiotool', ['--info', path.join(dir, 'p', 'g.0001.exr')]).out).toContain('32 x   18, 3 channel, half openexr');
    const bad = await cli(['render', shot, '--alpha', 'emission']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain('--alpha emission needs the exr format');
    const mismatch = await cli(['render', shot, '--format', 'exr', '--out', path.join(dir, 'q.####.png')]);
    expect(mismatch.code).toBe(2);
    expect(mismatch.stderr).toContain('--out: the file name must end in .exr for format exr, found ".png"');
  });

  it('render writes an EXR sequence; srgb transfer with exr is refused', async () => {
    const dir = tempDir();
    const shot = path.join(dir, 's.yaml');
    writeFileSync(shot, `version: 1\nframe: { width: 32, height: 18, rate: 24, first: 1, last: 2 }\nlights: [{ name: a, position: [16, 9], intensity: 0 }]\noutput: { path: "o/f.####.exr", format: exr, exr: { type: float, compression: zips } }\n`);
    expect((await cli(['render', shot, '--quiet'])).code).toBe(0);
    expect(tool('oiiotool', ['--info', path.join(dir, 'o', 'f.0002.exr')]).out).toContain('32 x   18, 3 channel, float openexr');
    writeFileSync(shot, `version: 1\nframe: { width: 32, height: 18, rate: 24, first: 1, last: 2 }\nlights: [{ name: a, position: [16, 9], intensity: 0 }]\noutput: { path: "o/f.####.exr", format: exr, transfer: srgb }\n`);
    const r = await cli(['check', shot]);
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('output.transfer: OpenEXR files are scene-linear: give transfer: linear, or leave it out');
  });
});
