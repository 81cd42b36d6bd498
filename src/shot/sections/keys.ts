// Values every section reads the same way: keyframed numbers and positions ({frame, value, ease}
// lists or constants) and colours ({kelvin} or {rgb}).

import { blackbodyRgb } from '../../colour/blackbody.js';
import { luminance } from '../../colour/srgb.js';
import { apply, convertMatrix, SPACE_NAMES } from '../../colour/spaces.js';
import { LINEAR, parseEasing, type Easing } from '../../timeline/easing.js';
import type { Vec2 } from '../../timeline/path.js';
import type { Key } from '../../timeline/track.js';
import type { Field, MapField } from '../source.js';
import type { ResolvedLight } from '../types.js';
import { MAX_COORD_PX, type ResolveContext } from './context.js';

/** A constant [x, y] or a list of {frame, x, y, ease} keys. */
export function positionKeys(ctx: ResolveContext, f: Field): Key<Vec2>[] | undefined {
  const coord = { min: -MAX_COORD_PX, max: MAX_COORD_PX };
  const what = 'a constant position [x, y] or a list of keys {frame, x, y, ease}';
  const list = f.isSeq() ? f.list()! : undefined;
  if (list && list.length > 0 && list.every((x) => !x.isMap())) {
    if (list.length !== 2) return f.error(`expected ${what}, found a list of ${list.length} values`);
    const v = f.numbers(2, coord);
    return v ? [{ frame: 0, value: [v[0], v[1]], ease: LINEAR }] : undefined;
  }
  if (!list) return f.expected(what);
  return keyList(ctx, f, list, (m) => {
    const x = m.require('x', 'horizontal position in pixels')?.number(coord);
    const y = m.require('y', 'vertical position in pixels, down from the top')?.number(coord);
    return x === undefined || y === undefined ? undefined : ([x, y] as Vec2);
  });
}

/** A constant number or a list of {frame, <valueKey>, ease} keys. */
export function scalarKeys(ctx: ResolveContext, f: Field, valueKey: string, rule: { min: number; max: number }): Key<number>[] | undefined {
  if (f.isNumber()) {
    const v = f.number(rule);
    return v === undefined ? undefined : [{ frame: 0, value: v, ease: LINEAR }];
  }
  const list = f.isSeq() ? f.list()! : undefined;
  if (!list) return f.expected(`a constant number or a list of keys {frame, ${valueKey}, ease}`);
  return keyList(ctx, f, list, (m) => m.require(valueKey, 'the value at this key')?.number(rule));
}

export function keyList<V>(ctx: ResolveContext, f: Field, list: Field[], value: (m: MapField) => V | undefined): Key<V>[] | undefined {
  if (list.length === 0) return f.error('expected at least one key, found an empty list');
  const keys: (Key<V> | undefined)[] = [];
  let prevFrame: number | undefined;
  for (const item of list) {
    const m = item.map('a key: a mapping with frame and a value');
    if (!m) {
      keys.push(undefined);
      continue;
    }
    const frameField = m.require('frame', 'the frame number of this key');
    const frame = frameField?.number({ min: -1e9, max: 1e9 });
    if (frame !== undefined && prevFrame !== undefined && frame <= prevFrame) {
      frameField!.error(`expected keys in increasing frame order, found ${frame} after ${prevFrame}`);
    }
    if (frame !== undefined) prevFrame = frame;
    const v = value(m);
    const easeField = m.get('ease');
    let ease: Easing | undefined = LINEAR;
    if (easeField) {
      const s = easeField.string('an easing word');
      const e = s === undefined ? undefined : parseEasing(s);
      if (typeof e === 'string') ease = easeField.error(`${e}, found ${easeField.describe()}`);
      else ease = e;
    }
    m.finish();
    keys.push(frame === undefined || v === undefined || !ease ? undefined : { frame, value: v, ease });
  }
  return keys.every((k) => k !== undefined) ? (keys as Key<V>[]) : undefined;
}

export function resolveColour(ctx: ResolveContext, f: Field): { rgb: [number, number, number]; spec: ResolvedLight['colourSpec'] } | undefined {
  const m = f.map('{kelvin: K} or {rgb: [r, g, b], space: SPACE}');
  if (!m) return undefined;
  const k = m.get('kelvin');
  const rgbField = m.get('rgb');
  const spaceField = m.get('space');
  m.finish();
  if (k && rgbField) return f.error('give either kelvin or rgb, not both');
  if (k && spaceField) return spaceField.error('space goes with rgb; a colour temperature has no primaries');
  if (k) {
    const kelvin = k.number({ min: 1000, max: 40000 });
    return kelvin === undefined ? undefined : { rgb: blackbodyRgb(kelvin), spec: { kelvin } };
  }
  if (rgbField) {
    const given = rgbField.numbers(3, { min: 0, max: 1e6 }) as [number, number, number] | undefined;
    const space = spaceField ? spaceField.oneOf(SPACE_NAMES) : 'rec709';
    if (!given || !space) return undefined;
    // lights are drawn in linear Rec.709: a colour in another space is converted (it may fall
    // outside Rec.709's gamut, with a negative component, which linear light keeps)
    const rgb = space === 'rec709' ? given : apply(convertMatrix(space, 'rec709'), given);
    const lum = luminance(...rgb);
    if (lum <= 0) return rgbField.error('expected a colour with some luminance, found black');
    return { rgb: [rgb[0] / lum, rgb[1] / lum, rgb[2] / lum], spec: space === 'rec709' ? { rgb: given } : { rgb: given, space } };
  }
  return f.error('expected {kelvin: K} or {rgb: [r, g, b]}, found an empty mapping');
}

/** Largest coordinate accepted in a 3-D scene (scene units, metres by glTF's convention). */
export const MAX_WORLD = 1e9;

/**
 * A constant [a, b, c] or a list of {frame, <names[0]>, <names[1]>, <names[2]>, ease} keys: 3-D
 * positions (x, y, z), camera rotations (pan, tilt, roll) and the like.
 */
export function vec3Keys(ctx: ResolveContext, f: Field, names: [string, string, string], rule: { min: number; max: number }, what: string): Key<readonly number[]>[] | undefined {
  const shape = `a constant [${names.join(', ')}] or a list of keys {frame, ${names.join(', ')}, ease}`;
  const list = f.isSeq() ? f.list()! : undefined;
  if (list && list.length > 0 && list.every((x) => !x.isMap())) {
    if (list.length !== 3) return f.error(`expected ${shape}, found a list of ${list.length} values`);
    const v = f.numbers(3, rule);
    return v ? [{ frame: 0, value: v, ease: LINEAR }] : undefined;
  }
  if (!list) return f.expected(shape);
  return keyList(ctx, f, list, (m) => {
    const v = names.map((n) => m.require(n, `${what}: ${n}`)?.number(rule));
    return v.some((x) => x === undefined) ? undefined : (v as number[]);
  });
}
