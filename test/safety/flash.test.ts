// Flash screening against the definitions of WCAG 2.x success criterion 2.3.1 (general flash:
// opposing changes of 0.10 or more in relative luminance with the darker state below 0.80; red
// flash: transitions involving saturated red, R/(R+G+B) >= 0.8, with a change above 0.2 in CIE 1976
// u'v'; more than three flashes in any one second; flashing area 25% or more of a 10-degree field,
// taken as a third of the frame each way). Thresholds as in OPTICS.md section 9.

import { describe, expect, it } from 'vitest';
import { FlashAnalyser, uvPrime } from '../../src/safety/flash.js';

const W = 120;
const H = 90;

/** Run frames made by `pixel(frame, x, y) -> [r, g, b]` (display-referred linear) through the analyser. */
function screen(frames: number, pixel: (f: number, x: number, y: number) => [number, number, number], fps = 24) {
  const a = new FlashAnalyser(W, H, { num: fps, den: 1 });
  const buf = new Float32Array(W * H * 3);
  for (let f = 0; f < frames; f++) {
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) buf.set(pixel(f, x, y), (y * W + x) * 3);
    a.addFrame(1001 + f, buf, 3);
  }
  return a.report();
}

const grey = (v: number): [number, number, number] => [v, v, v];
/** a square wave of `hz` at 24 fps between two levels (3 frames each at 4 Hz) */
const square = (hz: number, f: number) => Math.floor((f * 2 * hz) / 24) % 2 === 0;

describe('flash screening (WCAG 2.x SC 2.3.1)', () => {
  it('flags a full-frame 0.20 <-> 0.05 alternation at 4 Hz (24 fps): 4 flashes a second', () => {
    const r = screen(48, (f) => grey(square(4, f) ? 0.2 : 0.05));
    expect(r.spans.map((s) => s.kind)).toEqual(['general']);
    expect(r.spans[0].flashesPerSecond).toBeGreaterThan(3);
    expect(r.spans[0].worst.areaFraction).toBe(1);
  });

  it('does not flag the same alternation at 2 Hz: 2 flashes a second', () => {
    expect(screen(48, (f) => grey(square(2, f) ? 0.2 : 0.05)).spans).toEqual([]);
  });

  it('does not flag 4 Hz flashing confined to 20% of every window, flags it at 30%', () => {
    // vertical stripes: in every window (40 x 30 px, a multiple of the 10 px period) the share is exact
    const stripes = (share: number) => (f: number, x: number) => grey(x % 10 < share * 10 && square(4, f) ? 0.2 : 0.05);
    expect(screen(48, stripes(0.2)).spans).toEqual([]);
    const r = screen(48, stripes(0.3));
    expect(r.spans.map((s) => s.kind)).toEqual(['general']);
    expect(r.spans[0].worst.areaFraction).toBeCloseTo(0.3, 5);
  });

  it('does not count a change whose darker state is at or above 0.80 as a general flash', () => {
    expect(screen(48, (f) => grey(square(4, f) ? 1 : 0.85)).spans).toEqual([]);
    // the same swing with its darker state just below 0.80 is a flash
    expect(screen(48, (f) => grey(square(4, f) ? 0.95 : 0.79)).spans.map((s) => s.kind)).toEqual(['general']);
  });

  it('flags a saturated-red flash pattern as red, with no luminance change at all', () => {
    // saturated red and a grey of the same relative luminance (0.2126): only the colour flashes
    const r = screen(48, (f) => (square(4, f) ? [1, 0, 0] : grey(0.2126)));
    expect(r.spans.map((s) => s.kind)).toEqual(['red']);
  });

  it('never flags a smooth ramp or a single flash', () => {
    expect(screen(72, (f) => grey(f / 71)).spans).toEqual([]);
    expect(screen(72, (f) => grey(f === 30 ? 1 : 0.05)).spans).toEqual([]);
  });

  it('reports the span from the start of the offending second to its end', () => {
    // flashing only during frames 24-47 (the second second)
    const r = screen(96, (f) => grey(f >= 24 && f < 48 && square(4, f) ? 0.2 : 0.05));
    expect(r.spans).toHaveLength(1);
    expect(r.spans[0].firstFrame).toBeGreaterThanOrEqual(1001 + 24 - 24);
    expect(r.spans[0].lastFrame).toBeLessThanOrEqual(1001 + 47 + 23);
    expect(r.spans[0].lastFrame).toBeGreaterThanOrEqual(1001 + 45);
  });

  it('computes u\'v\' of the sRGB primaries and D65 white (CIE 1976 UCS, computed)', () => {
    const [u, v] = uvPrime(1, 1, 1);
    expect(u).toBeCloseTo(0.1978, 3);
    expect(v).toBeCloseTo(0.4683, 3);
    const [ur, vr] = uvPrime(1, 0, 0);
    expect(ur).toBeCloseTo(0.4507, 3);
    expect(vr).toBeCloseTo(0.5229, 3);
  });
});
