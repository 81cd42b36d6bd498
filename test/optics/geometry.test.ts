// Lens geometry: a lens that could not be built is refused where it fails, with file:line:col;
// every preset passes. Sag and edge thickness are checked against values worked out by hand from
// the sphere's equation (3-4-5 and 7-24-25 triangles: sag(50, 30) = 50 - 40 = 10; sag(50, 14) =
// 50 - 48 = 2). The minimums (1 mm at a negative element's centre and a positive one's rim) are
// common practice, not a standard.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { presetNames, presetPath } from '../../src/io/presets.js';
import { lensGeometry, sag } from '../../src/optics/geometry.js';
import { parseLensText } from '../../src/shot/lens-file.js';
import { formatDiagnostic } from '../../src/errors.js';

/** A lens file with the stop and then one element (surfaces a and b, on lines 6 and 7). */
const lensFile = (a: string, b: string) => `version: 1
name: test
f_number_min: 4
surfaces:
  - { stop: true, gap: 2, semi_diameter: 5 }
  - ${a}
  - ${b}
`;

function problems(text: string): string[] {
  return parseLensText(text, 'my-lens.yaml', 'test').diagnostics.map(formatDiagnostic);
}

describe('lens geometry', () => {
  it('sag of a sphere, worked by hand: 10 mm at 30 mm on r = 50; 2 mm at 14 mm; signed with the radius', () => {
    expect(sag(50, 30)).toBeCloseTo(10, 12);
    expect(sag(50, 14)).toBeCloseTo(2, 12);
    expect(sag(-50, 14)).toBeCloseTo(-2, 12);
    expect(sag(0, 14)).toBe(0);
    expect(sag(50, 50)).toBeNaN();
  });

  it('an element 6 mm thick at the centre between r = 50 and r = -50 is 2 mm thick at 14 mm (6 - 2 - 2): buildable', () => {
    expect(problems(lensFile('{ radius: 50, gap: 6, glass: N-BK7, semi_diameter: 14 }', '{ radius: -50, gap: 40, semi_diameter: 14 }'))).toEqual([]);
  });

  it('the same element 4.5 mm thick is 0.5 mm at its rim: refused at the surface, located', () => {
    expect(problems(lensFile('{ radius: 50, gap: 4.5, glass: N-BK7, semi_diameter: 14 }', '{ radius: -50, gap: 40, semi_diameter: 14 }'))).toEqual([
      'my-lens.yaml:6:5: surfaces[1]: the element after this surface is 0.50 mm thick at its rim (14.00 mm from the axis), under the 1.00 mm a lens can be made with (common practice)',
    ]);
  });

  it('surfaces that cross inside the clear aperture are refused (3.5 mm thick, 4 mm of sag at 14 mm)', () => {
    expect(problems(lensFile('{ radius: 50, gap: 3.5, glass: N-BK7, semi_diameter: 14 }', '{ radius: -50, gap: 40, semi_diameter: 14 }'))).toEqual([
      'my-lens.yaml:6:5: surfaces[1]: the element\'s surfaces (2 and 3) cross inside its clear aperture: -0.50 mm thick at 14.00 mm from the axis',
    ]);
  });

  it('a negative element too thin at its centre is refused', () => {
    expect(problems(lensFile('{ radius: -50, gap: 0.6, glass: N-BK7, semi_diameter: 14 }', '{ radius: 50, gap: 40, semi_diameter: 14 }'))).toEqual([
      'my-lens.yaml:6:5: surfaces[1]: the element after this surface is 0.60 mm thick at its centre, under the 1.00 mm a lens can be made with (common practice)',
    ]);
  });

  it('a semi-diameter at the radius is refused at that surface; beyond it, as before, at the key', () => {
    expect(problems(lensFile('{ radius: 14, gap: 8, glass: N-BK7, semi_diameter: 14 }', '{ radius: -50, gap: 40, semi_diameter: 10 }'))).toEqual([
      'my-lens.yaml:6:5: surfaces[1]: the semi-diameter 14.00 mm reaches the radius of curvature 14.00 mm',
    ]);
    expect(problems(lensFile('{ radius: 12, gap: 8, glass: N-BK7, semi_diameter: 14 }', '{ radius: -50, gap: 40, semi_diameter: 10 }'))[0]).toMatch(/^my-lens\.yaml:6:\d+: surfaces\[1\]\.semi_diameter: the semi-diameter 14 exceeds the radius of curvature 12/);
  });

  it('an air gap whose surfaces cross, and a surface through the stop plane, are refused', () => {
    // sag(+-50, 12) = +-1.4614 mm: the first surface comes 1.46 mm forward at 12 mm, through the
    // stop 1 mm ahead; surfaces 3 (r = 50) and 4 (r = -50), 0.5 mm apart, meet 2.92 mm deep
    const crossing = `version: 1
name: test
f_number_min: 4
surfaces:
  - { stop: true, gap: 1, semi_diameter: 12 }
  - { radius: -50, gap: 8, glass: N-BK7, semi_diameter: 12 }
  - { radius: 50, gap: 0.5, semi_diameter: 12 }
  - { radius: -50, gap: 6, glass: N-BK7, semi_diameter: 12 }
  - { radius: 50, gap: 40, semi_diameter: 12 }
`;
    expect(problems(crossing)).toEqual([
      'my-lens.yaml:5:5: surfaces[0]: the air gap after this surface closes: surface 2 passes through the stop\'s plane 12.00 mm from the axis (-0.46 mm apart)',
      'my-lens.yaml:7:5: surfaces[2]: the air gap after this surface closes: surfaces 3 and 4 cross 12.00 mm from the axis (-2.42 mm apart)',
    ]);
  });

  it('every preset can be built, and says how much light its corner gets wide open', () => {
    expect(presetNames().length).toBeGreaterThanOrEqual(4);
    for (const name of presetNames()) {
      const text = readFileSync(presetPath(name), 'utf8');
      const { model, diagnostics } = parseLensText(text, `${name}.yaml`, name);
      expect(diagnostics.map(formatDiagnostic), name).toEqual([]);
      expect(lensGeometry(model!).filter((p) => p.severity === 'error'), name).toEqual([]);
      expect(text, name).toMatch(/the corner gets\n# \d+% of the centre's light/);
    }
  });
});

describe('straylight lens and geometry warnings', () => {
  it('prints what would be hard to make as a warning on stderr, the table on stdout; the presets have none', async () => {
    const { cli, tempDir } = await import('../helpers.js');
    const { writeFileSync } = await import('node:fs');
    const path = await import('node:path');
    const file = path.join(tempDir(), 'meniscus.yaml');
    // a negative element 1.2 mm at its centre and 1.2 + 4.58 + 3.66 = 9.44 mm at its 12 mm rim
    // (sag(18, 12) = 4.58, sag(-21.5, 12) = -3.66; 7.9x): hard to make, not impossible
    writeFileSync(file, lensFile('{ radius: -21.5, gap: 1.2, glass: N-BK7, semi_diameter: 12 }', '{ radius: 18, gap: 40, semi_diameter: 12 }'));
    const r = await cli(['lens', file]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^lens {6}test \(file\)/);
    expect(r.stderr).toMatch(/^warning: .*meniscus\.yaml: surface 2: the element after this surface is \d+\.\d times thicker at its rim \(\d+\.\d\d mm\) than at its centre \(1\.20 mm\): hard to make\n$/);
    for (const name of presetNames()) expect((await cli(['lens', name])).stderr, name).toBe('');
  });
});
