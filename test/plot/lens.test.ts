// The lens drawing: valid SVG (resvg parses and draws it), every surface numbered as in the ghost
// table, the stop and the sensor drawn, a scale bar, and the chosen ghost's rays in the tint and
// under the name the table gives it.

import { readFileSync } from 'node:fs';
import path from 'node:path';
import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { cli, tempDir } from '../helpers.js';

describe('lens --plot', () => {
  it('numbers every surface as the table does and draws the named ghost in its tint', async () => {
    const dir = tempDir();
    const svgFile = path.join(dir, 'lens.svg');
    const r = await cli(['lens', 'double-gauss-50', '--json', '--plot', svgFile, '--ghost', '9-5']);
    expect(r.code).toBe(0);
    const report = JSON.parse(r.stdout) as { glassSurfaces: number; ghosts: { name: string; tint: string }[] };
    const svg = readFileSync(svgFile, 'utf8');
    expect(() => new Resvg(svg).render()).not.toThrow();
    // every surface (the reflecting ones and the stop) numbered once, in order
    const numbers = [...svg.matchAll(/class="surface-number" data-surface="(\d+)"/g)].map((m) => Number(m[1]));
    expect(numbers).toEqual(Array.from({ length: report.glassSurfaces + 1 }, (_, k) => k + 1));
    expect(svg).toContain('>stop</text>');
    expect(svg).toContain('class="sensor"');
    expect(svg).toMatch(/class="scale-bar" data-mm="10"/);
    // the ghost drawn is the one asked for, in the table's tint, with rays
    const row = report.ghosts.find((g) => g.name === '9-5')!;
    const hex = row.tint.split('#')[1];
    expect(svg).toContain(`class="ghost-rays" data-ghost="9-5" data-tint="#${hex}"`);
    expect((svg.split('class="ghost-rays"')[1].match(/<polyline/g) ?? []).length).toBeGreaterThan(3);
    expect(svg).toContain('ghost 9-5 (rank 4): reflects at surface 9, then at 5');
  });

  it('--plot-ghosts names the strongest ghosts where they land, on the line through the centre and the light', async () => {
    const dir = tempDir();
    const svgFile = path.join(dir, 'ghosts.svg');
    const r = await cli(['lens', 'double-gauss-50', '--plot-ghosts', svgFile, '--light', '1400,300']);
    expect(r.code).toBe(0);
    const svg = readFileSync(svgFile, 'utf8');
    expect(() => new Resvg(svg).render()).not.toThrow();
    expect(svg).toMatch(/<image href="data:image\/png;base64,/);
    // ghost centres are collinear with the optical centre and the light (Koreban & Schechner,
    // "Geometry by deflaring", ICCP 2009); the map is drawn at half size with a 30 px margin
    const marks = [...svg.matchAll(/class="ghost-mark" data-ghost="([\d-]+)"><circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => ({ name: m[1], x: Number(m[2]) - 30, y: Number(m[3]) - 64 }));
    expect(marks.length).toBeGreaterThan(5);
    const [cx, cy, lx, ly] = [480, 270, 700, 150];
    for (const m of marks) expect(Math.abs((lx - cx) * (m.y - cy) - (ly - cy) * (m.x - cx)) / Math.hypot(lx - cx, ly - cy)).toBeLessThan(0.05);
  });

  it('refuses a ghost the table does not have', async () => {
    const r = await cli(['lens', 'triplet-50', '--plot', path.join(tempDir(), 'l.svg'), '--ghost', '99']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('--ghost: expected a rank from 1 to 15 or a ghost\'s name as the table lists it (e.g. 7-1), found "99"\n');
  });
});
