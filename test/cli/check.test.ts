// `check` says what a render will do (lens, every element, mattes, where the output goes, how
// many workers fit in memory) and warns about what would surprise; given a lens file it checks it
// as a lens file. The README's documented keys are accepted (the lens `hood`).

import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadShot } from '../../src/io/load-shot.js';
import { GiB, planWorkers, workerBytes } from '../../src/render/memory.js';
import { Progress } from '../../src/cli/progress.js';
import { cli, tempDir } from '../helpers.js';

const shot = (dir: string, extra: string, out = 'out/f.####.png') => {
  const f = path.join(dir, 'shot.yaml');
  writeFileSync(
    f,
    `version: 1
frame: { width: 1920, height: 1080, rate: 24, first: 1, last: 2 }
lights: [{ name: sun, position: [900, 500], intensity: 10 }]
${extra}
output: { path: ${out} }
`,
  );
  return f;
};

describe('check', () => {
  it('summarises the lens and every element, on or off', async () => {
    const f = shot(tempDir(), 'lens: { preset: triplet-50, f_number: [{ frame: 1, value: 4 }, { frame: 2, value: 8 }] }\nflare: { ghosts: { quality: draft }, veil: { fraction: 0.001 }, dust: { enabled: false } }');
    const r = await cli(['check', f, '--jobs', '2', '--max-memory', '4G']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^lens {6}preset triplet-50: three-element air-spaced triplet, 50 mm f\/3\.5 \(straylight design\); f\/4\.\.f\/8 \(2 keys\); 15 ghost paths, quality draft$/m);
    expect(r.stdout).toMatch(/^core {6}each light's disk$/m);
    expect(r.stdout).toMatch(/^glow {6}0\.04 of each light's flux/m);
    expect(r.stdout).toMatch(/^ghosts {4}quality draft, gain 1/m);
    expect(r.stdout).toMatch(/^veil {6}0\.001 of all visible flux/m);
    expect(r.stdout).toMatch(/^memory {4}about \d+ MiB a worker; 2 workers fit in 4\.0 GiB$/m);
    expect(r.stdout).not.toMatch(/^dust/m);
  });

  it('says when the starburst will be under a pixel (its physical size), and by how much to magnify it', async () => {
    // Airy radius 1.22 lambda N on the sensor (OPTICS.md 6): at 550 nm, f/4, 36 mm over 1920 px:
    // 1.22 x 0.00055 x 4 / (36 / 1920) = 0.143 px (computed)
    const f = shot(tempDir(), 'lens: { preset: triplet-50, f_number: 4 }');
    const r = await cli(['check', f]);
    expect(r.stdout).toContain('starburst 0.05 of each light\'s flux, size 1 (Airy radius 0.14 px at f/4)');
    expect(r.stdout).toContain('warning: the starburst is drawn at its physical size, under a pixel here (Airy radius 0.14 px): it will hardly show; flare.starburst.size magnifies it (e.g. 21 makes the radius about 3 px)');
    const big = shot(tempDir(), 'lens: { preset: triplet-50, f_number: 4 }\nflare: { starburst: { size: 20 } }');
    expect((await cli(['check', big])).stdout).not.toContain('warning: the starburst');
  });

  it('prints where the output goes as an absolute path, and warns when that is outside the shot\'s folder and the current one', async () => {
    const dir = tempDir();
    const elsewhere = tempDir();
    const inside = await cli(['check', shot(dir, '')]);
    expect(inside.stdout).toContain(`output    ${path.join(dir, 'out', 'f.####.png')} (png16`);
    expect(inside.stdout).not.toContain('outside');
    const outside = await cli(['check', shot(dir, '', `${elsewhere}/f.####.png`)]);
    expect(outside.stdout).toContain(`warning: the output is outside the shot's folder and the current folder: ${elsewhere}`);
  });

  it('checks a lens file as a lens file', async () => {
    const dir = tempDir();
    const lens = path.join(dir, 'my-lens.yaml');
    writeFileSync(lens, `version: 1
name: my-lens
hood: { depth: 60, radius: 30 }
surfaces:
  - { radius: 40, gap: 5, glass: N-BK7, semi_diameter: 12 }
  - { radius: -200, gap: 4, semi_diameter: 12 }
  - { stop: true, gap: 2 }
  - { radius: 100, gap: 3, glass: N-BK7, semi_diameter: 10 }
  - { radius: -100, gap: 40, semi_diameter: 10 }
`);
    const r = await cli(['check', lens]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(new RegExp(`^${lens.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: a lens file \\(not a shot\\); it is valid\\nlens {6}my-lens \\(file\\)`));
    writeFileSync(lens, 'version: 1\nsurfaces:\n  - { radius: 40, gap: 5, glass: N-BK7, semi_diameter: 12, colour: red }\n  - { stop: true, gap: 40 }\n');
    const bad = await cli(['check', lens]);
    expect(bad.code).toBe(3);
    expect(bad.stderr).toMatch(/my-lens\.yaml:3:60: surfaces\[0\]\.colour: unknown key "colour"; known keys here: stop, radius, gap, glass, semi_diameter, coating\n/);
  });

  it('accepts the lens hood the README documents, and `none`', async () => {
    const dir = tempDir();
    const surfaces = 'surfaces: [{ radius: 40, gap: 5, glass: N-BK7, semi_diameter: 12 }, { radius: -200, gap: 4, semi_diameter: 12 }, { stop: true, gap: 2 }, { radius: 100, gap: 3, glass: N-BK7, semi_diameter: 10 }, { radius: -100, gap: 40, semi_diameter: 10 }]';
    const withHood = await loadShot(shot(dir, `lens: { hood: { depth: 80, radius: 45 }, ${surfaces} }`));
    expect(withHood.lens!.model.hood).toEqual({ depthMm: 80, radiusMm: 45 });
    const none = await loadShot(shot(dir, `lens: { hood: none, ${surfaces} }`));
    expect(none.lens!.model.hood).toEqual({ depthMm: 0, radiusMm: 0 });
  });
});

describe('memory', () => {
  it('a 16384x16384 frame with 64 workers asked: fewer workers, said once, within the budget', async () => {
    const dir = tempDir();
    const big = path.join(dir, 'big.yaml');
    writeFileSync(big, 'version: 1\nframe: { width: 16384, height: 16384, rate: 24, first: 1, last: 1 }\nlights: [{ name: sun, position: [900, 500], intensity: 10 }]\noutput: { path: out/f.####.png }\n');
    const s = await loadShot(big);
    // a float RGBA frame alone is 16384^2 x 16 bytes = 4 GiB (computed)
    expect(workerBytes(s)).toBeGreaterThan(4 * GiB);
    const plan = planWorkers(s, 64, 24 * GiB);
    expect(plan.jobs).toBeLessThan(64);
    expect(plan.jobs).toBeGreaterThanOrEqual(1);
    expect(plan.main + plan.jobs * plan.perWorker).toBeLessThanOrEqual(24 * GiB);
    expect(plan.note).toMatch(/^using \d workers? instead of 64: each needs about \d+\.\d GiB at 16384x16384 and 24 GiB can be used/);
    expect(() => planWorkers(s, 64, 2 * GiB)).toThrow(/^not enough memory to render 16384x16384 frames: one worker needs about \d+\.\d GiB and 2\.0 GiB can be used; nothing was rendered/);
  });

  it('render lowers --jobs to what fits --max-memory and says so once; refuses when one worker does not fit (exit 7)', async () => {
    const dir = tempDir();
    const f = shot(dir, 'flare: { glow: { enabled: false } }');
    const per = workerBytes(await loadShot(f));
    const budget = Math.round((160 * 2 ** 20 + 2.5 * per) / 2 ** 20);
    const r = await cli(['render', f, '--jobs', '8', '--max-memory', `${budget}M`]);
    expect(r.code).toBe(0);
    expect(r.stderr.match(/render: using 2 workers instead of 8: each needs about \d+ MiB at 1920x1080/g)).toHaveLength(1);
    const refused = await cli(['render', f, '--max-memory', '100M', '--force']);
    expect(refused.code).toBe(7);
    expect(refused.stderr).toMatch(/^not enough memory to render 1920x1080 frames: one worker needs about \d+ MiB and 100 MiB can be used; nothing was rendered/);
  });

  it('reads memory sizes as binary units', async () => {
    expect((await cli(['check', shot(tempDir(), ''), '--max-memory', 'lots'])).stderr).toBe('--max-memory: expected a size such as 8G, 512M or 1.5GiB, found "lots"\n');
  });
});

describe('progress with separate passes', () => {
  it('counts frames, not files', () => {
    let out = '';
    const p = new Progress({ write: (s) => (out += s), isTTY: false }, 14, 'render');
    p.passes = 7;
    for (let i = 0; i < 7; i++) p.frameDone('written');
    expect(out.trim().split('\n').pop()).toMatch(/^render: 1\/2 frames \(7 passes a frame\), /);
  });
});

