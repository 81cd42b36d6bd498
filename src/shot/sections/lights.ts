// The shot's `lights`: each light's name, position keys or track file, intensity, colour, disk,
// occlusion settings and depth.

import path from 'node:path';
import { whyNotReadable } from '../../errors.js';
import { LINEAR } from '../../timeline/easing.js';
import type { Vec2 } from '../../timeline/path.js';
import type { Key, PathShape } from '../../timeline/track.js';
import { MapField, type Field } from '../source.js';
import { parseTrackCsv } from '../track-csv.js';
import type { IntensityUnit, ResolvedLight } from '../types.js';
import { MAX_LIGHTS, type ResolveContext } from './context.js';
import { positionKeys, resolveColour, scalarKeys } from './keys.js';

export const DEFAULT_RADIUS_PX = 4;

export function resolveLights(ctx: ResolveContext, f: Field): ResolvedLight[] | undefined {
  const items = f.list('a list of lights');
  if (!items) return undefined;
  if (items.length === 0) return f.error('expected at least one light, found an empty list');
  if (items.length > MAX_LIGHTS) return f.error(`a shot holds at most ${MAX_LIGHTS} lights, found ${items.length}; split the lights over several shots and add their passes`);
  const names = new Set<string>();
  const out = items.map((item) => {
    const light = resolveLight(ctx, item);
    if (light) {
      if (names.has(light.name)) new MapField(item).get('name')!.error(`the name "${light.name}" is already used by another light`);
      names.add(light.name);
    }
    return light;
  });
  return out.every((l) => l !== undefined) ? (out as ResolvedLight[]) : undefined;
}

export function resolveLight(ctx: ResolveContext, f: Field): ResolvedLight | undefined {
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
    position = positionKeys(ctx, posField);
  } else if (trackField) {
    trackSource = trackField;
    const t = resolveTrack(ctx, trackField, unit ? intensityRule : undefined);
    position = t?.position;
    trackIntensity = t?.intensity;
  } else {
    m.reportMissing('position', '"position" (pixel position keys) or "track" (a frame,x,y CSV file)');
  }

  const intField = m.get('intensity');
  let intensity: Key<number>[] | undefined;
  if (intField) {
    if (trackIntensity) intField.error(`intensity is given here and in the track file's intensity column; keep one`);
    intensity = scalarKeys(ctx, intField, 'value', intensityRule);
  } else if (trackIntensity) {
    intensity = trackIntensity;
  } else if (trackSource || posField) {
    m.reportMissing('intensity', "stops over the frame's white, or a linear multiplier with intensity_unit: linear");
  }

  const colourField = m.get('colour');
  const colour = colourField ? resolveColour(ctx, colourField) : { rgb: [1, 1, 1] as [number, number, number], spec: { kelvin: 6504 } };
  const radiusField = m.get('radius');
  const radiusPx = radiusField ? radiusField.number({ min: 0, minExclusive: true, max: 10_000 }) : DEFAULT_RADIUS_PX;
  const occField = m.get('occluded_by');
  const occludedBy = occField ? occField.list('a list of matte names')?.map((x) => x.string('a matte name')) : [];
  const depthField = m.get('depth');
  const depth = depthField ? scalarKeys(ctx, depthField, 'value', { min: 0, max: 1e12 }) : undefined;
  const offField = m.get('off_frame');
  const offFrame = offField ? offField.oneOf(['clear', 'hold', 'hidden'] as const) : 'clear';
  // a light's own flare block is read once the shot's flare is known (resolve.ts)
  m.get('flare');
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

export function resolveTrack(ctx: ResolveContext, f: Field, intensityRule: { min: number; max: number } | undefined): { position: Key<Vec2>[]; intensity?: Key<number>[] } | undefined {
  const rel = f.string('a path to a frame,x,y[,intensity] CSV file');
  if (rel === undefined) return undefined;
  const abs = path.resolve(ctx.dir, rel);
  let text: string;
  try {
    text = ctx.reader.readText(abs);
  } catch (e) {
    return f.error(`cannot read track file ${abs}: ${whyNotReadable(e)}`);
  }
  const shown = path.isAbsolute(rel) ? rel : path.join(ctx.shownDir, rel);
  const csv = parseTrackCsv(text, shown, ctx.diagnostics);
  if (!csv) return undefined;
  const position = csv.rows.map((r) => ({ frame: r.frame, value: [r.x, r.y] as Vec2, ease: LINEAR }));
  if (!csv.hasIntensity || !intensityRule) return { position };
  const bad = csv.rows.find((r) => r.intensity! < intensityRule.min || r.intensity! > intensityRule.max);
  if (bad) return f.error(`track intensity ${bad.intensity} at frame ${bad.frame} is outside ${intensityRule.min} to ${intensityRule.max}`);
  return { position, intensity: csv.rows.map((r) => ({ frame: r.frame, value: r.intensity!, ease: LINEAR })) };
}
