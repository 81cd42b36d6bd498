// Flash screening through the CLI: renders warn and can fail; `flashes` reads sequences and plates.
// Thresholds: WCAG 2.x SC 2.3.1 (see test/safety/flash.test.ts).

import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ExitCode } from '../../src/errors.js';
import { encodePng } from '../../src/io/png.js';
import { FloatImage } from '../../src/raster/image.js';
import { cli, tempDir } from '../helpers.js';


/** A big light switching between two levels (linear) every 3 frames: 4 Hz at 24 fps. */
function strobeShot(dir: string, high: number, low: number, output = 'output: { path: "out/s.####.png" }'): string {
  const keys = [...Array(16)].map((_, k) => `      - { frame: ${1 + 3 * k}, value: ${k % 2 ? low : high}, ease: hold }`).join('\n');
  const f = path.join(dir, 'strobe.yaml');
  writeFileSync(
    f,
    `version: 1
frame: { width: 160, height: 90, rate: 24, first: 1, last: 48, timecode: "10:00:00:00" }
lights:
  - name: strobe
    position: [80, 45]
    radius: 70
    intensity_unit: linear
    intensity:
${keys}
flare:
  glow: { fraction: 0 }
${output}
`,
  );
  return f;
}

describe('flash screening in the CLI', () => {
  it('a render of a strobing light warns on stderr, names the frames and timecodes, and keeps the frames', async () => {
    const f = strobeShot(tempDir(), 1, 0.02);
    const r = await cli(['render', f, '--quiet']);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/^WARNING: this pass may flash dangerously for viewers with photosensitive epilepsy\.\n/);
    expect(r.stderr).toMatch(/FLAGGED general flashing: frames 1-48 \(10:00:00:00 - 10:00:01:23\), up to 4\.0 flashes a second/);
    expect(r.stderr).toContain("broadcaster's QC");
    expect(existsSync(path.join(path.dirname(f), 'out', 's.0048.png'))).toBe(true);
  });

  it('--fail-on-flash makes the same render exit 5', async () => {
    const f = strobeShot(tempDir(), 1, 0.02);
    const r = await cli(['render', f, '--quiet', '--fail-on-flash']);
    expect(r.code).toBe(ExitCode.flashes);
  });

  it('flashes SHOT reads the rendered frames back and exits 5 when they flash', async () => {
    const f = strobeShot(tempDir(), 1, 0.02);
    await cli(['render', f, '--quiet']);
    const r = await cli(['flashes', f]);
    expect(r.code).toBe(ExitCode.flashes);
    expect(r.stdout).toMatch(/^flash screening: 48 frames, 1-48 at 24 fps, over black\nFLAGGED general flashing: frames 1-48/);
  });

  it('OpenEXR passes are read back and screened too, separate passes summed', async () => {
    const f = strobeShot(tempDir(), 1, 0.02, 'output: { path: "out/s.####.exr", format: exr, passes: separate }');
    const r = await cli(['render', f, '--quiet']);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/FLAGGED general flashing: frames 1-48 \(10:00:00:00 - 10:00:01:23\), up to 4\.0 flashes a second/);
    const again = await cli(['flashes', path.join(path.dirname(f), 'out', 's.core.####.exr')]);
    expect(again.code).toBe(ExitCode.flashes);
    expect(again.stdout).toMatch(/FLAGGED general flashing: frames 1-48/);
  });

  it('flashes SHOT refuses a shot whose frames are not rendered yet', async () => {
    const f = strobeShot(tempDir(), 1, 0.02);
    const r = await cli(['flashes', f]);
    expect(r.code).toBe(ExitCode.badInput);
    expect(r.stderr).toMatch(/48 of 48 frames are not rendered yet/);
  });

  it('judges the pass over black and added over a plate: a bright plate lifts the darker state above 0.80', async () => {
    const dir = tempDir();
    // the pass switches 0.10 <-> 0.25 (a general flash over black); over a 0.75 plate it reads
    // 0.85 <-> 1.0, whose darker state is not below 0.80 (WCAG 2.x SC 2.3.1)
    const f = strobeShot(dir, 0.25, 0.1);
    await cli(['render', f, '--quiet']);
    mkdirSync(path.join(dir, 'plate'));
    const plate = new FloatImage(160, 90);
    for (let i = 0; i < plate.data.length; i += 4) plate.data.set([0.75, 0.75, 0.75, 0], i);
    const png = encodePng(plate, { bitDepth: 16, transfer: 'linear', alpha: 'none' });
    for (let k = 1; k <= 48; k++) writeFileSync(path.join(dir, 'plate', `p.${String(k).padStart(4, '0')}.png`), png);
    const r = await cli(['flashes', path.join(dir, 'out', 's.####.png'), '--plate', path.join(dir, 'plate', 'p.####.png'), '--json']);
    expect(r.code).toBe(ExitCode.flashes);
    const report = JSON.parse(r.stdout);
    expect(report.overBlack.spans.map((s: { kind: string }) => s.kind)).toEqual(['general']);
    expect(report.overPlate.spans).toEqual([]);
  });

  it('the demo shot screens clean', async () => {
    const dir = tempDir();
    const demo = path.resolve('shots/harbour-beacon.yaml');
    const r = await cli(['render', demo, '--frames', '1001-1030', '--out', path.join(dir, 'd.####.png'), '--quiet']);
    expect(r).toEqual({ code: 0, stdout: '', stderr: '' });
  });
});
