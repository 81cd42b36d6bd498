// Per-ghost control in the shot, by the names `straylight lens` gives (I-J: reflects at surface I,
// then J): switching one ghost off removes exactly its light (the difference equals that ghost
// drawn alone, within float rounding), gains are linear, solo keeps only the named ghosts, and
// names that are not ghosts of the lens are located errors.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ShotError } from '../../src/errors.js';
import { presetNames, presetPath } from '../../src/io/presets.js';
import { lensReport } from '../../src/optics/report.js';
import { renderFrame } from '../../src/render/render-frame.js';
import { resolveShot } from '../../src/shot/resolve.js';

const reader = { readText: (p: string) => readFileSync(p, 'utf8'), presetNames, presetPath };
// quality high draws every ghost at full resolution, so a ghost's pixels do not depend on its gain
const shot = (ghosts: string) =>
  resolveShot(
    `version: 1
frame: { width: 320, height: 180, rate: 24, first: 1, last: 1 }
lights: [{ name: a, position: [220, 60], intensity: 14 }]
lens: { preset: triplet-50, f_number: 5.6 }
flare: { core: { enabled: false }, glow: { enabled: false }, starburst: { enabled: false }, ghosts: { quality: high${ghosts} } }
output: { path: f.####.png }
`,
    'shot.yaml',
    reader,
  );

const pixels = (g: string) => renderFrame(shot(g), 1).data;

describe('per-ghost control', () => {
  it('names ghosts as the lens table does', () => {
    const s = shot('');
    const names = lensReport(s.lens!.model).ghosts.map((g) => g.name);
    expect(names).toContain('7-1');
    expect(names).toHaveLength(15);
  });

  it('switching a ghost off removes exactly that ghost; a gain of 2 adds it once more', () => {
    const all = pixels('');
    const without = pixels(', paths: { 7-1: { enabled: false } }');
    const alone = pixels(', solo: 7-1');
    const doubled = pixels(', paths: { 7-1: { gain: 2 } }');
    let peak = 0;
    for (const v of alone) peak = Math.max(peak, v);
    expect(peak).toBeGreaterThan(0);
    let worstOff = 0;
    let worstGain = 0;
    for (let i = 0; i < all.length; i++) {
      if (i % 4 === 3) continue;
      worstOff = Math.max(worstOff, Math.abs(all[i] - without[i] - alone[i]));
      worstGain = Math.max(worstGain, Math.abs(doubled[i] - all[i] - alone[i]));
    }
    // float32 accumulation of the other ghosts under it: rounding only
    expect(worstOff / peak).toBeLessThan(1e-5);
    expect(worstGain / peak).toBeLessThan(1e-5);
  });

  it('a tint multiplies the ghost\'s colour at unit luminance', () => {
    const alone = pixels(', solo: 7-1');
    const tinted = pixels(', solo: 7-1, paths: { 7-1: { tint: { rgb: [1, 0, 0] } } }');
    // rgb [1, 0, 0] at unit luminance is [1/0.2126, 0, 0] (BT.709 luminance weights)
    let r = 0;
    let rt = 0;
    let gt = 0;
    for (let i = 0; i < alone.length; i += 4) {
      r += alone[i];
      rt += tinted[i];
      gt += tinted[i + 1];
    }
    expect(rt / r).toBeCloseTo(1 / 0.2126, 4);
    expect(gt).toBe(0);
  });

  it('refuses names that are not ghosts of the lens, at the name', () => {
    const problems = (g: string) => {
      try {
        shot(g);
        return [];
      } catch (e) {
        if (e instanceof ShotError) return e.message.split('\n');
        throw e;
      }
    };
    expect(problems(', paths: { 1-7: { gain: 2 } }')).toEqual([
      'shot.yaml:5:127: flare.ghosts.paths.1-7: expected a ghost of this lens named as in `straylight lens` (I-J: reflects at surface I, then at an earlier surface J; surfaces 1-7, the stop excluded), found "1-7"',
    ]);
    expect(problems(', solo: [7-1, 9-2]')).toHaveLength(1);
    // a name through the stop (which never reflects) is refused too
    const stop = shot('').lens!.model.surfaces.findIndex((s) => s.stop) + 1;
    expect(problems(`, solo: ${stop + 1}-${stop}`)).toHaveLength(1);
  });
});
