// Exact disk-in-rectangle area against circle geometry: the circular segment cut off by a straight
// edge at signed distance d from the centre has area r^2 acos(d/r) - d sqrt(r^2 - d^2)
// (circle-segment formula; OPTICS.md section 8 gives d = r/2 -> 0.19550 of the disk).

import { describe, expect, it } from 'vitest';
import { diskRectArea } from '../../src/raster/disk-coverage.js';

const segment = (d: number, r: number) => r * r * Math.acos(d / r) - d * Math.sqrt(r * r - d * d);

describe('disk coverage', () => {
  it('a rectangle holding the disk holds pi r^2', () => {
    expect(diskRectArea(3, 4, 2, -10, -10, 10, 10)).toBeCloseTo(Math.PI * 4, 12);
  });
  it('half-planes through the centre hold half the disk', () => {
    expect(diskRectArea(0, 0, 1, 0, -5, 5, 5)).toBeCloseTo(Math.PI / 2, 12);
    expect(diskRectArea(0, 0, 1, -5, -5, 5, 0)).toBeCloseTo(Math.PI / 2, 12);
  });
  for (const frac of [0.5, 0.25, -0.3, 0.9]) {
    it(`an edge at d = ${frac} r cuts off the circle segment`, () => {
      const r = 7;
      const d = frac * r;
      expect(diskRectArea(0, 0, r, d, -100, 100, 100)).toBeCloseTo(segment(d, r), 9);
      expect(diskRectArea(0, 0, r, -100, d, 100, 100)).toBeCloseTo(segment(d, r), 9);
    });
  }
  it('d = r/2 hides 0.19550 of the disk (OPTICS.md section 8, from memory)', () => {
    expect(diskRectArea(0, 0, 1, 0.5, -2, 2, 2) / Math.PI).toBeCloseTo(0.1955, 4);
  });
  it('a tiled grid of pixels sums to the disk for any centre', () => {
    for (const [cx, cy, r] of [[0.3, 0.8, 0.7], [0.5, 0.5, 0.2], [0.01, 0.99, 3.3]]) {
      let sum = 0;
      for (let y = -6; y < 6; y++) for (let x = -6; x < 6; x++) sum += diskRectArea(cx, cy, r, x, y, x + 1, y + 1);
      expect(sum).toBeCloseTo(Math.PI * r * r, 10);
    }
  });
  it('a square in one quadrant, by symmetry a quarter of the disk', () => {
    expect(diskRectArea(0, 0, 2, 0, 0, 5, 5)).toBeCloseTo(Math.PI, 12);
  });
});
