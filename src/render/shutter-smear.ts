// The shutter's smear method: motion blur at about the price of two frames, not one per sample.
//
// Within one open shutter a light moves a few pixels along a smooth path, and its glow, starburst,
// streak and disk move rigidly with it; each ghost moves rigidly too, at its own rate (k times
// the light, some against it). So the open shutter is cut into `samples` strata; at each stratum
// the light's brightness and its visibility through the mattes are evaluated as the exact method
// does (they change non-linearly: a light passing a matte edge, an intensity key), and where the
// light is at the strata's ends. The path is cut into spans along which it runs straight (within
// STRAIGHT_PX), and for the ghosts into stretches of GHOST_SPAN_PX (at most GHOST_SPANS a span);
// each one's elements are drawn once, at its middle, and smeared along the path with each
// stratum's share of the light spread evenly over the stretch it covers (raster/line-smear.ts).
// Each ghost's own motion over a stretch is traced from its chief ray at the stretch's two ends.
//
// What is taken at a span's middle rather than followed through it: the f-number, the element
// gains and flare settings, the light's colour and radius (its brightness is followed), a ghost's
// shape (it moves rigidly: a ghost cut by the barrel as it moves changes its cut only between
// stretches), and the mattes' coverage of the disk itself (pixel by pixel, from the middle's matte
// frame). The lens dust, lit by a broad reach around the light rather than moving with it, is drawn
// at each stratum's middle. A light that is behind the camera at some instant of the shutter is
// drawn sample by sample as the exact method does.

import { addDisk, diskFlux } from '../elements/core.js';
import { addDust } from '../elements/dust.js';
import { addGhosts, type GhostStats } from '../elements/ghosts/index.js';
import { addGlow, addGlowNear } from '../elements/glow.js';
import { addStarburst } from '../elements/starburst.js';
import { addStreak } from '../elements/streak.js';
import type { MatteProvider } from '../io/matte-provider.js';
import { diskVisibility } from '../occlusion/visibility.js';
import { binSizeMm } from '../optics/diffraction.js';
import { FloatImage } from '../raster/image.js';
import { addScaled, kernelMass, smearInto, type Region, type SmearKernel } from '../raster/line-smear.js';
import type { LightFlare, ResolvedLight, ResolvedShot } from '../shot/types.js';
import { evalScalar } from '../timeline/track.js';
import { lightState, type LightState } from './frame-state.js';
import { coatingTint, coverageFor, elementGains, shotAssets } from './light-draw.js';

/** Largest distance (px) of the light's path from a span's straight chord. */
export const STRAIGHT_PX = 0.35;
/** Longest stretch (px) a ghost is smeared over from one tracing: beyond it, its shape is traced again. */
export const GHOST_SPAN_PX = 16;
/** Most stretches a straight span's ghosts are traced in. */
const GHOST_SPANS = 3;
/** The glow is smeared within at least this distance of the light (px); its tail is drawn where it is. */
const GLOW_NEAR_PX = 24;
/** Lines a pixel across for the sharp elements' smear (their steps across the motion are 1/4 px). */
const SHARP_LINES = 4;
/** Adjacent strata whose densities along the path differ by less than this share are one piece. */
const MERGE = 0.01;

/** Whether a shot's frames are drawn by the smear method. */
export function smearApplies(shot: ResolvedShot): boolean {
  return shot.shutter.method === 'smear' && shot.shutter.angleDeg > 0 && shot.shutter.samples > 1;
}

const lum = (c: readonly number[]) => 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];

/** One stratum of the open shutter: the light at its ends and middle, and what it lets through. */
interface Stratum {
  mid: LightState;
  /** the light's flux at the middle (without the mattes), and its visibility through them */
  flux: [number, number, number];
  visibility: number;
}

/** A straight run of strata [n0, n1) of the shutter. */
interface Span {
  n0: number;
  n1: number;
}

/** The open shutter's node times (K + 1, strata between them) for a frame. */
export function shutterNodes(shot: ResolvedShot, frame: number): number[] {
  const { angleDeg, phaseDeg, samples } = shot.shutter;
  const out: number[] = [];
  for (let j = 0; j <= samples; j++) out.push(frame + (phaseDeg + (angleDeg * j) / samples) / 360);
  return out;
}

/** Cut nodes [n0, n1] into runs whose path stays within STRAIGHT_PX of their chord and (if given) no longer than maxPx. */
export function straightSpans(pos: readonly (readonly [number, number])[], n0: number, n1: number, maxPx = Infinity): Span[] {
  if (n1 - n0 <= 1) return [{ n0, n1 }];
  const [ax, ay] = pos[n0];
  const cx = pos[n1][0] - ax;
  const cy = pos[n1][1] - ay;
  const len = Math.hypot(cx, cy);
  let worst = -1;
  let far = 0;
  for (let n = n0 + 1; n < n1; n++) {
    const px = pos[n][0] - ax;
    const py = pos[n][1] - ay;
    const off = len > 1e-9 ? Math.abs(px * cy - py * cx) / len : Math.hypot(px, py);
    if (off > far) {
      far = off;
      worst = n;
    }
  }
  if (far <= STRAIGHT_PX && len <= maxPx) return [{ n0, n1 }];
  const cut = far > STRAIGHT_PX ? worst : Math.round((n0 + n1) / 2);
  return [...straightSpans(pos, n0, cut, maxPx), ...straightSpans(pos, cut, n1, maxPx)];
}

/**
 * A span's smear: each stratum covers [s_j, s_j+1] of the chord (s = 0 where the span's middle
 * puts the light), carrying mass_j (its share of the exposure, as a multiple of the light drawn).
 * Adjacent strata of nearly equal density merge.
 */
export function spanKernel(pos: readonly (readonly [number, number])[], span: Span, ref: readonly [number, number], masses: readonly number[]): SmearKernel & { from: [number, number]; to: [number, number] } {
  const from: [number, number] = [pos[span.n0][0], pos[span.n0][1]];
  const to: [number, number] = [pos[span.n1][0], pos[span.n1][1]];
  const vx = to[0] - from[0];
  const vy = to[1] - from[1];
  const v2 = vx * vx + vy * vy;
  const s = (n: number) => (v2 > 1e-18 ? ((pos[n][0] - ref[0]) * vx + (pos[n][1] - ref[1]) * vy) / v2 : 0);
  const a: number[] = [];
  const b: number[] = [];
  const mass: number[] = [];
  for (let n = span.n0; n < span.n1; n++) {
    const sa = s(n);
    const sb = s(n + 1);
    const m = masses[n];
    const last = a.length - 1;
    if (last >= 0 && sb - sa !== 0 && b[last] === sa && Math.sign(b[last] - a[last]) === Math.sign(sb - sa)) {
      // same direction, meeting end to end: one piece when their densities are close
      const d0 = mass[last] / Math.abs(b[last] - a[last]);
      const d1 = m / Math.abs(sb - sa);
      if (Math.abs(d0 - d1) <= MERGE * Math.max(d0, d1)) {
        b[last] = sb;
        mass[last] += m;
        continue;
      }
    }
    a.push(sa);
    b.push(sb);
    mass.push(m);
  }
  return { vx, vy, a, b, mass, from, to };
}

// scratch images per thread, with a margin around the frame (so what the motion brings into the
// frame from outside it is there): one for ghosts drawn alone, one for the elements that move
// with the light. Kept while the margin they need fits.
let ghostScratch: { img: FloatImage; pad: number; w: number; h: number } | undefined;
/** Largest margin (px) around the frame that a ghost is drawn into before its smear. */
export const MAX_PAD_PX = 256;
function ghostScratchFor(w: number, h: number, needPx: number): { img: FloatImage; pad: number } {
  const pad = Math.min(MAX_PAD_PX, Math.ceil((needPx + 2) / 32) * 32);
  if (!ghostScratch || ghostScratch.w !== w || ghostScratch.h !== h || ghostScratch.pad < pad) ghostScratch = { img: new FloatImage(w + 2 * pad, h + 2 * pad), pad, w, h };
  return ghostScratch;
}
let padded: FloatImage | undefined;
function paddedScratch(w: number, h: number): FloatImage {
  if (!padded || padded.width * padded.height < w * h) padded = new FloatImage(w, h);
  return padded;
}

/** The ghosts' scratch, with margin for the fastest ghost's reach (its position ratio times the light's). */
function ghostPad(w: number, h: number, k: SmearKernel, lens: NonNullable<ReturnType<typeof shotAssets>['lens']>): { scratch: FloatImage; pad: number } {
  let kMax = 1;
  for (let g = 0; g < lens.kept; g++) kMax = Math.max(kMax, Math.abs(lens.ranked[g].k));
  const s = ghostScratchFor(w, h, 1.2 * kMax * reachPx(k));
  return { scratch: s.img, pad: s.pad };
}

/** The reach (px) of a kernel's motion from the light drawn. */
function reachPx(k: SmearKernel): number {
  let s = 0;
  for (let j = 0; j < k.mass.length; j++) s = Math.max(s, Math.abs(k.a[j]), Math.abs(k.b[j]));
  return s * Math.hypot(k.vx, k.vy);
}

/**
 * Draw one light over the frame's open shutter by the smear method, adding its veil energy to
 * `veil`. Returns false (nothing drawn) when the smear cannot follow it: the caller draws it
 * sample by sample.
 */
export function smearLight(img: FloatImage, shot: ResolvedShot, light: ResolvedLight, frame: number, mattes: MatteProvider, veil: number[], stats?: GhostStats): boolean {
  const { pixelAspect } = shot.frame;
  const nodes = shutterNodes(shot, frame);
  const K = nodes.length - 1;
  const ends = nodes.map((t) => lightState(shot, light, t));
  const strata: Stratum[] = [];
  // each stratum's flux by Simpson's rule over its ends and middle (a peak of an intensity key
  // inside the shutter is not flattened to its strata's middles)
  const fluxOf = (st: LightState): [number, number, number] => (st.gain > 0 && st.placed ? diskFlux(st) : [0, 0, 0]);
  const endFlux = ends.map(fluxOf);
  for (let j = 0; j < K; j++) {
    const t = 0.5 * (nodes[j] + nodes[j + 1]);
    const mid = lightState(shot, light, t);
    const fm = fluxOf(mid);
    const flux = [0, 1, 2].map((c) => (endFlux[j][c] + 4 * fm[c] + endFlux[j + 1][c]) / 6) as [number, number, number];
    strata.push({ mid, flux, visibility: 0 });
  }
  if (strata.every((s) => lum(s.flux) <= 0)) return true;
  if (ends.some((s) => !s.placed) || strata.some((s) => !s.mid.placed)) return false;
  for (let j = 0; j < K; j++) {
    const s = strata[j];
    if (lum(s.flux) <= 0) continue;
    const t = 0.5 * (nodes[j] + nodes[j + 1]);
    const lookups = coverageFor(shot, light, t, mattes, s.mid);
    s.visibility = diskVisibility(s.mid.xPx, s.mid.yPx, s.mid.radiusPx, lookups, { limbDarkening: light.limbDarkening, pixelAspect });
  }
  const pos = ends.map((s) => [s.xPx, s.yPx] as const);
  const assets = shotAssets(shot);
  const ls: LightFlare = light.flare ?? shot;
  for (const span of straightSpans(pos, 0, K)) drawSpan(img, shot, light, ls, nodes, pos, strata, ends, span, mattes, veil, stats);
  // the lens dust is lit, not carried: drawn at each stratum as it is
  if (assets.dust) {
    for (let j = 0; j < K; j++) {
      const s = strata[j];
      const g = elementGains(ls, 0.5 * (nodes[j] + nodes[j + 1])).gDust;
      if (g <= 0 || s.visibility <= 0) continue;
      const flux = s.flux.map((c) => (c * s.visibility) / K) as [number, number, number];
      addDust(img, assets.dust, { xPx: s.mid.xPx, yPx: s.mid.yPx, flux }, ls.dust.fraction * g, ls.dust.reachPx);
    }
  }
  return true;
}

/** One straight span: the disk, the ghosts (in spans of their own length) and the elements that move with the light. */
function drawSpan(img: FloatImage, shot: ResolvedShot, light: ResolvedLight, ls: LightFlare, nodes: readonly number[], pos: readonly (readonly [number, number])[], strata: readonly Stratum[], ends: readonly LightState[], span: Span, mattes: MatteProvider, veil: number[], stats?: GhostStats): void {
  const { widthPx, heightPx, pixelAspect, opticalCentre } = shot.frame;
  const K = strata.length;
  const assets = shotAssets(shot);
  const tMid = 0.5 * (nodes[span.n0] + nodes[span.n1]);
  const ref = lightState(shot, light, tMid);
  // drawn with the middle's flux, or the span's brightest stratum's when the middle is dark
  let refFlux: [number, number, number] = ref.gain > 0 ? diskFlux(ref) : [0, 0, 0];
  if (lum(refFlux) <= 0) {
    let best = -1;
    for (let j = span.n0; j < span.n1; j++) if (best < 0 || lum(strata[j].flux) > lum(strata[best].flux)) best = j;
    refFlux = strata[best].flux;
  }
  const refLum = lum(refFlux);
  if (refLum <= 0) return;
  const g = elementGains(ls, tMid);
  const at: [number, number] = [ref.xPx, ref.yPx];
  // each stratum's share of the light drawn, through the mattes
  const flareMass = strata.map((s) => (lum(s.flux) * s.visibility) / (K * refLum));
  for (let j = span.n0; j < span.n1; j++) {
    const k = (strata[j].visibility / K) * ls.veil.fraction * elementGains(ls, 0.5 * (nodes[j] + nodes[j + 1])).gVeil;
    for (let c = 0; c < 3; c++) veil[c] += strata[j].flux[c] * k;
  }
  if (g.gCore > 0) drawCore(img, shot, light, nodes, pos, strata, ends, span, g.gCore, mattes);
  if (!flareMass.some((m, j) => j >= span.n0 && j < span.n1 && m > 0)) return;
  const fNumber = shot.lens ? evalScalar(shot.lens.fNumber, tMid) : 8;
  if (assets.lens && g.gGhosts > 0) {
    // ghosts change shape as they move: traced again every GHOST_SPAN_PX of the light's path, in
    // at most GHOST_SPANS stretches (a fast light's ghosts are smeared so far that their changing
    // cut matters less than what tracing them more often would cost)
    const length = Math.hypot(pos[span.n1][0] - pos[span.n0][0], pos[span.n1][1] - pos[span.n0][1]);
    for (const gs of straightSpans(pos, span.n0, span.n1, Math.max(GHOST_SPAN_PX, length / GHOST_SPANS))) {
      const gMid = gs.n0 === span.n0 && gs.n1 === span.n1 ? ref : lightState(shot, light, 0.5 * (nodes[gs.n0] + nodes[gs.n1]));
      const k = spanKernel(pos, gs, [gMid.xPx, gMid.yPx], flareMass);
      if (!k.mass.some((m) => m > 0)) continue;
      const flux = gMid.gain > 0 && lum(diskFlux(gMid)) > 0 ? diskFlux(gMid) : refFlux;
      const kFlux = lum(flux) > 0 ? refLum / lum(flux) : 1;
      const field = gMid.field > 0 ? gMid.field : 1;
      const ghostFlux = flux.map((c) => c / field) as [number, number, number];
      addGhosts(
        img,
        assets.lens,
        { widthPx, heightPx, pixelAspect, opticalCentre },
        { xPx: gMid.xPx, yPx: gMid.yPx, flux: ghostFlux },
        {
          fNumber,
          gain: ls.ghosts.gain * g.gGhosts,
          quality: shot.ghosts.quality,
          ...g.ghostPaths,
          ...(shot.ghosts.share ? { share: shot.ghosts.share } : {}),
          motion: { from: k.from, to: k.to, a: k.a, b: k.b, mass: k.mass.map((m) => m * kFlux), ...ghostPad(widthPx, heightPx, k, assets.lens) },
        },
        stats,
      );
    }
  }
  const k = spanKernel(pos, span, at, flareMass);
  const glowF = ls.glow.fraction * g.gGlow;
  const starK = assets.starburst && g.gStar > 0 ? ls.starburst.fraction * g.gStar : 0;
  const streakK = ls.streak.fraction * g.gStreak;
  if (glowF <= 0 && starK <= 0 && streakK <= 0) return;
  // drawn with a margin of the motion's reach around the frame, then smeared into it: the glow
  // (smooth, the whole frame) on its own, then the starburst and streak (sharp: their steps
  // across the motion a quarter pixel)
  const pad = Math.min(MAX_PAD_PX, Math.ceil(reachPx(k)) + 2);
  const w = widthPx + 2 * pad;
  const h = heightPx + 2 * pad;
  const sc = paddedScratch(w, h);
  const layer = new FloatImage(w, h, sc.data.subarray(0, w * h * 4));
  const x = ref.xPx + pad;
  const y = ref.yPx + pad;
  const frame = { data: img.data, width: widthPx, height: heightPx, stride: 4 };
  const src = { data: layer.data, width: w, height: h, stride: 4 };
  if (glowF > 0) {
    const energy: [number, number, number] = [refFlux[0] * glowF, refFlux[1] * glowF, refFlux[2] * glowF];
    const glow = { xPx: x, yPx: y, energy, sizePx: ls.glow.sizePx, falloff: ls.glow.falloff };
    // the glow's tail is drawn where it is and only its part near the light is smeared, unless
    // that part would be most of the frame
    const reach = reachPx(k);
    const inner = Math.max(GLOW_NEAR_PX, 6 * ls.glow.sizePx, 10 * reach);
    const outer = 2 * inner;
    if ((2 * outer) ** 2 / pixelAspect < 0.5 * widthPx * heightPx) {
      // all of it where it is, carrying the span's share of the light; then the near part moved
      const mass = kernelMass(k);
      addGlow(img, { ...glow, xPx: ref.xPx, yPx: ref.yPx, energy: [energy[0] * mass, energy[1] * mass, energy[2] * mass] }, pixelAspect);
      const near = addGlowNear(layer, glow, pixelAspect, inner, outer);
      addScaled(src, near, frame, -mass, [pad, pad]);
      smearInto(src, near, frame, k, [pad, pad]);
      for (let yy = near.y0; yy <= near.y1; yy++) layer.data.fill(0, (yy * w + near.x0) * 4, (yy * w + near.x1 + 1) * 4);
    } else {
      addGlow(layer, glow, pixelAspect, true);
      smearInto(src, { x0: 0, y0: 0, x1: w - 1, y1: h - 1 }, frame, k, [pad, pad]);
      layer.data.fill(0);
    }
    if (starK <= 0 && streakK <= 0) return;
  }
  let drawn: Region = { x0: w, y0: h, x1: -1, y1: -1 };
  const grow = (r: Region) => {
    drawn = { x0: Math.max(0, Math.min(drawn.x0, r.x0)), y0: Math.max(0, Math.min(drawn.y0, r.y0)), x1: Math.min(w - 1, Math.max(drawn.x1, r.x1)), y1: Math.min(h - 1, Math.max(drawn.y1, r.y1)) };
  };
  if (starK > 0) {
    const binPx = (binSizeMm(assets.starburst!, fNumber) / ((shot.lens?.model.sensorWidthMm ?? 36) / widthPx)) * ls.starburst.size;
    addStarburst(layer, assets.starburst!, { xPx: x, yPx: y, energy: [refFlux[0] * starK, refFlux[1] * starK, refFlux[2] * starK], binPx }, pixelAspect);
    const half = (assets.starburst!.n / 2 + 2) * Math.max(1, binPx) * Math.max(1, pixelAspect);
    grow({ x0: Math.floor(x - half), y0: Math.floor(y - half), x1: Math.ceil(x + half), y1: Math.ceil(y + half) });
  }
  if (streakK > 0) {
    const tint = ls.streak.tint ?? coatingTint(assets);
    addStreak(layer, { xPx: x, yPx: y, energy: [refFlux[0] * streakK * tint[0], refFlux[1] * streakK * tint[1], refFlux[2] * streakK * tint[2]], lengthPx: ls.streak.lengthPx, thicknessPx: ls.streak.thicknessPx }, pixelAspect);
    const rows = Math.ceil(6 * ls.streak.thicknessPx) + 2;
    grow({ x0: 0, y0: Math.floor(y) - rows, x1: w - 1, y1: Math.floor(y) + rows });
  }
  smearInto(src, drawn, frame, k, [pad, pad], SHARP_LINES);
  for (let yy = drawn.y0; yy <= drawn.y1; yy++) layer.data.fill(0, (yy * w + drawn.x0) * 4, (yy * w + drawn.x1 + 1) * 4);
}

/** Steps (px of the light's path) between the disk's drawings: it is sharp, and its edge is bright. */
const CORE_STEP_PX = 0.5;
/** Most drawings of the disk over a span. */
const CORE_STEPS = 2048;

/**
 * The light's disk over the span, drawn exactly (area coverage) at steps half a pixel apart
 * along its path: the sharpest and brightest element, whose edges a smear would soften. Each
 * stratum's steps are hidden by the mattes of its middle.
 */
function drawCore(img: FloatImage, shot: ResolvedShot, light: ResolvedLight, nodes: readonly number[], pos: readonly (readonly [number, number])[], strata: readonly Stratum[], ends: readonly LightState[], span: Span, gain: number, mattes: MatteProvider): void {
  const K = strata.length;
  const { pixelAspect } = shot.frame;
  let total = 0;
  for (let j = span.n0; j < span.n1; j++) total += Math.max(1, Math.ceil(Math.hypot(pos[j + 1][0] - pos[j][0], pos[j + 1][1] - pos[j][1]) / CORE_STEP_PX));
  const thin = total > CORE_STEPS ? CORE_STEPS / total : 1;
  for (let j = span.n0; j < span.n1; j++) {
    const s = strata[j];
    if (s.mid.gain <= 0 && ends[j].gain <= 0 && ends[j + 1].gain <= 0) continue;
    const steps = Math.max(1, Math.round(thin * Math.ceil(Math.hypot(pos[j + 1][0] - pos[j][0], pos[j + 1][1] - pos[j][1]) / CORE_STEP_PX)));
    const lookups = coverageFor(shot, light, 0.5 * (nodes[j] + nodes[j + 1]), mattes, s.mid);
    const clearAt = lookups.length ? (x: number, y: number) => lookups.reduce((c, f) => c * (1 - f(x, y)), 1) : undefined;
    const k = gain / (K * steps);
    // the disk's radiance followed through the stratum: linear from its start to its middle to its end
    const r0 = ends[j].gain > 0 && ends[j].placed ? ends[j].radiance : [0, 0, 0];
    const r1 = ends[j + 1].gain > 0 && ends[j + 1].placed ? ends[j + 1].radiance : [0, 0, 0];
    for (let q = 0; q < steps; q++) {
      const f = (q + 0.5) / steps;
      const [ra, rb, u] = f < 0.5 ? [r0, s.mid.radiance, 2 * f] : [s.mid.radiance, r1, 2 * f - 1];
      const radiance: [number, number, number] = [0, 1, 2].map((c) => (ra[c] + (rb[c] - ra[c]) * u) * k) as [number, number, number];
      const x = pos[j][0] + (pos[j + 1][0] - pos[j][0]) * f;
      const y = pos[j][1] + (pos[j + 1][1] - pos[j][1]) * f;
      addDisk(img, { xPx: x, yPx: y, radiusPx: s.mid.radiusPx, radiance }, pixelAspect, clearAt);
    }
  }
}
