// The shot's `flare` section: each element's settings, `enabled` and keyable `gain`, with the
// defaults that apply when a key or the whole section is left out.

import { LINEAR } from '../../timeline/easing.js';
import type { Field, MapField } from '../source.js';
import type { DustSettings, ElementControl, ElementName, GhostSettings, GlowSettings, ResolvedLens, StarburstSettings, StreakSettings } from '../types.js';
import type { ResolveContext } from './context.js';
import { resolveColour, scalarKeys } from './keys.js';

export const DEFAULT_GLOW: GlowSettings = { fraction: 0.04, sizePx: 6, falloff: 3 };
export const DEFAULT_GHOSTS: GhostSettings = { enabled: true, gain: 1, quality: 'medium', threshold: 1e-6, paths: {}, solo: [] };
export const DEFAULT_STARBURST: StarburstSettings = { fraction: 0.05, size: 1 };
export const DEFAULT_STREAK: StreakSettings = { fraction: 0, lengthPx: 200, thicknessPx: 1 };
export const DEFAULT_DUST: DustSettings = { fraction: 0, density: 1, reachPx: 300, seed: 0 };

/** `enabled` and `gain` (a number or keys) of an element's mapping; absent: on, gain 1. */
export function elementControl(ctx: ResolveContext, m: MapField | undefined): ElementControl | undefined {
  const on: ElementControl = { enabled: true, gain: [{ frame: 0, value: 1, ease: LINEAR }] };
  if (!m) return on;
  const en = m.get('enabled');
  if (en && typeof en.scalar !== 'boolean') en.expected('true or false');
  const g = m.get('gain');
  const gain = g ? scalarKeys(ctx, g, 'value', { min: 0, max: 1e6 }) : on.gain;
  if (!gain) return undefined;
  return { enabled: en ? en.scalar === true : true, gain };
}

/**
 * One element's mapping under `flare:`: its `enabled` and `gain`, and its own keys read by
 * `read`; absent, the defaults.
 */
export function elementSection<T>(ctx: ResolveContext, f: Field | undefined, what: string, dflt: T, read: (m: MapField) => T | undefined): { settings: T; control: ElementControl } | undefined {
  if (!f) return { settings: dflt, control: elementControl(ctx, undefined)! };
  const m = f.map(what);
  if (!m) return undefined;
  const control = elementControl(ctx, m);
  const settings = read(m);
  m.finish();
  return settings !== undefined && control ? { settings, control } : undefined;
}

/** A ghost's name as `straylight lens` lists it: "i-j", reflecting at surface i, then j (1-based). */
function ghostName(f: Field, lens: ResolvedLens | undefined): string | undefined {
  const s = f.isNumber() ? undefined : f.string('a ghost named by its surfaces, such as 11-5');
  if (s === undefined) return undefined;
  if (!lens) return f.error('ghosts are named by the surfaces of a lens: give the shot a lens');
  const m = /^(\d+)-(\d+)$/.exec(s);
  const surfaces = lens.model.surfaces;
  const ok = (k: number) => k >= 1 && k <= surfaces.length && !surfaces[k - 1].stop;
  if (!m || Number(m[1]) <= Number(m[2]) || !ok(Number(m[1])) || !ok(Number(m[2]))) {
    return f.error(`expected a ghost of this lens named as in \`straylight lens\` (I-J: reflects at surface I, then at an earlier surface J; surfaces 1-${surfaces.length}, the stop excluded), found ${f.describe()}`);
  }
  return s;
}

/** flare.ghosts.paths and .solo: per-ghost switches, gains and tints. */
function ghostPaths(ctx: ResolveContext, gm: MapField, lens: ResolvedLens | undefined): { paths: GhostSettings['paths']; solo: string[] } | undefined {
  const paths: GhostSettings['paths'] = {};
  let ok = true;
  const pf = gm.get('paths');
  const pm = pf?.map('a mapping of ghost names (as `straylight lens` lists them, e.g. 11-5) to {enabled, gain, tint}');
  if (pf && !pm) ok = false;
  if (pm) {
    for (const key of pm.keys()) {
      const name = ghostName(pm.keyField(key)!, lens);
      const entry = pm.get(key)!;
      const em = entry.map('{enabled, gain, tint}');
      if (!em) {
        ok = false;
        continue;
      }
      const control = elementControl(ctx, em);
      const tf = em.get('tint');
      const tint = tf ? resolveColour(ctx, tf) : { rgb: [1, 1, 1] as [number, number, number] };
      em.finish();
      if (!name || !control || !tint) ok = false;
      else paths[name] = { enabled: control.enabled, gain: control.gain, tint: tint.rgb };
    }
    pm.finish();
  }
  const sf = gm.get('solo');
  let solo: string[] = [];
  if (sf) {
    const items = sf.isSeq() ? sf.list()! : [sf];
    const names = items.map((x) => ghostName(x, lens));
    if (names.some((n) => n === undefined)) ok = false;
    else solo = names as string[];
  }
  return ok ? { paths, solo } : undefined;
}

export function resolveFlare(ctx: ResolveContext, f: Field, lens?: ResolvedLens) {
  const m = f.map();
  if (!m) return undefined;
  const num = (mf: MapField, key: string, rule: Parameters<Field['number']>[0], dflt: number) => {
    const x = mf.get(key);
    return x ? x.number(rule) : dflt;
  };
  const core = elementSection(ctx, m.get('core'), '{enabled, gain}', true, () => true);
  const glow = elementSection(ctx, m.get('glow'), '{fraction, size, falloff, enabled, gain}', DEFAULT_GLOW, (gm) => {
    const fraction = num(gm, 'fraction', { min: 0, max: 1 }, DEFAULT_GLOW.fraction);
    const sizePx = num(gm, 'size', { min: 0.5, max: 100_000 }, DEFAULT_GLOW.sizePx);
    const falloff = num(gm, 'falloff', { min: 2, minExclusive: true, max: 8 }, DEFAULT_GLOW.falloff);
    return fraction === undefined || sizePx === undefined || falloff === undefined ? undefined : { fraction, sizePx, falloff };
  });
  const ghosts = elementSection(ctx, m.get('ghosts'), '{quality, threshold, enabled, gain, paths, solo}', DEFAULT_GHOSTS, (gm) => {
    const qf = gm.get('quality');
    const quality = qf ? qf.oneOf(['draft', 'low', 'medium', 'high'] as const) : DEFAULT_GHOSTS.quality;
    const threshold = num(gm, 'threshold', { min: 0, max: 1 }, DEFAULT_GHOSTS.threshold);
    const per = ghostPaths(ctx, gm, lens);
    return !quality || threshold === undefined || !per ? undefined : { enabled: true, gain: 1, quality, threshold, ...per };
  });
  const starburst = elementSection(ctx, m.get('starburst'), '{fraction, size, enabled, gain}', DEFAULT_STARBURST, (sm) => {
    const fraction = num(sm, 'fraction', { min: 0, max: 1 }, DEFAULT_STARBURST.fraction);
    const size = num(sm, 'size', { min: 0.01, max: 1000 }, DEFAULT_STARBURST.size);
    return fraction === undefined || size === undefined ? undefined : { fraction, size };
  });
  const veil = elementSection(ctx, m.get('veil'), '{fraction, enabled, gain}', { fraction: 0 }, (vm) => {
    const fraction = num(vm, 'fraction', { min: 0, max: 1 }, 0);
    return fraction === undefined ? undefined : { fraction };
  });
  const streakField = m.get('streak');
  const streak = elementSection(ctx, streakField, '{fraction, length, thickness, colour, enabled, gain}', DEFAULT_STREAK, (sm) => {
    const fraction = num(sm, 'fraction', { min: 0, max: 1 }, 0.02);
    const lengthPx = num(sm, 'length', { min: 1, max: 100_000 }, DEFAULT_STREAK.lengthPx);
    const thicknessPx = num(sm, 'thickness', { min: 0.2, max: 100 }, DEFAULT_STREAK.thicknessPx);
    const cf = sm.get('colour');
    const colour = cf ? resolveColour(ctx, cf) : undefined;
    if (fraction === undefined || lengthPx === undefined || thicknessPx === undefined || (cf && !colour)) return undefined;
    return { fraction, lengthPx, thicknessPx, ...(colour ? { tint: colour.rgb } : {}) };
  });
  let dustSeedGiven = false;
  const dust = elementSection(ctx, m.get('dust'), '{fraction, density, reach, seed, enabled, gain}', DEFAULT_DUST, (dm) => {
    dustSeedGiven = dm.has('seed');
    const fraction = num(dm, 'fraction', { min: 0, max: 1 }, 0.01);
    const density = num(dm, 'density', { min: 0, max: 100 }, 1);
    const reachPx = num(dm, 'reach', { min: 1, max: 100_000 }, 300);
    const seed = num(dm, 'seed', { integer: true, min: 0, max: 2 ** 32 - 1 }, 0);
    return fraction === undefined || density === undefined || reachPx === undefined || seed === undefined ? undefined : { fraction, density, reachPx, seed };
  });
  m.finish();
  if (!core || !glow || !ghosts || !starburst || !veil || !streak || !dust) return undefined;
  return {
    glow: glow.settings,
    ghosts: { ...ghosts.settings, enabled: ghosts.control.enabled },
    starburst: starburst.settings,
    veil: veil.settings,
    streak: streak.settings,
    streakGiven: Boolean(streakField),
    dust: dust.settings,
    dustSeedGiven,
    elements: {
      core: core.control,
      glow: glow.control,
      ghosts: ghosts.control,
      starburst: starburst.control,
      veil: veil.control,
      streak: streak.control,
      dust: dust.control,
    } satisfies Record<ElementName, ElementControl>,
  };
}
