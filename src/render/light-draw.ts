// One light drawn at one instant, and what that needs: the shot's precomputed assets (the
// prepared lens, the iris's kernel, the dust; built once and cached on the shot object), the
// mattes' coverage, each element's gain. renderFrame (render-frame.ts) calls it per shutter
// sample; the shutter's smear method (shutter-smear.ts) uses the same parts.

import { addDisk, diskFlux } from '../elements/core.js';
import { addGhosts, type GhostStats } from '../elements/ghosts/index.js';
import { addGlow } from '../elements/glow.js';
import { addStarburst } from '../elements/starburst.js';
import { addStreak } from '../elements/streak.js';
import { addDust, dustTexture } from '../elements/dust.js';
import { binSizeMm, starburstKernel, type StarburstKernel } from '../optics/diffraction.js';
import { MatteProvider } from '../io/matte-provider.js';
import { prepareLens, type LensSystem } from '../optics/ghost-system.js';
import { alphaCoverage, depthCoverage, diskVisibility, type CoverageLookup } from '../occlusion/visibility.js';
import { FloatImage } from '../raster/image.js';
import type { LightFlare, ResolvedLight, ResolvedShot } from '../shot/types.js';
import { evalScalar } from '../timeline/track.js';
import { lightState, type LightState } from './frame-state.js';
import { plateVisibility } from './plate-visibility.js';

/** What a shot needs precomputed before its frames render. */
export interface ShotAssets {
  lens?: LensSystem;
  /** the iris's diffraction kernel (one per shot: one iris) */
  starburst?: StarburstKernel;
  /** the lens-dirt texture at frame size */
  dust?: Float32Array;
}

/** Without a lens, the starburst and its scale come from a plain 6-blade 50 mm at f/8 on 36 mm. */
const DEFAULT_IRIS = { blades: 6, rotationDeg: 0, roundness: 0 };

const cache = new WeakMap<ResolvedShot, ShotAssets>();
const providers = new WeakMap<ResolvedShot, MatteProvider>();

/** Use assets built elsewhere (handed to a worker thread) instead of building them again. */
export function adoptShotAssets(shot: ResolvedShot, assets: ShotAssets): void {
  cache.set(shot, assets);
}

/**
 * What shotAssets builds from, as a string: two shots with the same key can share their assets
 * (the preview keeps them across reloads of a shot whose lens, iris and dust did not change).
 */
export function shotAssetsKey(shot: ResolvedShot): string {
  const uses = (on: (f: LightFlare) => boolean) => on(shot) || shot.lights.some((l) => l.flare && on(l.flare));
  return JSON.stringify([
    shot.lens && shot.ghosts.enabled ? [shot.lens.model, shot.ghosts.quality, shot.ghosts.threshold] : null,
    uses((f) => f.starburst.fraction > 0) ? (shot.lens?.model.iris ?? DEFAULT_IRIS) : null,
    uses((f) => f.dust.fraction > 0) ? [shot.frame.widthPx, shot.frame.heightPx, shot.dust.seed, shot.dust.density] : null,
  ]);
}

export function shotAssets(shot: ResolvedShot): ShotAssets {
  let a = cache.get(shot);
  if (!a) {
    a = shot.lens && shot.ghosts.enabled ? { lens: prepareLens(shot.lens.model, shot.ghosts.quality, shot.ghosts.threshold) } : {};
    // built when the shot or any light with flare settings of its own draws them
    const uses = (on: (f: LightFlare) => boolean) => on(shot) || shot.lights.some((l) => l.flare && on(l.flare));
    if (uses((f) => f.starburst.fraction > 0)) a.starburst = starburstKernel(shot.lens?.model.iris ?? DEFAULT_IRIS);
    if (uses((f) => f.dust.fraction > 0)) a.dust = dustTexture(shot.frame.widthPx, shot.frame.heightPx, shot.dust.seed, shot.dust.density);
    cache.set(shot, a);
  }
  return a;
}

/** The streak's default tint: the strongest ghost's coating tint at unit luminance (white without a lens). */
export function coatingTint(assets: ShotAssets): [number, number, number] {
  const t = assets.lens?.ranked[0]?.tint;
  if (!t) return [1, 1, 1];
  const y = 0.2126 * t[0] + 0.7152 * t[1] + 0.0722 * t[2];
  return y > 0 ? [t[0] / y, t[1] / y, t[2] / y] : [1, 1, 1];
}

export function matteProvider(shot: ResolvedShot): MatteProvider {
  let p = providers.get(shot);
  if (!p) {
    p = new MatteProvider();
    providers.set(shot, p);
  }
  return p;
}

/** The coverage lookups that apply to a light at time t (mattes of frame round(t)). */
export function coverageFor(shot: ResolvedShot, light: ResolvedLight, t: number, mattes: MatteProvider, state: LightState = lightState(shot, light, t)): CoverageLookup[] {
  const out: CoverageLookup[] = [];
  const frame = Math.round(t);
  for (const m of shot.mattes) {
    if (!light.occludedBy.includes(m.name)) continue;
    const img = mattes.image(m, frame);
    if (!img) continue;
    // a stretched matte maps onto the whole frame
    const sx = img.width / shot.frame.widthPx;
    const sy = img.height / shot.frame.heightPx;
    const scaled = sx === 1 && sy === 1 ? (f: CoverageLookup) => f : (f: CoverageLookup): CoverageLookup => (x, y) => f(x * sx, y * sy);
    if (m.kind === 'plate') {
      // the plate says how much of the light shows: the same share covered all over its disk
      const covered = 1 - plateVisibility(shot, light, m, frame, mattes);
      out.push(() => covered);
    } else if (m.kind === 'alpha') {
      out.push(scaled(alphaCoverage(img, m.invert, light.offFrame)));
    } else {
      // the shot's depth keys, or else the depth the camera sees the light at
      const depth = light.depth ? evalScalar(light.depth, t) : (state.depth ?? 0);
      out.push(scaled(depthCoverage(img, depth, m.depth!.tolerance, light.offFrame)));
    }
  }
  return out;
}

/** Each element's gain at time t (0 when switched off), and the per-ghost multipliers. */
export function elementGains(f: LightFlare, t: number) {
  const el = f.elements;
  const gain = (n: keyof typeof el) => (el[n].enabled ? evalScalar(el[n].gain, t) : 0);
  return {
    gCore: gain('core'),
    gGlow: gain('glow'),
    gGhosts: gain('ghosts'),
    gStar: gain('starburst'),
    gStreak: gain('streak'),
    gDust: gain('dust'),
    gVeil: gain('veil'),
    ghostPaths: ghostPathMultipliers(f, t),
  };
}

/**
 * The shot's per-ghost switches, gains and tints at time t, as addGhosts takes them (nothing when
 * the shot names no ghost): disabled ghosts get 0; with `solo`, only the listed ghosts are drawn.
 */
export function ghostPathMultipliers(settings: Pick<LightFlare, 'ghosts'>, t: number): { paths?: Map<string, [number, number, number]>; only?: boolean } {
  const { paths, solo } = settings.ghosts;
  const names = Object.keys(paths);
  if (names.length === 0 && solo.length === 0) return {};
  const out = new Map<string, [number, number, number]>();
  for (const name of new Set([...names, ...solo])) {
    const p = paths[name];
    if (!p) {
      out.set(name, [1, 1, 1]);
      continue;
    }
    const g = p.enabled ? evalScalar(p.gain, t) : 0;
    out.set(name, [p.tint[0] * g, p.tint[1] * g, p.tint[2] * g]);
  }
  if (solo.length > 0) for (const name of names) if (!solo.includes(name)) out.delete(name);
  return { paths: out, only: solo.length > 0 };
}

/** Visibility of a light at time t (1 without mattes). */
export function lightVisibility(shot: ResolvedShot, light: ResolvedLight, t: number, mattes: MatteProvider = matteProvider(shot), s: LightState = lightState(shot, light, t)): number {
  if (!s.placed) return 0;
  const lookups = coverageFor(shot, light, t, mattes, s);
  return diskVisibility(s.xPx, s.yPx, s.radiusPx, lookups, { limbDarkening: light.limbDarkening, pixelAspect: shot.frame.pixelAspect });
}


/** The frame being drawn: the image, and whether it is clear yet (a reused image is cleared by its first glow). */
export interface FrameTarget {
  img: FloatImage;
  clear: boolean;
}

export function ensureClear(target: FrameTarget): void {
  if (!target.clear) target.img.data.fill(0);
  target.clear = true;
}

/**
 * Draw one light as it is at time t, carrying `share` of the frame's exposure; its veil energy is
 * added to `veil` (the caller lifts the frame once per instant).
 */
export function drawLightAt(target: FrameTarget, shot: ResolvedShot, light: ResolvedLight, t: number, share: number, shotGains: ReturnType<typeof elementGains>, mattes: MatteProvider, veil: number[], stats?: GhostStats): void {
  const { widthPx, heightPx, pixelAspect, opticalCentre } = shot.frame;
  const assets = shotAssets(shot);
  const img = target.img;
  const sensorMm = shot.lens?.model.sensorWidthMm ?? 36;
  const fNumber = shot.lens ? evalScalar(shot.lens.fNumber, t) : 8;
  // a light with a flare block of its own is drawn with those settings (the shot's, its keys on top)
  const ls: LightFlare = light.flare ?? shot;
  const { gCore, gGlow, gGhosts, gStar, gStreak, gDust, gVeil, ghostPaths } = light.flare ? elementGains(light.flare, t) : shotGains;
  const s = lightState(shot, light, t);
  if (s.gain <= 0) return;
  const lookups = coverageFor(shot, light, t, mattes, s);
  const visibility = diskVisibility(s.xPx, s.yPx, s.radiusPx, lookups, { limbDarkening: light.limbDarkening, pixelAspect });
  const radiance: [number, number, number] = [s.radiance[0] * share, s.radiance[1] * share, s.radiance[2] * share];
  const disk = { xPx: s.xPx, yPx: s.yPx, radiusPx: s.radiusPx, radiance };
  // the disk itself is hidden pixel by pixel where the mattes cover it
  const clearAt = lookups.length ? (x: number, y: number) => lookups.reduce((c, f) => c * (1 - f(x, y)), 1) : undefined;
  // the glow first (it may clear the frame as it goes), then the disk over it
  const flux = diskFlux(disk).map((c) => c * visibility) as [number, number, number];
  const f = ls.glow.fraction * gGlow;
  if (visibility > 0 && f > 0) {
    addGlow(img, { xPx: s.xPx, yPx: s.yPx, energy: [flux[0] * f, flux[1] * f, flux[2] * f], sizePx: ls.glow.sizePx, falloff: ls.glow.falloff }, pixelAspect, !target.clear);
    target.clear = true;
  }
  ensureClear(target);
  if (gCore > 0) addDisk(img, { ...disk, radiance: [radiance[0] * gCore, radiance[1] * gCore, radiance[2] * gCore] }, pixelAspect, clearAt);
  if (visibility <= 0) return;
  if (assets.lens && gGhosts > 0) {
    // the ghosts' rays are traced through the hood: they take the light without its field share
    const ghostFlux = s.field === 1 ? flux : (flux.map((c) => c / s.field) as [number, number, number]);
    addGhosts(img, assets.lens, { widthPx, heightPx, pixelAspect, opticalCentre }, { xPx: s.xPx, yPx: s.yPx, flux: ghostFlux }, { fNumber, gain: ls.ghosts.gain * gGhosts, quality: shot.ghosts.quality, exposure: share, ...ghostPaths, ...(shot.ghosts.share ? { share: shot.ghosts.share } : {}) }, stats);
  }
  if (assets.starburst && gStar > 0) {
    const k = ls.starburst.fraction * gStar;
    const binPx = (binSizeMm(assets.starburst, fNumber) / (sensorMm / widthPx)) * ls.starburst.size;
    addStarburst(img, assets.starburst, { xPx: s.xPx, yPx: s.yPx, energy: [flux[0] * k, flux[1] * k, flux[2] * k], binPx }, pixelAspect);
  }
  if (ls.streak.fraction * gStreak > 0) {
    const k = ls.streak.fraction * gStreak;
    const tint = ls.streak.tint ?? coatingTint(assets);
    addStreak(img, { xPx: s.xPx, yPx: s.yPx, energy: [flux[0] * k * tint[0], flux[1] * k * tint[1], flux[2] * k * tint[2]], lengthPx: ls.streak.lengthPx, thicknessPx: ls.streak.thicknessPx }, pixelAspect);
  }
  if (assets.dust && gDust > 0) addDust(img, assets.dust, { xPx: s.xPx, yPx: s.yPx, flux }, ls.dust.fraction * gDust, ls.dust.reachPx);
  for (let c = 0; c < 3; c++) veil[c] += flux[c] * ls.veil.fraction * gVeil;
}
