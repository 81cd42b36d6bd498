// Float -> integer code values through a transfer curve, fast and exact: a table indexed by the
// linear value gives the code at the start of each small bucket, and the code's own decision
// thresholds (the linear values where rounding moves to the next code) settle the rest. The result
// equals round(encode(clamp(v)) x max) without a pow per sample.

import { srgbDecode } from '../colour/srgb.js';
import type { Transfer } from '../shot/types.js';

const BUCKETS = 1 << 18;

export interface Quantiser {
  /** code value of a linear sample (clamped to [0, 1]) */
  code(v: number): number;
  /** for hot loops: start code per bucket of BUCKETS, and the code thresholds (null: linear) */
  table: Uint16Array | null;
  thresholds: Float64Array | null;
  max: number;
}

const cache = new Map<string, Quantiser>();

export function quantiser(transfer: Transfer, max: 255 | 65535): Quantiser {
  const key = `${transfer}/${max}`;
  let q = cache.get(key);
  if (!q) {
    q = transfer === 'linear' ? linearQuantiser(max) : srgbQuantiser(max);
    cache.set(key, q);
  }
  return q;
}

/**
 * Code value of a linear sample (clamped to [0, 1]) from a quantiser's parts; exported for hot
 * loops, which pass the parts instead of calling through the object.
 */
export function codeOf(v: number, max: number, table: Uint16Array | null, thresholds: Float64Array | null): number {
  if (!(v > 0)) return 0;
  if (v >= 1) return max;
  if (table === null) return Math.round(v * max);
  let c = table[(v * BUCKETS) | 0];
  while (thresholds![c + 1] <= v) c++;
  return c;
}

function linearQuantiser(max: number): Quantiser {
  return { code: (v) => codeOf(v, max, null, null), table: null, thresholds: null, max };
}

function srgbQuantiser(max: number): Quantiser {
  // thresholds[c] = linear value at which the code becomes c (the decoded midpoint c - 1/2)
  const thresholds = new Float64Array(max + 2);
  thresholds[0] = -Infinity;
  for (let c = 1; c <= max; c++) thresholds[c] = srgbDecode((c - 0.5) / max);
  thresholds[max + 1] = Infinity;
  const table = new Uint16Array(BUCKETS + 1);
  let c = 0;
  for (let i = 0; i <= BUCKETS; i++) {
    const v = i / BUCKETS;
    while (thresholds[c + 1] <= v) c++;
    table[i] = c;
  }
  return {
    table,
    thresholds,
    max,
    code: (v: number): number => codeOf(v, max, table, thresholds),
  };
}
