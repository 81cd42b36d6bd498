// Real rays near the axis agree with the paraxial matrices (OPTICS.md section 2: "real rays near the
// axis must agree with these paraxial values"); Snell's law and reflection behave as they must.

import { describe, expect, it } from 'vitest';
import { ghostPath, imagePath } from '../../src/optics/lens.js';
import { pathMatrix } from '../../src/optics/paraxial.js';
import { RayHit, planPath, traceRay } from '../../src/optics/trace.js';
import { biconvex } from './paraxial.test.js';

describe('real ray tracing', () => {
  const lens = biconvex();
  const hit = new RayHit();

  it('a near-axis parallel ray lands where the paraxial matrix says (image path)', () => {
    const plan = planPath(lens, imagePath(lens), 550, 10);
    const m = pathMatrix(lens, imagePath(lens), 550);
    for (const y of [0.001, 0.01, -0.02]) {
      expect(traceRay(plan, 0, y, -5, 0, 0, 1, hit)).toBe(true);
      // at the back focal plane the parallel ray crosses the axis: A ~ 0
      expect(hit.y).toBeCloseTo(m[0] * y, 6);
    }
  });

  it('near-axis rays follow the ghost (2, 1) matrix: y_out = A y + B u', () => {
    const path = ghostPath(lens, { i: 1, j: 0 });
    const plan = planPath(lens, path, 550, 10);
    const m = pathMatrix(lens, path, 550);
    for (const [y, u] of [[0.01, 0], [0, 0.0005], [0.005, -0.0003]]) {
      // launch 5 mm before the first vertex so the ray crosses that plane at height y with slope u
      const norm = Math.hypot(u, 1);
      expect(traceRay(plan, 0, y - 5 * u, -5, 0, u / norm, 1 / norm, hit)).toBe(true);
      expect(hit.y).toBeCloseTo(m[0] * y + m[1] * u, 5);
    }
  });

  it('a ray reflected at two uncoated surfaces keeps R^2 (1 - R)^2 of its light, R = 4.216% (Fresnel, computed)', () => {
    const plan = planPath(lens, ghostPath(lens, { i: 1, j: 0 }), 550, 10);
    traceRay(plan, 0, 0.01, -5, 0, 0, 1, hit);
    const r = ((1.5168 - 1) / (1.5168 + 1)) ** 2;
    // two reflections, and the two refractions (in at surface 1, out at surface 2) each passing 1 - r
    expect(hit.throughput).toBeCloseTo(r * r * (1 - r) ** 2, 8);
  });

  it('rays beyond the clear aperture are marked, not lost', () => {
    const small = { ...lens, surfaces: lens.surfaces.map((s) => ({ ...s, semiDiameterMm: 5 })) };
    const plan = planPath(small, imagePath(small), 550, 10);
    expect(traceRay(plan, 0, 8, -5, 0, 0, 1, hit)).toBe(true);
    expect(hit.vignette).toBeGreaterThan(1.5);
    traceRay(plan, 0, 2, -5, 0, 0, 1, hit);
    expect(hit.vignette).toBeLessThan(0.5);
  });

  it('refraction obeys Snell: n1 sin i = n2 sin t at a flat surface (common practice)', () => {
    const flat = { ...lens, surfaces: [{ ...lens.surfaces[0], radiusMm: 0 }, { ...lens.surfaces[1], radiusMm: 0 }] };
    const plan = planPath(flat, [{ surface: 0, action: 'refract', dir: 1 }], 550, 10);
    const si = Math.sin(0.5);
    traceRay(plan, 0, 0, -1, 0, si, Math.cos(0.5), hit);
    expect(1.5168 * hit.dy).toBeCloseTo(si, 12);
  });
});
