// straylight's real-ray tracer against a second, independent implementation: test/optics/
// snell_trace.py (numpy and PyYAML from Debian, run by /usr/bin/python3) reads the same preset
// files itself and traces the same rays with the vector form of Snell's law and the mirror law,
// its own glass indices (SCHOTT Sellmeier data; the lens-file definition of (n_d, V_d) glasses)
// and its own sphere intersection. For every preset: rays at several heights over the entrance
// pupil, meridional and skew, on axis and at two field angles, at the F, d and C lines, land on the
// sensor within 1e-4 mm of straylight's; and along the two strongest ghost paths (two reflections
// each) within 1e-3 mm.

import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { presetNames, presetPath } from '../../src/io/presets.js';
import { prepareLens } from '../../src/optics/ghost-system.js';
import { ghostPath, type LensModel, type LightPath } from '../../src/optics/lens.js';
import { focalLength } from '../../src/optics/paraxial.js';
import { planPath, RayHit, traceRay } from '../../src/optics/trace.js';
import { parseLensText } from '../../src/shot/lens-file.js';

const here = path.dirname(fileURLToPath(import.meta.url));
/** The Fraunhofer F, d and C lines, nm. */
const LINES = [486.1327, 587.5618, 656.2725];
/** Where the rays start: this far ahead of the first vertex, in air. */
const LAUNCH_MM = 30;

interface Ray {
  path: [number, string, number][];
  nm: number;
  o: [number, number, number];
  d: [number, number, number];
}

function lensOf(name: string): LensModel {
  const { model } = parseLensText(readFileSync(presetPath(name), 'utf8'), `${name}.yaml`, name);
  return model!;
}

/** Rays over the pupil (fractions of its radius), at field angles up to 0.8 of the corner's. */
function rays(lens: LensModel, lightPath: LightPath, heights: number[]): Ray[] {
  const f = focalLength(lens, LINES[1]);
  const ep = f / (2 * lens.fNumberMin);
  const corner = Math.atan(Math.hypot(lens.sensorWidthMm / 2, (lens.sensorWidthMm / 3) * 1) / f);
  const out: Ray[] = [];
  const spec = lightPath.map((e) => [e.surface, e.action, e.dir] as [number, string, number]);
  for (const nm of LINES) {
    for (const field of [0, 0.5 * corner, 0.8 * corner]) {
      // meridional (in y) and skew (the direction tilted 30 degrees out of the y-z plane)
      for (const azimuth of [0, Math.PI / 6]) {
        const d: [number, number, number] = [Math.sin(field) * Math.sin(azimuth), Math.sin(field) * Math.cos(azimuth), Math.cos(field)];
        for (const h of heights) {
          for (const [px, py] of [[0, h], [0.6 * h, -0.5 * h]]) {
            // through (px, py) x pupil radius on the first vertex's plane
            const k = LAUNCH_MM / d[2];
            out.push({ path: spec, nm, o: [px * ep - k * d[0], py * ep - k * d[1], -LAUNCH_MM], d });
          }
        }
      }
    }
  }
  return out;
}

function ours(lens: LensModel, r: Ray): { x: number; y: number } | null {
  const lightPath: LightPath = r.path.map(([surface, action, dir]) => ({ surface, action: action as 'refract' | 'reflect', dir: dir as 1 | -1 }));
  const plan = planPath(lens, lightPath, r.nm, 1);
  const hit = new RayHit();
  if (!traceRay(plan, r.o[0], r.o[1], r.o[2], r.d[0], r.d[1], r.d[2], hit) || hit.margin < 0) return null;
  return { x: hit.x, y: hit.y };
}

function theirs(lenses: { file: string; rays: Ray[] }[]): ({ x: number; y: number } | null)[][] {
  const out = execFileSync('/usr/bin/python3', [path.join(here, 'snell_trace.py')], { input: JSON.stringify({ lenses }), encoding: 'utf8', maxBuffer: 64 << 20 });
  return JSON.parse(out);
}

describe('the real-ray tracer against an independent numpy implementation', () => {
  const names = presetNames();
  const cases = names.map((name) => {
    const lens = lensOf(name);
    const imaging: LightPath = lens.surfaces.map((_, k) => ({ surface: k, action: 'refract', dir: 1 }));
    const ranked = prepareLens(lens, 'draft', 0).ranked.slice(0, 2);
    return {
      name,
      lens,
      groups: [
        { what: 'imaging', tol: 1e-4, rays: rays(lens, imaging, [0, 0.35, 0.7, 0.95]) },
        ...ranked.map((g) => ({ what: `ghost ${g.i + 1}-${g.j + 1}`, tol: 1e-3, rays: rays(lens, ghostPath(lens, g), [0, 0.2, 0.45]) })),
      ],
    };
  });
  const answers = theirs(cases.flatMap((c) => c.groups.map((g) => ({ file: presetPath(c.name), rays: g.rays }))));

  it('covers every preset, with imaging and two ghost paths each', () => {
    expect(names.length).toBeGreaterThanOrEqual(4);
    for (const c of cases) expect(c.groups.length).toBe(3);
  });

  let k = 0;
  for (const c of cases) {
    for (const g of c.groups) {
      const reference = answers[k++];
      it(`${c.name}, ${g.what}: ${g.rays.length} rays at 3 wavelengths land within ${g.tol} mm`, () => {
        let compared = 0;
        let worst = 0;
        g.rays.forEach((r, i) => {
          const a = ours(c.lens, r);
          const b = reference[i];
          // both say whether the ray gets through the glass at all (misses and total reflection)
          expect(a === null, `ray ${i}: straylight ${a ? 'lands' : 'is lost'}, numpy ${b ? 'lands' : 'is lost'}`).toBe(b === null);
          if (!a || !b) return;
          compared++;
          worst = Math.max(worst, Math.abs(a.x - b.x), Math.abs(a.y - b.y));
        });
        // a ghost path through the 16-surface zoom loses most wide rays (as the real one would):
        // at least 30 rays are compared on every path
        expect(compared).toBeGreaterThanOrEqual(Math.min(30, g.rays.length));
        expect(worst).toBeLessThan(g.tol);
      });
    }
  }
});
