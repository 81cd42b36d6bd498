// Shot file (YAML text) -> ResolvedShot. Every problem is collected with file:line:col and key
// path before anything fails; unknown keys are errors with a "did you mean" hint.

import path from 'node:path';
import { ShotError, type Diagnostic } from '../errors.js';
import { blackbodyRgb } from '../colour/blackbody.js';
import { luminance } from '../colour/srgb.js';
import { parseFrameTemplate } from '../io/frame-path.js';
import { LINEAR, parseEasing, type Easing } from '../timeline/easing.js';
import { parseFrameRate, type FrameRate } from '../timeline/frame-rate.js';
import type { Vec2 } from '../timeline/path.js';
import { canDropFrame, timecodeToFrames } from '../timeline/timecode.js';
import type { Key, PathShape } from '../timeline/track.js';
import { LENS_KEYS, parseLensText, readLens } from './lens-file.js';
import { Field, MapField, parseYamlSource } from './source.js';
import { parseTrackCsv } from './track-csv.js';
import type {
  ElementControl,
  ElementName,
  DustSettings,
  StarburstSettings,
  StreakSettings,
  ResolvedMatte,
  ShutterSettings,
  GhostSettings,
  GlowSettings,
  ResolvedLens,
  IntensityUnit,
  ResolvedFrame,
  ResolvedLight,
  ResolvedOutput,
  ResolvedShot,
} from './types.js';

/** Largest frame side accepted (px). */
export const MAX_SIDE_PX = 16384;
/** Largest number of frames in one shot. */
export const MAX_FRAMES = 1_000_000;
/** Positions further than this from the frame (px) are refused as typos. */
export const MAX_COORD_PX = 1_000_000;

export const DEFAULT_GLOW: GlowSettings = { fraction: 0.04, sizePx: 6, falloff: 3 };
export const DEFAULT_GHOSTS: GhostSettings = { enabled: true, gain: 1, quality: 'medium', threshold: 1e-6 };
export const DEFAULT_STARBURST: StarburstSettings = { fraction: 0.05, size: 1 };
export const DEFAULT_STREAK: StreakSettings = { fraction: 0, lengthPx: 200, thicknessPx: 1 };
export const DEFAULT_DUST: DustSettings = { fraction: 0, density: 1, reachPx: 300, seed: 0 };
export const DEFAULT_RADIUS_PX = 4;

/** What the resolver may read besides the shot itself (track CSVs); injected so shot/ does no I/O. */
export interface ShotReader {
  readText(absolutePath: string): string;
  /** preset lenses: their names, and the file of one */
  presetNames?(): string[];
  presetPath?(name: string): string;
}

export function resolveShot(text: string, file: string, reader: ShotReader): ResolvedShot {
  const absFile = path.resolve(file);
  const { ctx, root } = parseYamlSource(text, file);
  if (!root) throw new ShotError(ctx.diagnostics);
  const r = new Resolver(ctx.diagnostics, path.dirname(absFile), path.dirname(file), reader);
  const shot = r.shot(root, absFile);
  if (ctx.diagnostics.length > 0 || !shot) {
    throw new ShotError(sortDiagnostics(ctx.diagnostics));
  }
  return shot;
}

function sortDiagnostics(d: Diagnostic[]): Diagnostic[] {
  return [...d].sort((a, b) =>
    a.loc.file === b.loc.file ? a.loc.line - b.loc.line || a.loc.col - b.loc.col : a.loc.file < b.loc.file ? -1 : 1,
  );
}

class Resolver {
  constructor(
    private readonly diagnostics: Diagnostic[],
    private readonly dir: string,
    /** the shot's folder as the user named it, for messages about files beside it */
    private readonly shownDir: string,
    private readonly reader: ShotReader,
  ) {}

  shot(root: Field, absFile: string): ResolvedShot | undefined {
    const m = root.map('a mapping with version, frame, lights and output');
    if (!m) return undefined;
    const version = m.require('version', 'the shot-file format version, 1');
    if (version && version.scalar !== 1) version.expected('version 1');
    const frameField = m.require('frame', 'size, rate and frame range');
    const frame = frameField ? this.frame(frameField) : undefined;
    const seedField = m.get('seed');
    const seed = seedField ? seedField.number({ integer: true, min: 0, max: 2 ** 32 - 1 }) : 0;
    const lightsField = m.require('lights', 'a list of the lights in the shot');
    const lights = lightsField ? this.lights(lightsField) : undefined;
    const lensField = m.get('lens');
    const lens = lensField ? this.lens(lensField) : undefined;
    const mattesField = m.get('mattes');
    const mattes = mattesField ? this.mattes(mattesField) : [];
    const shutterField = m.get('shutter');
    const shutter = shutterField ? this.shutter(shutterField) : { angleDeg: 0, samples: 1, phaseDeg: 0 };
    const flareField = m.get('flare');
    const allOn = () => Object.fromEntries((['core', 'glow', 'ghosts', 'starburst', 'veil', 'streak', 'dust'] as ElementName[]).map((n) => [n, this.control(undefined)!])) as Record<ElementName, ElementControl>;
    const flare = flareField ? this.flare(flareField) : { glow: DEFAULT_GLOW, ghosts: DEFAULT_GHOSTS, starburst: DEFAULT_STARBURST, veil: { fraction: 0 }, streak: DEFAULT_STREAK, streakGiven: false, dust: DEFAULT_DUST, dustSeedGiven: false, elements: allOn() };
    const outField = m.require('output', 'where and how frames are written');
    const output = outField ? this.output(outField) : undefined;
    m.finish();
    if (!frame || !lights || !output || !flare || seed === undefined || (lensField && !lens) || !mattes || !shutter) return undefined;
    // lights name existing mattes, and have a depth where a depth matte can cover them
    const names = new Set(mattes.map((x) => x.name));
    let ok = true;
    lights.forEach((l, i) => {
      const lf = lightsField!.list()![i];
      const lm = new MapField(lf);
      if (!lm.has('occluded_by')) l.occludedBy = [...names];
      for (const n of l.occludedBy) {
        if (!names.has(n)) {
          ok = false;
          lm.get('occluded_by')!.error(`no matte named "${n}" (mattes: ${[...names].join(', ') || 'none'})`);
        }
      }
      const needsDepth = mattes.some((x) => x.kind === 'depth' && l.occludedBy.includes(x.name));
      if (needsDepth && !l.depth) {
        ok = false;
        lf.error(`missing key "depth" (the light's distance, in the depth matte's units, for the depth matte${mattes.filter((x) => x.kind === 'depth').length > 1 ? 's' : ''})`);
      }
    });
    if (!ok) return undefined;
    // an anamorphic lens streaks unless the shot says otherwise
    const streak = flare.streakGiven || !lens || lens.model.squeeze === 1 ? flare.streak : { ...flare.streak, fraction: 0.02 };
    return {
      version: 1,
      file: absFile,
      frame,
      seed,
      lights,
      glow: flare.glow,
      ...(lens ? { lens } : {}),
      ghosts: flare.ghosts,
      starburst: flare.starburst,
      veil: flare.veil,
      streak,
      dust: { ...flare.dust, seed: flare.dustSeedGiven ? flare.dust.seed : seed },
      elements: flare.elements,
      mattes,
      shutter,
      output,
    };
  }

  frame(f: Field): ResolvedFrame | undefined {
    const m = f.map();
    if (!m) return undefined;
    const width = m.require('width', 'frame width in pixels')?.number({ integer: true, min: 1, max: MAX_SIDE_PX });
    const height = m.require('height', 'frame height in pixels')?.number({ integer: true, min: 1, max: MAX_SIDE_PX });
    const pa = m.get('pixel_aspect');
    const pixelAspect = pa ? pa.number({ min: 0.1, max: 10 }) : 1;
    const rateField = m.require('rate', 'frames per second');
    let rate: FrameRate | undefined;
    if (rateField) {
      const r = parseFrameRate(rateField.scalar);
      if (typeof r === 'string') rateField.expected(r);
      else rate = r;
    }
    const firstField = m.require('first', 'number of the first frame');
    const first = firstField?.number({ integer: true, min: -1e9, max: 1e9 });
    const lastField = m.require('last', 'number of the last frame');
    const last = lastField?.number({ integer: true, min: -1e9, max: 1e9 });
    if (first !== undefined && last !== undefined) {
      if (last < first) lastField!.error(`expected a last frame at or after the first (${first}), found ${last}`);
      else if (last - first + 1 > MAX_FRAMES) lastField!.error(`the range holds ${last - first + 1} frames; at most ${MAX_FRAMES}`);
    }
    const centreField = m.get('optical_centre');
    const centre = centreField ? (centreField.numbers(2, { min: -MAX_COORD_PX, max: MAX_COORD_PX }) as Vec2 | undefined) : undefined;
    let dropFrame = rate ? canDropFrame(rate) : false;
    const dfField = m.get('drop_frame');
    if (dfField) {
      if (typeof dfField.scalar !== 'boolean') dfField.expected('true or false');
      else if (dfField.scalar && rate && !canDropFrame(rate)) dfField.error(`drop-frame timecode exists only at 30000/1001 and 60000/1001 fps`);
      else dropFrame = dfField.scalar;
    }
    let timecodeStart = first;
    const tcField = m.get('timecode');
    if (tcField && rate) {
      const s = tcField.string('a timecode HH:MM:SS:FF');
      if (s !== undefined) {
        const n = timecodeToFrames(s, rate, dropFrame);
        if (typeof n === 'string') tcField.error(n);
        else timecodeStart = n;
      }
    }
    m.finish();
    if (width === undefined || height === undefined || pixelAspect === undefined || !rate || first === undefined || last === undefined || timecodeStart === undefined) return undefined;
    if (centreField && !centre) return undefined;
    return {
      widthPx: width,
      heightPx: height,
      pixelAspect,
      rate,
      first,
      last,
      opticalCentre: centre ?? [width / 2, height / 2],
      timecodeStartFrames: timecodeStart,
      dropFrame,
    };
  }

  lights(f: Field): ResolvedLight[] | undefined {
    const items = f.list('a list of lights');
    if (!items) return undefined;
    if (items.length === 0) return f.error('expected at least one light, found an empty list');
    const names = new Set<string>();
    const out = items.map((item) => {
      const light = this.light(item);
      if (light) {
        if (names.has(light.name)) new MapField(item).get('name')!.error(`the name "${light.name}" is already used by another light`);
        names.add(light.name);
      }
      return light;
    });
    return out.every((l) => l !== undefined) ? (out as ResolvedLight[]) : undefined;
  }

  light(f: Field): ResolvedLight | undefined {
    const m = f.map('a light: a mapping with name, position and intensity');
    if (!m) return undefined;
    const name = m.require('name', "the light's name")?.string('a name');
    const pathField = m.get('path');
    const shape: PathShape | undefined = pathField ? pathField.oneOf(['linear', 'smooth'] as const) : 'smooth';
    const unitField = m.get('intensity_unit');
    const unit: IntensityUnit | undefined = unitField ? unitField.oneOf(['stops', 'linear'] as const) : 'stops';
    const intensityRule = unit === 'linear' ? { min: 0, max: 1e12 } : { min: -40, max: 40 };

    const posField = m.get('position');
    const trackField = m.get('track');
    let position: Key<Vec2>[] | undefined;
    let trackIntensity: Key<number>[] | undefined;
    let trackSource: Field | undefined;
    if (posField && trackField) {
      trackField.error('a light takes either "position" keys or a "track" file, not both');
    } else if (posField) {
      position = this.positionKeys(posField);
    } else if (trackField) {
      trackSource = trackField;
      const t = this.track(trackField, unit ? intensityRule : undefined);
      position = t?.position;
      trackIntensity = t?.intensity;
    } else {
      m.reportMissing('position', '"position" (pixel position keys) or "track" (a frame,x,y CSV file)');
    }

    const intField = m.get('intensity');
    let intensity: Key<number>[] | undefined;
    if (intField) {
      if (trackIntensity) intField.error(`intensity is given here and in the track file's intensity column; keep one`);
      intensity = this.scalarKeys(intField, 'value', intensityRule);
    } else if (trackIntensity) {
      intensity = trackIntensity;
    } else if (trackSource || posField) {
      m.reportMissing('intensity', "stops over the frame's white, or a linear multiplier with intensity_unit: linear");
    }

    const colourField = m.get('colour');
    const colour = colourField ? this.colour(colourField) : { rgb: [1, 1, 1] as [number, number, number], spec: { kelvin: 6504 } };
    const radiusField = m.get('radius');
    const radiusPx = radiusField ? radiusField.number({ min: 0, minExclusive: true, max: 10_000 }) : DEFAULT_RADIUS_PX;
    const occField = m.get('occluded_by');
    const occludedBy = occField ? occField.list('a list of matte names')?.map((x) => x.string('a matte name')) : [];
    const depthField = m.get('depth');
    const depth = depthField ? this.scalarKeys(depthField, 'value', { min: 0, max: 1e12 }) : undefined;
    const offField = m.get('off_frame');
    const offFrame = offField ? offField.oneOf(['clear', 'hold', 'hidden'] as const) : 'clear';
    const limbField = m.get('limb_darkening');
    const limbDarkening = limbField ? limbField.number({ min: 0, max: 1 }) : 0;
    m.finish();
    if (!name || !shape || !unit || !position || !intensity || !colour || radiusPx === undefined) return undefined;
    if (!occludedBy || occludedBy.some((x) => x === undefined) || (depthField && !depth) || !offFrame || limbDarkening === undefined) return undefined;
    return {
      name,
      path: shape,
      position,
      intensityUnit: unit,
      intensity,
      colour: colour.rgb,
      colourSpec: colour.spec,
      radiusPx,
      occludedBy: occludedBy as string[],
      ...(depth ? { depth } : {}),
      offFrame,
      limbDarkening,
    };
  }

  /** A constant [x, y] or a list of {frame, x, y, ease} keys. */
  positionKeys(f: Field): Key<Vec2>[] | undefined {
    const coord = { min: -MAX_COORD_PX, max: MAX_COORD_PX };
    const what = 'a constant position [x, y] or a list of keys {frame, x, y, ease}';
    const list = f.isSeq() ? f.list()! : undefined;
    if (list && list.length > 0 && list.every((x) => !x.isMap())) {
      if (list.length !== 2) return f.error(`expected ${what}, found a list of ${list.length} values`);
      const v = f.numbers(2, coord);
      return v ? [{ frame: 0, value: [v[0], v[1]], ease: LINEAR }] : undefined;
    }
    if (!list) return f.expected(what);
    return this.keys(f, list, (m) => {
      const x = m.require('x', 'horizontal position in pixels')?.number(coord);
      const y = m.require('y', 'vertical position in pixels, down from the top')?.number(coord);
      return x === undefined || y === undefined ? undefined : ([x, y] as Vec2);
    });
  }

  /** A constant number or a list of {frame, <valueKey>, ease} keys. */
  scalarKeys(f: Field, valueKey: string, rule: { min: number; max: number }): Key<number>[] | undefined {
    if (f.isNumber()) {
      const v = f.number(rule);
      return v === undefined ? undefined : [{ frame: 0, value: v, ease: LINEAR }];
    }
    const list = f.isSeq() ? f.list()! : undefined;
    if (!list) return f.expected(`a constant number or a list of keys {frame, ${valueKey}, ease}`);
    return this.keys(f, list, (m) => m.require(valueKey, 'the value at this key')?.number(rule));
  }

  keys<V>(f: Field, list: Field[], value: (m: MapField) => V | undefined): Key<V>[] | undefined {
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

  track(f: Field, intensityRule: { min: number; max: number } | undefined): { position: Key<Vec2>[]; intensity?: Key<number>[] } | undefined {
    const rel = f.string('a path to a frame,x,y[,intensity] CSV file');
    if (rel === undefined) return undefined;
    const abs = path.resolve(this.dir, rel);
    let text: string;
    try {
      text = this.reader.readText(abs);
    } catch (e) {
      return f.error(`cannot read track file ${abs}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    }
    const shown = path.isAbsolute(rel) ? rel : path.join(this.shownDir, rel);
    const csv = parseTrackCsv(text, shown, this.diagnostics);
    if (!csv) return undefined;
    const position = csv.rows.map((r) => ({ frame: r.frame, value: [r.x, r.y] as Vec2, ease: LINEAR }));
    if (!csv.hasIntensity || !intensityRule) return { position };
    const bad = csv.rows.find((r) => r.intensity! < intensityRule.min || r.intensity! > intensityRule.max);
    if (bad) return f.error(`track intensity ${bad.intensity} at frame ${bad.frame} is outside ${intensityRule.min} to ${intensityRule.max}`);
    return { position, intensity: csv.rows.map((r) => ({ frame: r.frame, value: r.intensity!, ease: LINEAR })) };
  }

  colour(f: Field): { rgb: [number, number, number]; spec: ResolvedLight['colourSpec'] } | undefined {
    const m = f.map('{kelvin: K} or {rgb: [r, g, b]}');
    if (!m) return undefined;
    const k = m.get('kelvin');
    const rgbField = m.get('rgb');
    m.finish();
    if (k && rgbField) return f.error('give either kelvin or rgb, not both');
    if (k) {
      const kelvin = k.number({ min: 1000, max: 40000 });
      return kelvin === undefined ? undefined : { rgb: blackbodyRgb(kelvin), spec: { kelvin } };
    }
    if (rgbField) {
      const rgb = rgbField.numbers(3, { min: 0, max: 1e6 }) as [number, number, number] | undefined;
      if (!rgb) return undefined;
      const lum = luminance(...rgb);
      if (lum <= 0) return rgbField.error('expected a colour with some luminance, found black');
      return { rgb: [rgb[0] / lum, rgb[1] / lum, rgb[2] / lum], spec: { rgb } };
    }
    return f.error('expected {kelvin: K} or {rgb: [r, g, b]}, found an empty mapping');
  }

  /** `enabled` and `gain` (a number or keys) of an element's mapping; absent: on, gain 1. */
  control(m: MapField | undefined): ElementControl | undefined {
    const on: ElementControl = { enabled: true, gain: [{ frame: 0, value: 1, ease: LINEAR }] };
    if (!m) return on;
    const en = m.get('enabled');
    if (en && typeof en.scalar !== 'boolean') en.expected('true or false');
    const g = m.get('gain');
    const gain = g ? this.scalarKeys(g, 'value', { min: 0, max: 1e6 }) : on.gain;
    if (!gain) return undefined;
    return { enabled: en ? en.scalar === true : true, gain };
  }

  /**
   * One element's mapping under `flare:`: its `enabled` and `gain`, and its own keys read by
   * `read`; absent, the defaults.
   */
  section<T>(f: Field | undefined, what: string, dflt: T, read: (m: MapField) => T | undefined): { settings: T; control: ElementControl } | undefined {
    if (!f) return { settings: dflt, control: this.control(undefined)! };
    const m = f.map(what);
    if (!m) return undefined;
    const control = this.control(m);
    const settings = read(m);
    m.finish();
    return settings !== undefined && control ? { settings, control } : undefined;
  }

  flare(f: Field) {
    const m = f.map();
    if (!m) return undefined;
    const num = (mf: MapField, key: string, rule: Parameters<Field['number']>[0], dflt: number) => {
      const x = mf.get(key);
      return x ? x.number(rule) : dflt;
    };
    const core = this.section(m.get('core'), '{enabled, gain}', true, () => true);
    const glow = this.section(m.get('glow'), '{fraction, size, falloff, enabled, gain}', DEFAULT_GLOW, (gm) => {
      const fraction = num(gm, 'fraction', { min: 0, max: 1 }, DEFAULT_GLOW.fraction);
      const sizePx = num(gm, 'size', { min: 0.5, max: 100_000 }, DEFAULT_GLOW.sizePx);
      const falloff = num(gm, 'falloff', { min: 2, minExclusive: true, max: 8 }, DEFAULT_GLOW.falloff);
      return fraction === undefined || sizePx === undefined || falloff === undefined ? undefined : { fraction, sizePx, falloff };
    });
    const ghosts = this.section(m.get('ghosts'), '{quality, threshold, enabled, gain}', DEFAULT_GHOSTS, (gm) => {
      const qf = gm.get('quality');
      const quality = qf ? qf.oneOf(['draft', 'low', 'medium', 'high'] as const) : DEFAULT_GHOSTS.quality;
      const threshold = num(gm, 'threshold', { min: 0, max: 1 }, DEFAULT_GHOSTS.threshold);
      return !quality || threshold === undefined ? undefined : { enabled: true, gain: 1, quality, threshold };
    });
    const starburst = this.section(m.get('starburst'), '{fraction, size, enabled, gain}', DEFAULT_STARBURST, (sm) => {
      const fraction = num(sm, 'fraction', { min: 0, max: 1 }, DEFAULT_STARBURST.fraction);
      const size = num(sm, 'size', { min: 0.01, max: 1000 }, DEFAULT_STARBURST.size);
      return fraction === undefined || size === undefined ? undefined : { fraction, size };
    });
    const veil = this.section(m.get('veil'), '{fraction, enabled, gain}', { fraction: 0 }, (vm) => {
      const fraction = num(vm, 'fraction', { min: 0, max: 1 }, 0);
      return fraction === undefined ? undefined : { fraction };
    });
    const streakField = m.get('streak');
    const streak = this.section(streakField, '{fraction, length, thickness, colour, enabled, gain}', DEFAULT_STREAK, (sm) => {
      const fraction = num(sm, 'fraction', { min: 0, max: 1 }, 0.02);
      const lengthPx = num(sm, 'length', { min: 1, max: 100_000 }, DEFAULT_STREAK.lengthPx);
      const thicknessPx = num(sm, 'thickness', { min: 0.2, max: 100 }, DEFAULT_STREAK.thicknessPx);
      const cf = sm.get('colour');
      const colour = cf ? this.colour(cf) : undefined;
      if (fraction === undefined || lengthPx === undefined || thicknessPx === undefined || (cf && !colour)) return undefined;
      return { fraction, lengthPx, thicknessPx, ...(colour ? { tint: colour.rgb } : {}) };
    });
    let dustSeedGiven = false;
    const dust = this.section(m.get('dust'), '{fraction, density, reach, seed, enabled, gain}', DEFAULT_DUST, (dm) => {
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

  lens(f: Field): ResolvedLens | undefined {
    const m = f.map('{preset: NAME}, {file: PATH}, or a lens description, with f_number');
    if (!m) return undefined;
    const presetField = m.get('preset');
    const fileField = m.get('file');
    const fnField = m.get('f_number');
    let model: ResolvedLens['model'] | undefined;
    let source = 'inline';
    const hasInline = LENS_KEYS.some((k) => m.has(k));
    if ([presetField, fileField, hasInline ? f : undefined].filter(Boolean).length > 1) {
      return f.error('a lens is a preset, a file, or described inline: give one of them');
    }
    if (presetField) {
      const name = presetField.string('a preset name');
      const names = this.reader.presetNames?.() ?? [];
      if (name !== undefined) {
        if (!names.includes(name)) {
          presetField.oneOf(names);
        } else {
          source = `preset ${name}`;
          model = this.lensFile(presetField, this.reader.presetPath!(name), `lenses/${name}.yaml`);
        }
      }
    } else if (fileField) {
      const rel = fileField.string('a path to a lens file');
      if (rel !== undefined) {
        const abs = path.resolve(this.dir, rel);
        source = abs;
        model = this.lensFile(fileField, abs, path.isAbsolute(rel) ? rel : path.join(this.shownDir, rel));
      }
    } else if (hasInline) {
      model = readLens(m, 'inline lens');
    } else {
      f.error('expected preset, file, or the lens keys (surfaces, ...)');
    }
    let fNumber: Key<number>[] | undefined;
    if (model) {
      const rule = { min: model.fNumberMin, max: 64 };
      fNumber = fnField ? this.scalarKeys(fnField, 'value', rule) : [{ frame: 0, value: model.fNumberMin, ease: LINEAR }];
    }
    m.finish();
    if (!model || !fNumber) return undefined;
    return { model, source, fNumber };
  }

  /** A lens in a file of its own: its own YAML document, its own located messages. */
  lensFile(at: Field, abs: string, shown: string): ResolvedLens['model'] | undefined {
    let text: string;
    try {
      text = this.reader.readText(abs);
    } catch (e) {
      return at.error(`cannot read lens file ${abs}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    }
    const { model, diagnostics } = parseLensText(text, shown, path.basename(abs, '.yaml'));
    this.diagnostics.push(...diagnostics);
    return model;
  }

  mattes(f: Field): ResolvedMatte[] | undefined {
    const items = f.list('a list of mattes');
    if (!items) return undefined;
    const seen = new Set<string>();
    const out = items.map((item) => {
      const m = item.map('a matte: {name, kind, path, ...}');
      if (!m) return undefined;
      const name = m.require('name', "the matte's name")?.string('a name');
      if (name && seen.has(name)) m.get('name')!.error(`the name "${name}" is already used by another matte`);
      if (name) seen.add(name);
      const kind = m.require('kind', 'alpha (coverage) or depth')?.oneOf(['alpha', 'depth'] as const);
      const pathField = m.require('path', 'a frame-path template of the matte images, such as mattes/fg.####.png');
      let template: string | undefined;
      const rel = pathField?.string('a frame-path template');
      if (rel !== undefined) {
        const t = parseFrameTemplate(rel);
        if (typeof t === 'string') pathField!.error(t);
        else template = path.resolve(this.dir, rel);
      }
      const isExr = template !== undefined && path.extname(template).toLowerCase() === '.exr';
      const ch = m.get('channel');
      let channel: string | undefined;
      if (ch && isExr) {
        channel = ch.string('an OpenEXR channel name, such as Z, A or depth.Z');
        if (channel !== undefined && !/^[\x21-\x7e]{1,255}$/.test(channel)) ch.error(`"${channel}" is not an OpenEXR channel name`);
      } else if (ch) channel = ch.oneOf(['r', 'g', 'b', 'a'] as const);
      else channel = isExr ? undefined : 'r';
      const off = m.get('offset');
      const offset = off ? off.number({ integer: true, min: -1e9, max: 1e9 }) : 0;
      const bf = m.get('before');
      const before = bf ? bf.oneOf(['hold', 'clear'] as const) : 'hold';
      const af = m.get('after');
      const after = af ? af.oneOf(['hold', 'clear'] as const) : 'hold';
      const inv = m.get('invert');
      if (inv && typeof inv.scalar !== 'boolean') inv.expected('true or false');
      const rs = m.get('resize');
      const resize = rs ? rs.oneOf(['error', 'stretch'] as const) : 'error';
      let depth: ResolvedMatte['depth'];
      const enc = m.get('encoding');
      const near = m.get('near');
      const far = m.get('far');
      const scale = m.get('scale');
      const tol = m.get('tolerance');
      if (kind === 'depth') {
        // OpenEXR depth is scene depth as rendered; PNG depth is a [0, 1] code between near and far
        const encoding = enc ? enc.oneOf(['normalised', 'inverted', 'linear'] as const) : isExr ? 'linear' : 'normalised';
        const n = near ? near.number({ min: 0, max: 1e12 }) : 0;
        const fa = far ? far.number({ min: 0, max: 1e12 }) : 1;
        const sc = scale ? scale.number({ min: 0, minExclusive: true, max: 1e12 }) : 1;
        const to = tol ? tol.number({ min: 0, minExclusive: true, max: 1e12 }) : 0.01 * ((fa ?? 1) - (n ?? 0) || 1);
        if (encoding && encoding !== 'linear' && (!near || !far)) m.reportMissing(near ? 'far' : 'near', '"near" and "far" (the depths that stored 0 and 1 stand for)');
        if (encoding && n !== undefined && fa !== undefined && sc !== undefined && to !== undefined && (encoding === 'linear' || (near && far))) {
          if (encoding !== 'linear' && fa <= n) far!.error(`expected far beyond near (${n}), found ${fa}`);
          else depth = { encoding, near: n, far: fa, scale: sc, tolerance: to };
        }
      } else {
        for (const [k, x] of [['encoding', enc], ['near', near], ['far', far], ['scale', scale], ['tolerance', tol]] as const) {
          if (x) x.error(`${k} is for depth mattes; this one is kind: ${kind ?? 'alpha'}`);
        }
      }
      m.finish();
      if (!name || !kind || !template || (ch && channel === undefined) || offset === undefined || !before || !after || !resize || (kind === 'depth' && !depth)) return undefined;
      return {
        name,
        kind,
        template,
        ...(channel !== undefined ? { channel } : {}),
        offset,
        before,
        after,
        invert: inv ? inv.scalar === true : false,
        ...(depth ? { depth } : {}),
        resize,
        at: pathField!.loc,
        atPath: pathField!.path,
      } satisfies ResolvedMatte;
    });
    return out.every((x) => x !== undefined) ? (out as ResolvedMatte[]) : undefined;
  }

  shutter(f: Field): ShutterSettings | undefined {
    const m = f.map('{angle, samples, phase}');
    if (!m) return undefined;
    const a = m.get('angle');
    const angleDeg = a ? a.number({ min: 0, max: 360 }) : 180;
    const sm = m.get('samples');
    const samples = sm ? sm.number({ integer: true, min: 1, max: 256 }) : 8;
    const ph = m.get('phase');
    const phaseDeg = ph ? ph.number({ min: -360, max: 360 }) : angleDeg === undefined ? 0 : -angleDeg / 2;
    m.finish();
    if (angleDeg === undefined || samples === undefined || phaseDeg === undefined) return undefined;
    return { angleDeg, samples, phaseDeg };
  }

  output(f: Field): ResolvedOutput | undefined {
    const m = f.map();
    if (!m) return undefined;
    const pathField = m.require('path', 'a frame-path template such as render/shot.####.png');
    const formatField = m.get('format');
    const format = formatField ? formatField.oneOf(['png16', 'png8', 'exr'] as const) : 'png16';
    const tf = m.get('transfer');
    const transfer = tf ? tf.oneOf(['srgb', 'linear'] as const) : format === 'exr' ? 'linear' : 'srgb';
    if (format === 'exr' && transfer === 'srgb') tf!.error('OpenEXR files are scene-linear: give transfer: linear, or leave it out');
    const ef = m.get('exr');
    let exr: ResolvedOutput['exr'] | undefined = { type: 'half', compression: 'zip' };
    if (ef) {
      const em = ef.map('{type: half | float, compression: none | zips | zip}');
      const t = em?.get('type');
      const c = em?.get('compression');
      const type = t ? t.oneOf(['half', 'float'] as const) : 'half';
      const compression = c ? c.oneOf(['none', 'zips', 'zip'] as const) : 'zip';
      em?.finish();
      exr = em && type && compression ? { type, compression } : undefined;
      if (format !== 'exr') ef.error('exr settings need format: exr');
    }
    const af = m.get('alpha');
    const alpha = af ? af.oneOf(['none', 'premultiplied', 'emission'] as const) : 'none';
    if (alpha === 'emission' && format !== 'exr') af!.error('alpha: emission needs format: exr (PNG stores straight alpha, so light under a zero alpha would be lost)');
    const pf = m.get('passes');
    const passes = pf ? pf.oneOf(['combined', 'separate'] as const) : 'combined';
    m.finish();
    const rel = pathField?.string('a frame-path template such as render/shot.####.png');
    let template: string | undefined;
    if (rel !== undefined) {
      const problem = checkOutputTemplate(rel, format ?? 'png16');
      if (problem) pathField!.error(problem);
      else template = path.resolve(this.dir, rel);
    }
    if (!template || !format || !transfer || !alpha || !passes || !exr) return undefined;
    if (format === 'exr' && transfer === 'srgb') return undefined;
    if (alpha === 'emission' && format !== 'exr') return undefined;
    return { template, format, transfer, alpha, passes, exr };
  }
}

/** A problem with an output template for a format, or undefined when it is fine. */
export function checkOutputTemplate(template: string, format: string): string | undefined {
  const t = parseFrameTemplate(template);
  if (typeof t === 'string') return t;
  if (/[#%]/.test(path.dirname(template))) return 'put the frame-number placeholder in the file name, not a folder';
  const ext = path.extname(template).toLowerCase();
  const wanted = format.startsWith('png') ? '.png' : `.${format}`;
  if (ext !== wanted) return `the file name must end in ${wanted} for format ${format}, found "${ext || 'no extension'}"`;
  return undefined;
}
