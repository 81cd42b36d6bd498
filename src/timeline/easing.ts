// Per-key interpolation into the next key: hold, linear, and the CSS easings.
// Named easings and cubic-bezier() follow W3C CSS Easing Functions Level 1; the curve is solved by
// bezier-easing. Easings are plain data (they cross to worker threads); curves are built once.

import bezier from 'bezier-easing';

export type Easing =
  | { kind: 'hold' }
  | { kind: 'linear' }
  | { kind: 'cubic'; points: [number, number, number, number]; name?: string };

/** Control points of the CSS named cubic easings (CSS Easing Functions Level 1, section 2.2). */
export const NAMED_CUBIC: Readonly<Record<string, readonly [number, number, number, number]>> = {
  ease: [0.25, 0.1, 0.25, 1],
  'ease-in': [0.42, 0, 1, 1],
  'ease-out': [0, 0, 0.58, 1],
  'ease-in-out': [0.42, 0, 0.58, 1],
};

export const EASING_WORDS = ['linear', 'hold', ...Object.keys(NAMED_CUBIC), 'cubic-bezier(x1, y1, x2, y2)'];

export const LINEAR: Easing = { kind: 'linear' };

const curves = new Map<string, (u: number) => number>();

/** The eased fraction at u in [0, 1] (hold gives 0: the value stays until the next key). */
export function easeAt(e: Easing, u: number): number {
  if (e.kind === 'linear') return u;
  if (e.kind === 'hold') return 0;
  const key = e.points.join(',');
  let fn = curves.get(key);
  if (!fn) {
    fn = bezier(...e.points);
    curves.set(key, fn);
  }
  return fn(u);
}

export function easingLabel(e: Easing): string {
  if (e.kind !== 'cubic') return e.kind;
  return e.name ?? `cubic-bezier(${e.points.join(', ')})`;
}

/** Parse an easing word; returns a message (string) when it is not one. */
export function parseEasing(text: string): Easing | string {
  const t = text.trim();
  if (t === 'linear') return LINEAR;
  if (t === 'hold') return { kind: 'hold' };
  const named = NAMED_CUBIC[t];
  if (named) return { kind: 'cubic', points: [...named], name: t };
  const m = /^cubic-bezier\(\s*([^,()]+),\s*([^,()]+),\s*([^,()]+),\s*([^,()]+)\)$/.exec(t);
  if (!m) return `expected one of ${EASING_WORDS.join(', ')}`;
  const p = m.slice(1).map(Number) as [number, number, number, number];
  if (p.some((v) => !Number.isFinite(v))) return 'cubic-bezier() takes four finite numbers';
  if (p[0] < 0 || p[0] > 1 || p[2] < 0 || p[2] > 1) {
    return 'cubic-bezier(x1, y1, x2, y2) needs x1 and x2 from 0 to 1 (CSS Easing Level 1)';
  }
  return { kind: 'cubic', points: p };
}
