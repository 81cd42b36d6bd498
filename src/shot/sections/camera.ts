// The shot's `camera`: a camera node of a glTF 2.0 scene, or keys in the shot (position, rotation
// or a point looked at, focal length); with how scene time maps onto shot frames, the sensor
// width for reports and the illuminance drawn at 0 stops for scene lights.

import path from 'node:path';
import { nodeChain } from '../../scene/sample.js';
import type { ResolvedCamera } from '../../scene/camera.js';
import type { NodeChain, SceneCamera } from '../../scene/types.js';
import { frameRateValue, type FrameRate } from '../../timeline/frame-rate.js';
import type { PathShape } from '../../timeline/track.js';
import type { Field, MapField } from '../source.js';
import type { ResolveContext, ShotScene } from './context.js';
import { MAX_WORLD, scalarKeys, vec3Keys } from './keys.js';

export function resolveCamera(ctx: ResolveContext, f: Field, rate: FrameRate | undefined, lensSensorMm: number | undefined): { camera: ResolvedCamera; scene?: ShotScene } | undefined {
  const m = f.map('a camera: {scene: FILE, node: NAME} or keys {position, rotation or look_at, focal_length}');
  if (!m) return undefined;
  const sceneField = m.get('scene');
  const offField = m.get('scene_frame_offset');
  const frameOffset = offField ? offField.number({ min: -1e9, max: 1e9 }) : 0;
  const rateField = m.get('scene_rate');
  const sceneRate = rateField ? rateField.number({ min: 0, minExclusive: true, max: 1000 }) : rate ? frameRateValue(rate) : 24;
  const swField = m.get('sensor_width');
  const sensorWidthMm = swField ? swField.number({ min: 0, minExclusive: true, max: 1000 }) : (lensSensorMm ?? 36);
  const wlField = m.get('white_lux');
  const whiteLux = wlField ? wlField.number({ min: 0, minExclusive: true, max: 1e9 }) : 1;
  const common = frameOffset === undefined || sceneRate === undefined || sensorWidthMm === undefined || whiteLux === undefined ? undefined : { frameOffset, sceneRate, sensorWidthMm, whiteLux };
  const keyed = ['position', 'rotation', 'look_at', 'roll', 'focal_length', 'path'].filter((k) => m.has(k));
  if (sceneField) {
    for (const k of keyed) m.get(k)!.error(`"${k}" is for a camera given by keys; this camera comes from its scene`);
    const out = sceneCamera(ctx, m, sceneField);
    m.finish();
    return out && common && keyed.length === 0 ? { camera: { ...common, ...out.camera }, scene: out.scene } : undefined;
  }
  for (const k of ['node', 'animation']) if (m.has(k)) m.get(k)!.error(`"${k}" picks from a scene file; give "scene" too, or drop it`);
  const pathField = m.get('path');
  const shape: PathShape | undefined = pathField ? pathField.oneOf(['linear', 'smooth'] as const) : 'smooth';
  const posField = m.get('position');
  const position = posField ? vec3Keys(ctx, posField, ['x', 'y', 'z'], { min: -MAX_WORLD, max: MAX_WORLD }, "the camera's position") : missing(m, 'position', 'the camera\'s position [x, y, z] in metres (or "scene": a glTF file)');
  const rotField = m.get('rotation');
  const lookField = m.get('look_at');
  const rollField = m.get('roll');
  let aim: Extract<ResolvedCamera, { kind: 'keys' }>['aim'] | undefined;
  if (rotField && lookField) {
    lookField.error('a camera is aimed by "rotation" or by "look_at", not both');
  } else if (rotField) {
    if (rollField) rollField.error('roll is part of "rotation" [pan, tilt, roll]; "roll" goes with "look_at"');
    const rotation = vec3Keys(ctx, rotField, ['pan', 'tilt', 'roll'], { min: -36000, max: 36000 }, "the camera's rotation in degrees");
    aim = rotation ? { rotation } : undefined;
  } else if (lookField) {
    const lookAt = vec3Keys(ctx, lookField, ['x', 'y', 'z'], { min: -MAX_WORLD, max: MAX_WORLD }, 'the point the camera looks at');
    const roll = rollField ? scalarKeys(ctx, rollField, 'value', { min: -36000, max: 36000 }) : [{ frame: 0, value: 0, ease: { kind: 'linear' as const } }];
    aim = lookAt && roll ? { lookAt, roll } : undefined;
  } else {
    m.reportMissing('rotation', '"rotation" [pan, tilt, roll] in degrees, or "look_at" [x, y, z]');
  }
  const flField = m.get('focal_length');
  const focalMm = flField ? scalarKeys(ctx, flField, 'value', { min: 0.1, max: 10000 }) : missing(m, 'focal_length', 'the focal length in mm (with sensor_width, the field of view)');
  m.finish();
  if (!common || !shape || !position || !aim || !focalMm) return undefined;
  return { camera: { ...common, kind: 'keys', source: 'keys in the shot', path: shape, position, aim, focalMm } };
}

function sceneCamera(ctx: ResolveContext, m: MapField, sceneField: Field): { camera: { kind: 'scene'; source: string; chain: NodeChain; camera: SceneCamera }; scene: ShotScene } | undefined {
  const rel = sceneField.string('a path to a glTF 2.0 scene (.glb or .gltf)');
  const nodeField = m.get('node');
  const nodeName = nodeField?.string("the name of the camera's node");
  const animField = m.get('animation');
  animField?.string("the name of one of the scene's animations");
  if (rel === undefined) return undefined;
  if (!/\.(glb|gltf)$/i.test(rel)) return sceneField.error(`expected a glTF 2.0 scene (.glb or .gltf), found "${rel}"`);
  const abs = path.resolve(ctx.dir, rel);
  const shown = path.isAbsolute(rel) ? rel : path.join(ctx.shownDir, rel);
  const got = ctx.reader.scene?.(abs);
  if (!got) return sceneField.error(`cannot read scene ${shown}: it was not loaded (use loadShot, which reads scenes)`);
  if ('error' in got) return got.animation && animField ? animField.error(`${got.error} in ${shown}`) : sceneField.error(`cannot read scene ${shown}: ${got.error}`);
  const data = got.scene;
  const camNodes = Object.keys(data.cameras).map(Number);
  const listed = camNodes.map((i) => data.nodes[i].name || `#${i}`).join(', ');
  if (camNodes.length === 0) return sceneField.error(`scene ${shown} holds no camera`);
  let index: number;
  if (nodeName === undefined) {
    if (nodeField) return undefined;
    if (camNodes.length > 1) return missing(m, 'node', `the camera's node: the scene has ${camNodes.length} cameras (${listed})`);
    index = camNodes[0];
  } else {
    const named = data.nodes.map((n, i) => (n.name === nodeName ? i : -1)).filter((i) => i >= 0);
    if (named.length === 0) return nodeField!.error(`no node named "${nodeName}" in ${shown} (cameras: ${listed})`);
    if (named.length > 1) return nodeField!.error(`${named.length} nodes are named "${nodeName}" in ${shown}; rename one`);
    index = named[0];
    if (!data.cameras[index]) return nodeField!.error(`node "${nodeName}" in ${shown} carries no camera (cameras: ${listed})`);
  }
  const camera = data.cameras[index];
  if (camera.type === 'orthographic') {
    return (nodeField ?? sceneField).error(`the camera of node "${data.nodes[index].name}" is orthographic; straylight projects through perspective cameras only (a lens flare needs a field angle)`);
  }
  if (!(camera.yfov > 0 && camera.yfov < Math.PI)) return (nodeField ?? sceneField).error(`the camera of node "${data.nodes[index].name}" has a field of view of ${camera.yfov} rad; expected between 0 and pi`);
  const nodeLabel = data.nodes[index].name || `#${index}`;
  return { camera: { kind: 'scene', source: `${shown} node ${nodeLabel}`, chain: nodeChain(data, index), camera }, scene: { data, shown } };
}

function missing(m: MapField, key: string, what: string): undefined {
  m.reportMissing(key, what);
  return undefined;
}
