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
import { MAX_WORLD, positionKeys, resolveColour, scalarKeys, vec3Keys, keyList } from './keys.js';
import { luminance } from '../../colour/srgb.js';
import { nodeChain } from '../../scene/sample.js';
import type { WorldPlacement } from '../../scene/camera.js';
import type { SceneLight } from '../../scene/types.js';

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

  const placementKeys = ['position', 'track', 'position_3d', 'direction', 'from_scene'].filter((k) => m.has(k));
  const posField = m.get('position');
  const trackField = m.get('track');
  const p3Field = m.get('position_3d');
  const dirField = m.get('direction');
  const sceneField = m.get('from_scene');
  let position: Key<Vec2>[] | undefined;
  let world: WorldPlacement | undefined;
  let trackIntensity: Key<number>[] | undefined;
  let sceneLight: SceneLight | undefined;
  if (placementKeys.length > 1) {
    m.get(placementKeys[1])!.error(`a light is placed by one of position, track, position_3d, direction or from_scene; found ${placementKeys.join(' and ')}`);
  } else if (posField) {
    position = positionKeys(ctx, posField);
  } else if (trackField) {
    const t = resolveTrack(ctx, trackField, unit ? intensityRule : undefined);
    position = t?.position;
    trackIntensity = t?.intensity;
  } else if (p3Field) {
    const keys = vec3Keys(ctx, p3Field, ['x', 'y', 'z'], { min: -MAX_WORLD, max: MAX_WORLD }, "the light's position in the world");
    if (keys && shape) world = { kind: 'point', path: shape, position: keys };
  } else if (dirField) {
    const keys = directionKeys(ctx, dirField);
    if (keys) world = { kind: 'direction', direction: keys };
  } else if (sceneField) {
    world = sceneNode(ctx, sceneField);
    if (world?.kind === 'scene') sceneLight = world.light;
  } else {
    m.reportMissing('position', '"position" (pixel position keys), "track" (a frame,x,y CSV file), or a place in the world: "position_3d", "direction" or "from_scene"');
  }
  if (world) position = [];

  const intField = m.get('intensity');
  let intensity: Key<number>[] | undefined;
  if (intField) {
    if (trackIntensity) intField.error(`intensity is given here and in the track file's intensity column; keep one`);
    intensity = scalarKeys(ctx, intField, 'value', intensityRule);
  } else if (trackIntensity) {
    intensity = trackIntensity;
  } else if (sceneLight) {
    // the scene's own level, with no trim
    intensity = [{ frame: 0, value: unit === 'linear' ? 1 : 0, ease: LINEAR }];
  } else if (placementKeys.length === 1 && (!sceneField || world)) {
    // (a node not found in the scene is the one problem to report)
    m.reportMissing('intensity', "stops over the frame's white, or a linear multiplier with intensity_unit: linear");
  }

  const colourField = m.get('colour');
  const colour = colourField ? resolveColour(ctx, colourField) : sceneLight ? sceneColour(sceneLight, sceneField!) : { rgb: [1, 1, 1] as [number, number, number], spec: { kelvin: 6504 } };
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
    ...(world ? { world } : {}),
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

/**
 * A direction towards a light at infinity: {azimuth, elevation} in degrees (azimuth from -Z, the
 * way an unturned camera looks, towards +X; elevation up from the horizontal), a vector [x, y, z],
 * or keys {frame, azimuth, elevation, ease}. Kept as unit vectors.
 */
function directionKeys(ctx: ResolveContext, f: Field): Key<readonly number[]>[] | undefined {
  const angles = (m: MapField): number[] | undefined => {
    const az = m.require('azimuth', 'degrees from -Z towards +X')?.number({ min: -36000, max: 36000 });
    const el = m.require('elevation', 'degrees above the horizontal')?.number({ min: -90, max: 90 });
    if (az === undefined || el === undefined) return undefined;
    const a = (az * Math.PI) / 180;
    const e = (el * Math.PI) / 180;
    return [Math.cos(e) * Math.sin(a), Math.sin(e), -Math.cos(e) * Math.cos(a)];
  };
  if (f.isMap()) {
    const m = f.map()!;
    const v = angles(m);
    m.finish();
    return v ? [{ frame: 0, value: v, ease: LINEAR }] : undefined;
  }
  const list = f.isSeq() ? f.list()! : undefined;
  if (list && list.length > 0 && list.every((x) => !x.isMap())) {
    if (list.length !== 3) return f.error(`expected {azimuth, elevation}, a vector [x, y, z] or keys {frame, azimuth, elevation}, found a list of ${list.length} values`);
    const v = f.numbers(3, { min: -MAX_WORLD, max: MAX_WORLD });
    if (!v) return undefined;
    const l = Math.hypot(v[0], v[1], v[2]);
    if (!(l > 0)) return f.error('expected a direction, found the zero vector');
    return [{ frame: 0, value: v.map((c) => c / l), ease: LINEAR }];
  }
  if (!list) return f.expected('{azimuth, elevation}, a vector [x, y, z] or keys {frame, azimuth, elevation}');
  return keyList(ctx, f, list, angles);
}

/** A node of the camera's scene: its place, and its KHR_lights_punctual light if it carries one. */
function sceneNode(ctx: ResolveContext, f: Field): WorldPlacement | undefined {
  const name = f.string("the name of a node in the camera's scene");
  if (name === undefined) return undefined;
  const scene = ctx.scene;
  if (!scene) return f.error('from_scene picks a node of the camera\'s scene, but the shot\'s camera names no scene (camera: {scene: FILE})');
  const named = scene.data.nodes.map((n, i) => (n.name === name ? i : -1)).filter((i) => i >= 0);
  const lit = Object.keys(scene.data.lights).map((i) => scene.data.nodes[Number(i)].name).filter(Boolean);
  if (named.length === 0) return f.error(`no node named "${name}" in ${scene.shown} (lights: ${lit.join(', ') || 'none'})`);
  if (named.length > 1) return f.error(`${named.length} nodes are named "${name}" in ${scene.shown}; rename one`);
  const light = scene.data.lights[named[0]];
  return { kind: 'scene', chain: nodeChain(scene.data, named[0]), nodeName: name, ...(light ? { light } : {}) };
}

function sceneColour(light: SceneLight, f: Field): { rgb: [number, number, number]; spec: ResolvedLight['colourSpec'] } | undefined {
  const lum = luminance(...light.colour);
  if (!(lum > 0)) return f.error(`the scene's light "${f.string()}" is black (colour ${light.colour.join(', ')}); give the light a colour`);
  return { rgb: [light.colour[0] / lum, light.colour[1] / lum, light.colour[2] / lum], spec: { rgb: light.colour.map((c) => Number(c.toPrecision(6))) as [number, number, number] } };
}
