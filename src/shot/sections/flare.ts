// The shot's `flare` section: each element's settings, `enabled` and keyable `gain`, with the
// defaults that apply when a key or the whole section is left out.

import { LINEAR } from '../../timeline/easing.js';
import type { Field, MapField } from '../source.js';
import type { DustSettings, ElementControl, ElementName, GhostSettings, GlowSettings, LightFlare, ResolvedLens, StarburstSettings, StreakSettings } from '../types.js';
import type { ResolveContext } from './context.js';
import { resolveColour, scalarKeys } from './keys.js';

export const DEFAULT_GLOW: GlowSettings = { fraction: 0.04, sizePx: 6, falloff: 3 };
export const DEFAULT_GHOSTS: GhostSettings = { enabled: true, gain: 1, quality: 'medium', threshold: 1e-6, paths: {}, solo: [] };
export const DEFAULT_STARBURST: StarburstSettings = { fraction: 0.05, size: 1 };
export const DEFAULT_STREAK: StreakSettings = { fraction: 0, lengthPx: 200, thicknessPx: 1 };
export const DEFAULT_DUST: DustSettings = { fraction: 0, density: 1, reachPx: 300, seed: 0 };

/** `enabled` and `gain` (a number or keys) of an element's mapping; absent: `base` (on, gain 1). */
export function elementControl(ctx: ResolveContext, m: MapField | undefined, base?: ElementControl): ElementControl | undefined {
  const on: ElementControl = base ?? { enabled: true, gain: [{ frame: 0, value: 1, ease: LINEAR }] };
  if (!m) return on;
  const en = m.get('enabled');
  if (en && typeof en.scalar !== 'boolean') en.expected('true or false');
  const g = m.get('gain');
  const gain = g ? scalarKeys(ctx, g, 'value', { min: 0, max: 1e6 }) : on.gain;
  if (!gain) return undefined;
  return { enabled: en ? en.scalar === true : on.enabled, gain };
}

/** What the flare section resolves to (the shot's, or a light's own on top of the shot's). */
export interface ResolvedFlareBase extends LightFlare {
  streakGiven: boolean;
  dustSeedGiven: boolean;
}

/**
 * One element's mapping under `flare:`: its `enabled` and `gain`, and its own keys read by
 * `read`; absent, the defaults.
 */
export function elementSection<T>(ctx: ResolveContext, f: Field | undefined, what: string, dflt: T, read: (m: MapField) => T | undefined, baseControl?: ElementControl): { settings: T; control: ElementControl } | undefined {
  if (!f) return { settings: dflt, control: elementControl(ctx, undefined, baseControl)! };
  const m = f.map(what);
  if (!m) return undefined;
  const control = elementControl(ctx, m, baseControl);
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

/**
 * The flare section. With `base` (a light's own `flare` block), every key left out keeps the
 * shot's value, and the keys that are the whole shot's (ghost quality and threshold, dust density
 * and seed) are refused.
 */
export function resolveFlare(ctx: ResolveContext, f: Field, lens?: ResolvedLens, base?: ResolvedFlareBase) {
  const m = f.map();
  if (!m) return undefined;
  const shotOnly = (mf: MapField, keys: string[]) => {
    if (!base) return;
    for (const k of keys) mf.get(k)?.error(`${k} is set for the whole shot, under the shot's flare: not per light`);
  };
  const num = (mf: MapField, key: string, rule: Parameters<Field['number']>[0], dflt: number) => {
    const x = mf.get(key);
    return x ? x.number(rule) : dflt;
  };
  const b = base;
  const core = elementSection(ctx, m.get('core'), '{enabled, gain}', true, () => true, b?.elements.core);
  const g0 = b?.glow ?? DEFAULT_GLOW;
  const glow = elementSection(ctx, m.get('glow'), '{fraction, size, falloff, enabled, gain}', g0, (gm) => {
    const fraction = num(gm, 'fraction', { min: 0, max: 1 }, g0.fraction);
    const sizePx = num(gm, 'size', { min: 0.5, max: 100_000 }, g0.sizePx);
    const falloff = num(gm, 'falloff', { min: 2, minExclusive: true, max: 8 }, g0.falloff);
    return fraction === undefined || sizePx === undefined || falloff === undefined ? undefined : { fraction, sizePx, falloff };
  }, b?.elements.glow);
  const gh0 = b?.ghosts ?? DEFAULT_GHOSTS;
  const ghosts = elementSection(ctx, m.get('ghosts'), '{quality, threshold, enabled, gain, paths, solo}', gh0, (gm) => {
    shotOnly(gm, ['quality', 'threshold']);
    const qf = b ? undefined : gm.get('quality');
    const quality = qf ? qf.oneOf(['draft', 'low', 'medium', 'high'] as const) : gh0.quality;
    const threshold = b ? gh0.threshold : num(gm, 'threshold', { min: 0, max: 1 }, gh0.threshold);
    const per = gm.has('paths') || gm.has('solo') ? ghostPaths(ctx, gm, lens) : { paths: gh0.paths, solo: gh0.solo };
    return !quality || threshold === undefined || !per ? undefined : { enabled: true, gain: gh0.gain, quality, threshold, ...per };
  }, b?.elements.ghosts);
  const s0 = b?.starburst ?? DEFAULT_STARBURST;
  const starburst = elementSection(ctx, m.get('starburst'), '{fraction, size, enabled, gain}', s0, (sm) => {
    const fraction = num(sm, 'fraction', { min: 0, max: 1 }, s0.fraction);
    const size = num(sm, 'size', { min: 0.01, max: 1000 }, s0.size);
    return fraction === undefined || size === undefined ? undefined : { fraction, size };
  }, b?.elements.starburst);
  const v0 = b?.veil ?? { fraction: 0 };
  const veil = elementSection(ctx, m.get('veil'), '{fraction, enabled, gain}', v0, (vm) => {
    const fraction = num(vm, 'fraction', { min: 0, max: 1 }, v0.fraction);
    return fraction === undefined ? undefined : { fraction };
  }, b?.elements.veil);
  const streakField = m.get('streak');
  const st0 = b?.streak ?? DEFAULT_STREAK;
  const streak = elementSection(ctx, streakField, '{fraction, length, thickness, colour, enabled, gain}', st0, (sm) => {
    const fraction = num(sm, 'fraction', { min: 0, max: 1 }, b ? st0.fraction : 0.02);
    const lengthPx = num(sm, 'length', { min: 1, max: 100_000 }, st0.lengthPx);
    const thicknessPx = num(sm, 'thickness', { min: 0.2, max: 100 }, st0.thicknessPx);
    const cf = sm.get('colour');
    const colour = cf ? resolveColour(ctx, cf) : undefined;
    if (fraction === undefined || lengthPx === undefined || thicknessPx === undefined || (cf && !colour)) return undefined;
    const tint = colour ? colour.rgb : st0.tint;
    return { fraction, lengthPx, thicknessPx, ...(tint ? { tint } : {}) };
  }, b?.elements.streak);
  let dustSeedGiven = b?.dustSeedGiven ?? false;
  const d0 = b?.dust ?? DEFAULT_DUST;
  const dust = elementSection(ctx, m.get('dust'), '{fraction, density, reach, seed, enabled, gain}', d0, (dm) => {
    shotOnly(dm, ['density', 'seed']);
    if (!b) dustSeedGiven = dm.has('seed');
    const fraction = num(dm, 'fraction', { min: 0, max: 1 }, b ? d0.fraction : 0.01);
    const density = b ? d0.density : num(dm, 'density', { min: 0, max: 100 }, 1);
    const reachPx = num(dm, 'reach', { min: 1, max: 100_000 }, b ? d0.reachPx : 300);
    const seed = b ? d0.seed : num(dm, 'seed', { integer: true, min: 0, max: 2 ** 32 - 1 }, 0);
    return fraction === undefined || density === undefined || reachPx === undefined || seed === undefined ? undefined : { fraction, density, reachPx, seed };
  }, b?.elements.dust);
  m.finish();
  if (!core || !glow || !ghosts || !starburst || !veil || !streak || !dust) return undefined;
  return {
    glow: glow.settings,
    ghosts: { ...ghosts.settings, enabled: ghosts.control.enabled },
    starburst: starburst.settings,
    veil: veil.settings,
    streak: streak.settings,
    streakGiven: Boolean(streakField) || Boolean(b?.streakGiven),
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
