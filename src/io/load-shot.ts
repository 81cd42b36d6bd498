// Reading a shot file from disk: the file-system edge of shot/resolve.

import { readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'yaml';
import { readScene, type SceneResult } from './scene-read.js';
import { InputError, ShotError, whyNotReadable } from '../errors.js';
import { checkMattes } from './matte-provider.js';
import { resolveShot } from '../shot/resolve.js';
import { presetNames, presetPath } from './presets.js';
import type { ResolvedShot } from '../shot/types.js';

/** Shot and track files larger than this are refused before parsing. */
export const MAX_INPUT_BYTES = 64 * 1024 * 1024;

export function readTextFile(file: string): string {
  const st = statSync(file);
  if (!st.isFile()) throw Object.assign(new Error(`${file} is not a file`), { code: 'EISDIR' });
  if (st.size > MAX_INPUT_BYTES) throw Object.assign(new Error(`${file} is larger than ${MAX_INPUT_BYTES} bytes`), { code: 'EFBIG' });
  return readFileSync(file, 'utf8');
}

/**
 * Read, check and resolve a shot file, with the glTF scene its camera names (read first: reading
 * a scene is asynchronous, resolving is not). `onRead` hears every file the shot reads (the shot,
 * its tracks, lens file and scene), also when it is refused: what a watcher should watch.
 */
export async function loadShot(file: string, opts: { onRead?: (absolutePath: string) => void } = {}): Promise<ResolvedShot> {
  const heard = opts.onRead ?? (() => {});
  heard(path.resolve(file));
  let text: string;
  try {
    text = readTextFile(file);
  } catch (e) {
    throw new InputError(`${file}: cannot read the shot file: ${whyNotReadable(e)}`);
  }
  if (text.includes('\u0000') || text.includes('\ufffd')) {
    throw new InputError(`${file}: not a text file (a YAML shot file was expected)`);
  }
  // messages name the shot as the user wrote it
  const scenes = await preloadScenes(text, file, heard);
  const readText = (abs: string) => {
    heard(abs);
    return readTextFile(abs);
  };
  const shot = resolveShot(text, file, { readText, presetNames, presetPath, scene: (abs) => scenes.get(abs) });
  const problems = checkMattes(shot);
  if (problems.length) throw new ShotError(problems);
  return shot;
}

/** The scene the shot's camera names, read (or the reason it cannot be), by absolute path. */
async function preloadScenes(text: string, file: string, heard: (abs: string) => void): Promise<Map<string, SceneResult>> {
  const out = new Map<string, SceneResult>();
  let doc: unknown;
  try {
    doc = parse(text);
  } catch {
    return out; // the resolver reports the YAML problem with its place
  }
  const cam = (doc as { camera?: { scene?: unknown; animation?: unknown } } | null)?.camera;
  if (!cam || typeof cam !== 'object' || typeof cam.scene !== 'string' || !/\.(glb|gltf)$/i.test(cam.scene)) return out;
  const abs = path.resolve(path.dirname(path.resolve(file)), cam.scene);
  heard(abs);
  out.set(abs, await readScene(abs, typeof cam.animation === 'string' ? cam.animation : undefined));
  return out;
}
