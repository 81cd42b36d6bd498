// Option parsers and checks shared by the commands: frame ranges, shards, whole numbers, file
// extensions. Each throws a UsageError naming the flag, what was expected and what came.

import path from 'node:path';
import { UsageError } from '../errors.js';
import type { Shard } from '../io/manifest.js';
import type { FrameRange } from '../render/sequence.js';
import type { ResolvedShot } from '../shot/types.js';
import { parseMemorySize } from '../render/memory.js';

/** Parse "A-B" or "A" (negative numbers allowed: "-5--1"), inside the shot's range. */
export function parseFrameRange(text: string, shot: ResolvedShot, flag = '--frames'): FrameRange {
  const m = /^\s*(-?\d+)\s*(?:-\s*(-?\d+))?\s*$/.exec(text);
  if (!m) throw new UsageError(`${flag}: expected A-B or A (e.g. 1001-1010), found "${text}"`);
  const first = Number(m[1]);
  const last = m[2] === undefined ? first : Number(m[2]);
  if (last < first) throw new UsageError(`${flag}: the range ${text} runs backwards`);
  const { first: sf, last: sl } = shot.frame;
  if (first < sf || last > sl) throw new UsageError(`${flag}: ${first === last ? first : `${first}-${last}`} lies outside the shot's range ${sf}-${sl}`);
  return { first, last };
}

/** Parse K/N with 0 <= K < N. */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const k = m ? Number(m[1]) : NaN;
  const n = m ? Number(m[2]) : NaN;
  if (!m || n < 1 || k >= n) throw new UsageError(`--shard: expected K/N with 0 <= K < N (e.g. 0/4), found "${text}"`);
  return { k, n };
}

/** A commander argument parser for a whole number of at least 1. */
export function positiveInt(name: string) {
  return (v: string): number => {
    const n = Number(v);
    if (!/^\s*\d+\s*$/.test(v) || !Number.isInteger(n) || n < 1) throw new UsageError(`${name}: expected a whole number of at least 1, found "${v}"`);
    return n;
  };
}

/** A commander argument parser for any whole number. */
export function integer(name: string) {
  return (v: string): number => {
    if (!/^\s*-?\d+\s*$/.test(v)) throw new UsageError(`${name}: expected a whole number, found "${v}"`);
    return Number(v);
  };
}

/** Refuse a file name whose extension is not one of `exts` (lower case, with the dot). */
export function requireExtension(flag: string, file: string, exts: string[], what = 'the file'): void {
  if (exts.includes(path.extname(file).toLowerCase())) return;
  const list = exts.length === 1 ? exts[0] : `${exts.slice(0, -1).join(', ')} or ${exts[exts.length - 1]}`;
  throw new UsageError(`${flag}: ${what} must end in ${list}, found "${file}"`);
}

/** Every frame number of a range, in order. */
export function frameList(range: FrameRange): number[] {
  const out: number[] = [];
  for (let f = range.first; f <= range.last; f++) out.push(f);
  return out;
}

/** A commander argument parser for a memory size such as 8G or 512M. */
export function memorySize(name: string) {
  return (v: string): number => {
    const b = parseMemorySize(v);
    if (b === undefined) throw new UsageError(`${name}: expected a size such as 8G, 512M or 1.5GiB, found "${v}"`);
    return b;
  };
}

/** A commander argument parser for --scale: a fraction of the frame's size, above 0 and at most 1. */
export function fraction(name: string) {
  return (v: string): number => {
    const n = Number(v);
    if (!/^\s*(0?\.\d+|1(\.0*)?|0)\s*$/.test(v) || !(n > 0 && n <= 1)) throw new UsageError(`${name}: expected a fraction of the frame's size above 0 and at most 1 (e.g. 0.5), found "${v}"`);
    return n;
  };
}

/** The look-dev overrides shared by still and render. */
export const QUALITIES = ['draft', 'low', 'medium', 'high'] as const;

/** A commander argument parser for a number within [min, max] (min excluded when `above`). */
export function numberIn(name: string, min: number, max: number, above = false) {
  return (v: string): number => {
    const n = Number(v);
    if (!/^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/.test(v) || !(above ? n > min : n >= min) || n > max) {
      throw new UsageError(`${name}: expected a number ${above ? 'above' : 'from'} ${min}${above ? ' and at most' : ' to'} ${max}, found "${v}"`);
    }
    return n;
  };
}
