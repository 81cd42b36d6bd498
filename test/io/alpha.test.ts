// Alpha modes, composited by an independent compositor (OpenImageIO's oiiotool, Debian
// openimageio-tools) over a plate. Porter & Duff 1984, "Compositing Digital Images": with
// premultiplied colour, A over B = A + (1 - alpha_A) B, and "plus" = A + B. So:
//  - alpha: emission (alpha 0, light premultiplied): over = plus, exactly, on any plate;
//  - alpha: premultiplied (alpha = the pass's largest channel): over = pass + (1 - alpha) plate,
//    which equals plus over black and falls short of it by alpha x plate elsewhere (a screen-like
//    result that never passes white); plus on its RGB stays physically additive.

import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { decodeExr } from '../../src/format/exr-read.js';
import { cli, tempDir } from '../helpers.js';

function oiio(cmd: string, args: string[]): string {
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  if (r.error) throw r.error;
  if (r.status !== 0 && cmd !== 'idiff') throw new Error(`${cmd} ${args.join(' ')}: ${r.stderr}`);
  return r.stdout + r.stderr;
}

const W = 64;
const H = 36;

async function pass(dir: string, name: string, output: string, stops = 0.5): Promise<string> {
  const shot = path.join(dir, `${name}.yaml`);
  writeFileSync(
    shot,
    `version: 1
frame: { width: ${W}, height: ${H}, rate: 24, first: 1, last: 1 }
lights: [{ name: a, position: [30, 18], intensity: ${stops}, radius: 5, colour: { rgb: [1, 0.8, 0.5] } }]
flare: { glow: { fraction: 0.3 } }
output: { path: "${name}/f.####.${output.includes('exr') ? 'exr' : 'png'}", ${output} }
`,
  );
  const out = path.join(dir, `${name}.${output.includes('exr') ? 'exr' : 'png'}`);
  const r = await cli(['still', shot, '--frame', '1', '--out', out]);
  expect(r.code, r.stderr).toBe(0);
  return out;
}

/** A plate with alpha 1: a vertical gradient, bright at the bottom. */
function plate(dir: string): string {
  const f = path.join(dir, 'plate.exr');
  oiio('oiiotool', ['--pattern', 'fill:top=0.05,0.1,0.2,1:bottom=0.9,0.7,0.5,1', `${W}x${H}`, '4', '-d', 'float', '-o', f]);
  return f;
}

const rgb = (file: string) => {
  const img = decodeExr(readFileSync(file));
  return ['R', 'G', 'B'].map((c) => img.channels.get(c)!);
};

describe('alpha modes composited by oiiotool (Porter & Duff 1984)', () => {
  it('emission: the pass "over" a plate equals the additive pass "plus" the plate', async () => {
    const dir = tempDir();
    const lit = await pass(dir, 'emission', 'format: exr, exr: { type: float }, alpha: emission');
    const add = await pass(dir, 'none', 'format: exr, exr: { type: float }');
    const p = plate(dir);
    oiio('oiiotool', [lit, p, '--over', '--ch', 'R,G,B', '-o', path.join(dir, 'over.exr')]);
    oiio('oiiotool', [add, p, '--ch', 'R,G,B', '--add', '-o', path.join(dir, 'plus.exr')]);
    const out = oiio('idiff', ['-fail', '1e-6', '-warn', '1e-6', path.join(dir, 'over.exr'), path.join(dir, 'plus.exr')]);
    expect(out).toContain('PASS');
    // and the flare is really there: the composite is brighter than the plate at the light
    const [r] = rgb(path.join(dir, 'over.exr'));
    const [pr] = rgb(p);
    expect(r[18 * W + 30] - pr[18 * W + 30]).toBeGreaterThan(0.3);
  });

  it('premultiplied EXR: over = pass + (1 - alpha) plate; equal to plus over black; short of plus by alpha x plate', async () => {
    const dir = tempDir();
    const rgba = await pass(dir, 'pre', 'format: exr, exr: { type: float }, alpha: premultiplied');
    const p = plate(dir);
    oiio('oiiotool', [rgba, p, '--over', '--ch', 'R,G,B', '-o', path.join(dir, 'over.exr')]);
    const img = decodeExr(readFileSync(rgba));
    const a = img.channels.get('A')!;
    const c = ['R', 'G', 'B'].map((n) => img.channels.get(n)!);
    const pl = rgb(p);
    const over = rgb(path.join(dir, 'over.exr'));
    let worst = 0;
    let biggestShortfall = 0;
    for (let i = 0; i < W * H; i++) {
      for (let k = 0; k < 3; k++) {
        worst = Math.max(worst, Math.abs(over[k][i] - (c[k][i] + (1 - a[i]) * pl[k][i])));
        biggestShortfall = Math.max(biggestShortfall, c[k][i] + pl[k][i] - over[k][i]);
      }
    }
    expect(worst).toBeLessThan(1e-6);
    expect(biggestShortfall).toBeGreaterThan(0.1); // not additive where the core is opaque over a lit plate
    // over black, over and plus agree
    oiio('oiiotool', ['--pattern', 'constant:color=0,0,0,1', `${W}x${H}`, '4', '-d', 'float', '-o', path.join(dir, 'black.exr')]);
    oiio('oiiotool', [rgba, path.join(dir, 'black.exr'), '--over', '--ch', 'R,G,B', '-o', path.join(dir, 'over-black.exr')]);
    const ob = rgb(path.join(dir, 'over-black.exr'));
    for (let i = 0; i < W * H; i += 7) for (let k = 0; k < 3; k++) expect(ob[k][i]).toBeCloseTo(c[k][i], 6);
  });

  it('premultiplied 16-bit linear PNG (straight alpha in the file): oiiotool premultiplies on load and "over" follows the same formula, within quantisation', async () => {
    const dir = tempDir();
    // 1.5 stops under: the pass stays below 1, where the PNG would clip
    const png = await pass(dir, 'png', 'format: png16, transfer: linear, alpha: premultiplied', -1.5);
    const ref = await pass(dir, 'ref', 'format: exr, exr: { type: float }, alpha: premultiplied', -1.5);
    const p = plate(dir);
    oiio('oiiotool', [png, p, '--over', '--ch', 'R,G,B', '-d', 'float', '-o', path.join(dir, 'over-png.exr')]);
    oiio('oiiotool', [ref, p, '--over', '--ch', 'R,G,B', '-o', path.join(dir, 'over-exr.exr')]);
    // 16-bit codes are 1/65535 apart; dividing by alpha and multiplying back keeps the error within
    // a code or two where alpha is small; 4e-5 bounds it
    const out = oiio('idiff', ['-fail', '4e-5', '-warn', '4e-5', path.join(dir, 'over-png.exr'), path.join(dir, 'over-exr.exr')]);
    expect(out).toContain('PASS');
  });

  it('emission needs OpenEXR: PNG stores straight alpha, where light under alpha 0 would be lost', async () => {
    const dir = tempDir();
    const shot = path.join(dir, 's.yaml');
    writeFileSync(shot, `version: 1\nframe: { width: 32, height: 18, rate: 24, first: 1, last: 1 }\nlights: [{ name: a, position: [16, 9], intensity: 0 }]\noutput: { path: "o/f.####.png", alpha: emission }\n`);
    const r = await cli(['check', shot]);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/s\.yaml:4:40: output\.alpha: alpha: emission needs format: exr/);
  });
});
