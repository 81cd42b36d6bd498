// Shot file (YAML text) -> ResolvedShot. Every problem is collected with file:line:col and key
// path before anything fails; unknown keys are errors with a "did you mean" hint. Each section of
// the shot has its resolver in sections/ (frame and shutter, lights, flare, lens, mattes, output,
// and the keyed values and colours they share); this module assembles them and checks what
// crosses sections (a light's mattes exist; depth where a depth matte covers it).

import path from 'node:path';
import { ShotError, type Diagnostic } from '../errors.js';
import { MapField, parseYamlSource, type Field } from './source.js';
import type { ElementControl, ElementName, ResolvedShot } from './types.js';
import type { ResolveContext, ShotReader } from './sections/context.js';
import { DEFAULT_DUST, DEFAULT_GHOSTS, DEFAULT_GLOW, DEFAULT_STARBURST, DEFAULT_STREAK, elementControl, resolveFlare } from './sections/flare.js';
import { resolveFrame, resolveShutter } from './sections/frame.js';
import { resolveLens } from './sections/lens.js';
import { resolveCamera } from './sections/camera.js';
import { resolveLights } from './sections/lights.js';
import { resolveMattes } from './sections/mattes.js';
import { resolveOutput } from './sections/output.js';

export { MAX_COORD_PX, MAX_FRAMES, MAX_SIDE_PX, type ShotReader } from './sections/context.js';
export { DEFAULT_DUST, DEFAULT_GHOSTS, DEFAULT_GLOW, DEFAULT_STARBURST, DEFAULT_STREAK } from './sections/flare.js';
export { DEFAULT_RADIUS_PX } from './sections/lights.js';
export { checkOutputTemplate } from './sections/output.js';

export function resolveShot(text: string, file: string, reader: ShotReader): ResolvedShot {
  const absFile = path.resolve(file);
  const { ctx: source, root } = parseYamlSource(text, file);
  if (!root) throw new ShotError(source.diagnostics);
  const ctx: ResolveContext = { diagnostics: source.diagnostics, dir: path.dirname(absFile), shownDir: path.dirname(file), reader };
  const shot = resolveShotRoot(ctx, root, absFile);
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

function resolveShotRoot(ctx: ResolveContext, root: Field, absFile: string): ResolvedShot | undefined {
  const m = root.map('a mapping with version, frame, lights and output');
  if (!m) return undefined;
  const version = m.require('version', 'the shot-file format version, 1');
  if (version && version.scalar !== 1) version.expected('version 1');
  const frameField = m.require('frame', 'size, rate and frame range');
  const frame = frameField ? resolveFrame(ctx, frameField) : undefined;
  const seedField = m.get('seed');
  const seed = seedField ? seedField.number({ integer: true, min: 0, max: 2 ** 32 - 1 }) : 0;
  const lensField = m.get('lens');
  const lens = lensField ? resolveLens(ctx, lensField) : undefined;
  const cameraField = m.get('camera');
  const cam = cameraField ? resolveCamera(ctx, cameraField, frame?.rate, lens?.model.sensorWidthMm) : undefined;
  if (cam?.scene) ctx.scene = cam.scene;
  const lightsField = m.require('lights', 'a list of the lights in the shot');
  const lights = lightsField ? resolveLights(ctx, lightsField) : undefined;
  const mattesField = m.get('mattes');
  const mattes = mattesField ? resolveMattes(ctx, mattesField) : [];
  const shutterField = m.get('shutter');
  const shutter = shutterField ? resolveShutter(ctx, shutterField) : { angleDeg: 0, samples: 1, phaseDeg: 0, method: 'smear' as const };
  const flareField = m.get('flare');
  const allOn = () => Object.fromEntries((['core', 'glow', 'ghosts', 'starburst', 'veil', 'streak', 'dust'] as ElementName[]).map((n) => [n, elementControl(ctx, undefined)!])) as Record<ElementName, ElementControl>;
  const flare = flareField ? resolveFlare(ctx, flareField, lens) : { glow: DEFAULT_GLOW, ghosts: DEFAULT_GHOSTS, starburst: DEFAULT_STARBURST, veil: { fraction: 0 }, streak: DEFAULT_STREAK, streakGiven: false, dust: DEFAULT_DUST, dustSeedGiven: false, elements: allOn() };
  const outField = m.require('output', 'where and how frames are written');
  const output = outField ? resolveOutput(ctx, outField) : undefined;
  m.finish();
  if (!frame || !lights || !output || !flare || seed === undefined || (lensField && !lens) || (cameraField && !cam) || !mattes || !shutter) return undefined;
  // lights name existing mattes, and have a depth where a depth matte can cover them
  const names = new Set(mattes.map((x) => x.name));
  let ok = true;
  const lightFields = lightsField!.list()!;
  lights.forEach((l, i) => {
    const lf = lightFields[i];
    const lm = new MapField(lf);
    if (!lm.has('occluded_by')) l.occludedBy = [...names];
    for (const n of l.occludedBy) {
      if (!names.has(n)) {
        ok = false;
        lm.get('occluded_by')!.error(`no matte named "${n}" (mattes: ${[...names].join(', ') || 'none'})`);
      }
    }
    if (l.world && !cam) {
      ok = false;
      lf.error(`the light "${l.name}" is placed in the world; the shot needs a camera to see it through (camera: {scene: FILE} or camera keys)`);
    }
    // a light in the world has its depth from the camera (unless the shot gives one)
    const needsDepth = mattes.some((x) => x.kind === 'depth' && l.occludedBy.includes(x.name));
    if (needsDepth && !l.depth && !l.world) {
      ok = false;
      lf.error(`missing key "depth" (the light's distance, in the depth matte's units, for the depth matte${mattes.filter((x) => x.kind === 'depth').length > 1 ? 's' : ''})`);
    }
  });
  // an anamorphic lens streaks unless the shot says otherwise
  const streak = flare.streakGiven || !lens || lens.model.squeeze === 1 ? flare.streak : { ...flare.streak, fraction: 0.02 };
  const dust = { ...flare.dust, seed: flare.dustSeedGiven ? flare.dust.seed : seed };
  // a light's own flare block: the shot's settings with the light's keys on top
  const base = { ...flare, streak, dust, streakGiven: true, dustSeedGiven: true };
  lights.forEach((l, i) => {
    const ff = new MapField(lightFields[i]).get('flare');
    if (!ff) return;
    const own = resolveFlare(ctx, ff, lens, base);
    if (!own) {
      ok = false;
      return;
    }
    l.flare = { glow: own.glow, ghosts: own.ghosts, starburst: own.starburst, veil: own.veil, streak: own.streak, dust: own.dust, elements: own.elements };
  });
  if (!ok) return undefined;
  return {
    version: 1,
    file: absFile,
    frame,
    seed,
    lights,
    glow: flare.glow,
    ...(lens ? { lens } : {}),
    ...(cam ? { camera: cam.camera } : {}),
    ghosts: flare.ghosts,
    starburst: flare.starburst,
    veil: flare.veil,
    streak,
    dust,
    elements: flare.elements,
    mattes,
    shutter,
    output,
  };
}