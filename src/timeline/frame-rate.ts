// Frame rates as exact rationals (24000/1001, not 23.976).

export interface FrameRate {
  num: number;
  den: number;
}

/** Decimal spellings of the 1000/1001 rates map to the exact rational (common practice). */
const NTSC_BASES = [24, 30, 48, 60, 120];

export function frameRateValue(r: FrameRate): number {
  return r.num / r.den;
}

export function formatFrameRate(r: FrameRate): string {
  if (r.den === 1) return `${r.num}`;
  return `${r.num}/${r.den} (${(r.num / r.den).toFixed(3)})`;
}

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return a;
}

/** Parse 24, 23.976, "30000/1001"; a message string when it is not a rate. */
export function parseFrameRate(v: unknown): FrameRate | string {
  const expected = 'a frame rate such as 24, 25, 30, 23.976 or "24000/1001"';
  if (typeof v === 'number') {
    if (!Number.isFinite(v) || v <= 0 || v > 1000) return expected;
    if (Number.isInteger(v)) return { num: v, den: 1 };
    for (const base of NTSC_BASES) {
      if (Math.abs(v - (base * 1000) / 1001) < 0.006) return { num: base * 1000, den: 1001 };
    }
    const num = Math.round(v * 1000);
    const g = gcd(num, 1000);
    return { num: num / g, den: 1000 / g };
  }
  if (typeof v === 'string') {
    const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(v);
    if (!m) return expected;
    const num = Number(m[1]);
    const den = Number(m[2]);
    if (num <= 0 || den <= 0 || num / den > 1000) return expected;
    const g = gcd(num, den);
    return { num: num / g, den: den / g };
  }
  return expected;
}
