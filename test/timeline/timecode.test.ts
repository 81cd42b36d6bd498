// SMPTE timecode (SMPTE ST 12-1). Drop-frame values are computed from the standard's rule: at
// 29.97 fps labels ;00 and ;01 are skipped at the start of each minute except every tenth minute.

import { describe, expect, it } from 'vitest';
import { parseFrameRate, type FrameRate } from '../../src/timeline/frame-rate.js';
import { framesToTimecode, timecodeToFrames } from '../../src/timeline/timecode.js';

const rate = (v: number | string) => parseFrameRate(v) as FrameRate;

describe('SMPTE timecode', () => {
  const cases: [string, number | string, boolean, number, string][] = [
    ['24 fps', 24, false, 0, '00:00:00:00'],
    ['24 fps, the common first frame 1001', 24, false, 1001, '00:00:41:17'],
    ['24 fps, one hour', 24, false, 86400, '01:00:00:00'],
    ['25 fps', 25, false, 1001, '00:00:40:01'],
    ['25 fps, one hour less a frame', 25, false, 89999, '00:59:59:24'],
    ['29.97 DF, last frame of minute 0', '30000/1001', true, 1799, '00:00:59;29'],
    ['29.97 DF, first frame of minute 1 skips ;00 and ;01', '30000/1001', true, 1800, '00:01:00;02'],
    ['29.97 DF, minute 10 keeps ;00', '30000/1001', true, 17982, '00:10:00;00'],
    ['29.97 DF, one hour of frames is 01:00:00;00', '30000/1001', true, 107892, '01:00:00;00'],
    ['29.97 non-drop counts 30 labels a second', '30000/1001', false, 1800, '00:01:00:00'],
    ['23.976 counts at 24 (no drop-frame)', 23.976, false, 1001, '00:00:41:17'],
  ];
  for (const [title, r, df, n, tc] of cases) {
    it(`${title}: frame ${n} is ${tc}`, () => {
      expect(framesToTimecode(n, rate(r), df)).toBe(tc);
      expect(timecodeToFrames(tc, rate(r), df)).toBe(n);
    });
  }

  it('round-trips every drop-frame count across ten minutes', () => {
    const r = rate('30000/1001');
    for (let n = 0; n < 18000; n += 7) expect(timecodeToFrames(framesToTimecode(n, r, true), r, true)).toBe(n);
  });

  it('refuses labels that drop-frame skips and labels past the rate', () => {
    expect(timecodeToFrames('00:01:00;01', rate('30000/1001'), true)).toMatch(/does not exist/);
    expect(timecodeToFrames('00:00:00:24', rate(24), false)).toMatch(/out of range/);
  });

  it('maps the decimal NTSC spellings to exact rationals (common practice)', () => {
    expect(rate(23.976)).toEqual({ num: 24000, den: 1001 });
    expect(rate(29.97)).toEqual({ num: 30000, den: 1001 });
    expect(rate(59.94)).toEqual({ num: 60000, den: 1001 });
    expect(rate('48/2')).toEqual({ num: 24, den: 1 });
    expect(rate(12.5)).toEqual({ num: 25, den: 2 });
  });
});
