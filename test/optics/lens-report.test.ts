// The `lens` table says what the renderer draws: a ghost's strength includes the transmission of
// the path's other surfaces (Fresnel at normal incidence, Smith, "Modern Optical Engineering",
// eq. 11.1), and its radius is cut by the barrel's clear apertures as the traced rays are.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { presetPath } from '../../src/io/presets.js';
import { prepareLens } from '../../src/optics/ghost-system.js';
import { lensReport } from '../../src/optics/report.js';
import { parseLensText } from '../../src/shot/lens-file.js';

/** A biconvex N-BK7 singlet, the stop behind it, and a back element; `extra` lines go before surfaces. */
const singlet = (extra: string, backSemi: number) => `version: 1
${extra}hood: none
f_number_min: 8
surfaces:
  - { radius: 50, gap: 10, glass: N-BK7, semi_diameter: 10 }
  - { radius: -50, gap: 2, semi_diameter: 10 }
  - { stop: true, gap: 2 }
  - { radius: flat, gap: 40, semi_diameter: ${backSemi} }
`;

function lens(text: string) {
  const { model, diagnostics } = parseLensText(text, 'l.yaml', 'l');
  expect(diagnostics).toEqual([]);
  return model!;
}

// N-BK7 Sellmeier (SCHOTT catalogue data, OPTICS.md section 4), evaluated here on its own
function nBk7(nm: number): number {
  const l2 = (nm / 1000) ** 2;
  const B = [1.03961212, 0.231792344, 1.01046945];
  const C = [0.00600069867, 0.0200179144, 103.560653];
  return Math.sqrt(1 + B.reduce((s, b, k) => s + (b * l2) / (l2 - C[k]), 0));
}

describe('the lens table', () => {
  it('a ghost\'s strength includes the transmission of the surfaces it crosses (uncoated singlet, computed)', () => {
    // biconvex N-BK7 singlet, uncoated, stop behind it: ghost "2 then 1" crosses surface 1 going in
    // and surface 2 going out, so its transmission is (1 - R)^2 with R = ((n - 1)/(n + 1))^2 at 550 nm
    const m = lens(singlet('coating: none\n', 12));
    const system = prepareLens(m, 'medium', 0);
    const report = lensReport(m, system);
    const g = report.ghosts.find((x) => x.first === 2 && x.second === 1)!;
    const ranked = system.ranked.find((x) => x.i === 1 && x.j === 0)!;
    const n = nBk7(550);
    const R = ((n - 1) / (n + 1)) ** 2;
    expect(g.transmission).toBeCloseTo((1 - R) ** 2, 6);
    expect(g.strength / ranked.strength).toBeCloseTo((1 - R) ** 2, 6);
  });

  it('a ghost the barrel cuts is listed at its cut size; ghosts it does not cut, at their paraxial size (within 3%)', () => {
    const file = presetPath('zoom-like-35');
    const { model } = parseLensText(readFileSync(file, 'utf8'), file, 'zoom-like-35');
    const report = lensReport(model!);
    const huge = report.ghosts.find((x) => x.first === 5 && x.second === 2)!;
    // paraxially half a metre across: no ray that wide gets through a 35 mm lens's barrel
    expect(huge.paraxialRadiusMm).toBeGreaterThan(500);
    expect(huge.radiusMm).toBeGreaterThan(0);
    expect(huge.radiusMm).toBeLessThan(40);
    // a slow singlet whose ghosts clear every aperture: traced and paraxial sizes agree (within 3%;
    // the paraxial size is the oracle, OPTICS.md section 2)
    for (const x of lensReport(lens(singlet('', 40))).ghosts) expect(Math.abs(x.radiusMm / x.paraxialRadiusMm - 1)).toBeLessThan(0.03);
  });
});
