// Prescription tables turned into lens files: the focal length of a singlet against the thick-lens
// lensmaker's equation (Hecht, Optics, the thick-lens formula; computed in the test), a three-element
// table against an independent ABCD computation in Python with numpy (test/optics/abcd.py), the
// f-number from the stop's semi-diameter, and bad tables located at line:column.

import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadLens } from '../../src/io/load-lens.js';
import { backFocalDistance, focalLength } from '../../src/optics/paraxial.js';
import { cli, tempDir } from '../helpers.js';

describe('straylight import-lens', () => {
  it('a singlet: f from the thick-lens lensmaker equation; f-number from the stop in front (computed)', async () => {
    const dir = tempDir();
    const table = path.join(dir, 'singlet.csv');
    // an N-BK7-like singlet (n_d 1.5168, V_d 64.17), the stop 2 mm in front
    writeFileSync(table, 'surface, radius, thickness, n_d, V_d, semi-diameter\nSTO, inf, 2, , , 8\n1, 50, 5, 1.5168, 64.17, 12\n2, -50, 47.5, , , 12\n');
    const out = path.join(dir, 'singlet.yaml');
    const r = await cli(['import-lens', table, '-o', out]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const { lens } = loadLens(out);
    const n = 1.5168;
    const inv = (n - 1) * (1 / 50 - 1 / -50 + ((n - 1) * 5) / (n * 50 * -50));
    expect(focalLength(lens)).toBeCloseTo(1 / inv, 9);
    // the stop is first: the entrance pupil is the stop, radius 8
    expect(lens.fNumberMin).toBeCloseTo(1 / inv / 16, 3);
    expect(r.stdout).toMatch(/singlet, 3 surfaces, f = \d+\.\d{3} mm/);
  });

  it('a three-element table: focal length and back focus as an independent numpy ABCD computation gives them', async () => {
    const dir = tempDir();
    const table = path.join(dir, 'three.csv');
    // an air-spaced three-element form of our own (invented numbers; buildable: every element at
    // least 1 mm thick at its rim)
    writeFileSync(table, [
      '# surface, radius, thickness, n_d, V_d, semi-diameter',
      '1, 21.5, 4.2, 1.67, 55, 10',
      '2, -380, 4.0, air, air, 10',
      '3, -28.1, 1.2, 1.62, 36.4, 8',
      '4, 20.9, 2.3, , , 7.5',
      'STO, inf, 2.8, , , 6',
      '5, 66, 3.7, 1.67, 55, 8',
      '6, -26.2, 41.0, , , 9',
      '',
    ].join('\n'));
    const out = path.join(dir, 'three.yaml');
    expect((await cli(['import-lens', table, '-o', out])).code).toBe(0);
    const { lens } = loadLens(out);
    const ref = JSON.parse(execFileSync('/usr/bin/python3', [path.join(__dirname, 'abcd.py'), table], { encoding: 'utf8' })) as { efl: number; bfd: number };
    expect(focalLength(lens)).toBeCloseTo(ref.efl, 6);
    expect(backFocalDistance(lens)).toBeCloseTo(ref.bfd, 6);
    // the file is a lens file straylight reads, with the glasses by n_d and V_d
    expect(readFileSync(out, 'utf8')).toContain('nd1.67-vd55: { nd: 1.67, vd: 55 }');
  });

  it('bad tables: one located line each, exit 3, nothing written', async () => {
    const cases: [string, RegExp][] = [
      ['1, 50, 5, 1.5168, 64.17\nSTO, inf, 2, 8\n2, -50, 47, 12\n', /t\.csv:1:1: row: expected 6 columns .* found 5$/],
      ['1, 5O, 5, 1.5168, 64.17, 12\nSTO, inf, 2, 8\n2, -50, 47, 12\n', /t\.csv:1:4: radius: expected a number, found "5O"$/],
      ['1, 50, 5, 1.5168, 64.17, 12\n2, -50, 47, 12\n', /t\.csv:1:1: no stop: mark the stop row with STO in the surface column$/],
      ['1, 50, 5, 1.5168, 64.17, 60\nSTO, inf, 2, 8\n2, -50, 47, 12\n', /t\.csv:1:26: semi-diameter: the semi-diameter 60 exceeds the radius of curvature 50$/],
    ];
    for (const [text, message] of cases) {
      const dir = tempDir();
      const table = path.join(dir, 't.csv');
      writeFileSync(table, text);
      const r = await cli(['import-lens', table, '-o', path.join(dir, 'x.yaml')]);
      expect(r.code).toBe(3);
      expect(r.stderr.split('\n')[0]).toMatch(message);
      expect(r.stderr).toMatch(/straylight: 1 problem found; nothing was written\n$/);
    }
  });

  it('a table whose lens could not be built is refused at the row that fails, and nothing is written', async () => {
    const dir = tempDir();
    const table = path.join(dir, 'thin.csv');
    // 3 mm at the centre, 3.66 + 0.19 mm of sag at the 12 mm rim (r = 21.5 and -380): -0.85 mm
    writeFileSync(table, 'surface, radius, thickness, n_d, V_d, semi-diameter\n1, 21.5, 3.0, 1.67, 55, 12\n2, -380, 4.0, , , 11\nSTO, inf, 2.8, , , 6\n3, 66, 3.7, 1.67, 55, 8\n4, -26.2, 41.0, , , 9\n');
    const out = path.join(dir, 'thin.yaml');
    const r = await cli(['import-lens', table, '-o', out]);
    expect(r.code).toBe(3);
    expect(r.stderr).toBe(`${table}:2:1: row 1: the element's surfaces (1 and 2) cross inside its clear aperture: -0.85 mm thick at 12.00 mm from the axis\nstraylight: 1 problem found; nothing was written\n`);
    expect(existsSync(out)).toBe(false);
  });
});
