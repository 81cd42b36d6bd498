// Reading a glTF 2.0 scene (.glb or .gltf with its buffers) with glTF-Transform and the
// KHR_lights_punctual extension, into straylight's plain scene form (scene/types.ts): every node's
// rest transform and animation channels, the cameras and the lights. Meshes and materials are
// not kept. Problems come back as one plain sentence, never the library's own message.

import { statSync } from 'node:fs';
import { NodeIO, type Accessor, type AnimationSampler, type Node, type Root } from '@gltf-transform/core';
import { KHRLightsPunctual, type Light } from '@gltf-transform/extensions';
import { whyNotReadable } from '../errors.js';
import type { SceneCamera, SceneData, SceneLight, SceneNode, SceneSampler, Vec3, Quat } from '../scene/types.js';

/** Scene files larger than this are refused before parsing. */
export const MAX_SCENE_BYTES = 512 * 1024 * 1024;

/** A scene, or why not; `animation` marks a problem with the animation the shot named. */
export type SceneResult = { scene: SceneData } | { error: string; animation?: true };

/** Read a scene file; `animation` picks one of its animations by name (default: all of them together). */
export async function readScene(file: string, animation?: string): Promise<SceneResult> {
  try {
    const st = statSync(file);
    if (!st.isFile()) return { error: 'not a file' };
    if (st.size > MAX_SCENE_BYTES) return { error: `larger than ${MAX_SCENE_BYTES} bytes` };
  } catch (e) {
    return { error: whyNotReadable(e) };
  }
  let doc;
  try {
    const io = new NodeIO().registerExtensions([KHRLightsPunctual]);
    doc = await io.read(file);
  } catch (e) {
    return { error: explain(e, file) };
  }
  try {
    return toScene(doc.getRoot(), animation);
  } catch (e) {
    return { error: `not a usable glTF 2.0 scene (${e instanceof SceneProblem ? e.message : 'its data could not be read'})` };
  }
}

class SceneProblem extends Error {}

function explain(e: unknown, file: string): string {
  const msg = e instanceof Error ? e.message : String(e);
  const code = (e as { code?: string }).code;
  if (code === 'ENOENT') return /\.bin|buffer|uri/i.test(msg) ? 'a buffer or image file it names is missing' : 'no such file';
  if (code) return whyNotReadable(e);
  const ext = /Missing required extension[^"']*["']?([A-Za-z0-9_]+)/i.exec(msg);
  if (ext) return `it requires the glTF extension ${ext[1]}, which straylight does not read (export the scene without it)`;
  if (/\.glb$/i.test(file)) return 'not a glTF 2.0 binary (.glb) file, or a damaged one';
  return 'not a glTF 2.0 file, or a damaged one';
}

function toScene(root: Root, animation?: string): SceneResult {
  const list = root.listNodes();
  const index = new Map<Node, number>(list.map((n, i) => [n, i]));
  const nodes: SceneNode[] = list.map((n) => ({
    name: n.getName(),
    parent: -1,
    translation: [...n.getTranslation()] as Vec3,
    rotation: [...n.getRotation()] as Quat,
    scale: [...n.getScale()] as Vec3,
    anim: {},
  }));
  list.forEach((n, i) => {
    for (const c of n.listChildren()) nodes[index.get(c)!].parent = i;
  });
  const cameras: Record<number, SceneCamera> = {};
  const lights: Record<number, SceneLight> = {};
  list.forEach((n, i) => {
    const cam = n.getCamera();
    if (cam) {
      const ar = cam.getAspectRatio();
      cameras[i] = { type: cam.getType() === 'orthographic' ? 'orthographic' : 'perspective', yfov: cam.getYFov(), ...(ar ? { aspectRatio: ar } : {}) };
    }
    const l = n.getExtension<Light>('KHR_lights_punctual');
    if (l) {
      const range = l.getRange();
      const type = l.getType();
      lights[i] = {
        type: type === 'spot' ? 'spot' : type === 'directional' ? 'directional' : 'point',
        colour: [...l.getColor()] as Vec3,
        intensity: l.getIntensity(),
        ...(range !== null && range !== undefined && range > 0 ? { range } : {}),
        innerCone: l.getInnerConeAngle(),
        outerCone: l.getOuterConeAngle(),
      };
    }
  });
  const animations = root.listAnimations();
  const names = animations.map((a, i) => a.getName() || `#${i}`);
  if (animation !== undefined && !names.includes(animation)) {
    return { error: `no animation named "${animation}" (animations: ${names.join(', ') || 'none'})`, animation: true };
  }
  const by = new Map<string, string>();
  let duration = 0;
  animations.forEach((a, ai) => {
    if (animation !== undefined && names[ai] !== animation) return;
    for (const ch of a.listChannels()) {
      const target = ch.getTargetNode();
      const p = ch.getTargetPath();
      const smp = ch.getSampler();
      if (!target || !smp || (p !== 'translation' && p !== 'rotation' && p !== 'scale')) continue;
      const ni = index.get(target)!;
      const key = `${ni}/${p}`;
      if (by.has(key)) {
        throw new SceneProblem(`node "${nodes[ni].name}" is animated by both "${by.get(key)}" and "${names[ai]}"; pick one with camera.animation`);
      }
      by.set(key, names[ai]);
      const s = sampler(smp, p === 'rotation' ? 4 : 3);
      nodes[ni].anim[p] = s;
      duration = Math.max(duration, s.times[s.times.length - 1] ?? 0);
    }
  });
  return { scene: { nodes, cameras, lights, duration } };
}

function sampler(smp: AnimationSampler, size: 3 | 4): SceneSampler {
  const input = smp.getInput();
  const output = smp.getOutput();
  if (!input || !output) throw new SceneProblem('an animation sampler has no keys');
  const times = Array.from(elements(input, 1));
  const values = Array.from(elements(output, size));
  const interp = smp.getInterpolation();
  const interpolation = interp === 'STEP' || interp === 'CUBICSPLINE' ? interp : 'LINEAR';
  const per = (interpolation === 'CUBICSPLINE' ? 3 : 1) * size;
  if (times.length === 0 || values.length !== times.length * per) throw new SceneProblem('an animation sampler does not have one value per key time');
  for (let i = 1; i < times.length; i++) if (!(times[i] > times[i - 1])) throw new SceneProblem('animation key times must increase');
  if (!times.every(Number.isFinite) || !values.every(Number.isFinite)) throw new SceneProblem('an animation holds a value that is not a finite number');
  return { interpolation, times, values, size };
}

/** The accessor's values, de-normalised (glTF allows normalised integers for rotations). */
function elements(a: Accessor, size: number): Float64Array {
  const n = a.getCount();
  const out = new Float64Array(n * size);
  const el: number[] = [];
  for (let i = 0; i < n; i++) {
    a.getElement(i, el);
    for (let c = 0; c < size; c++) out[i * size + c] = el[c];
  }
  return out;
}
