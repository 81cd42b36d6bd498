// Lens ghosts, ray traced (Hullin, Eisemann, Seidel & Lee, "Physically-based real-time lens flare
// rendering", ACM TOG 30(4), 2011): for each ghost path a regular grid of parallel rays over the
// part of the entrance plane that can reach the iris is traced at several wavelengths; each grid
// cell becomes two triangles on the sensor whose irradiance is the cell's entrance area over its
// sensor area. Per pixel, the stop-plane position and the barrel-vignetting ratio, interpolated
// across the triangle, cut the iris polygon and the lens-barrel clipping with anti-aliased edges.
//
// Cost control: ghosts whose paraxial peak cannot reach a visible value are skipped; large ghosts
// (smooth inside) are drawn into half- or quarter-resolution buffers, upsampled once per call.
//
// The rooms: view.ts (frame <-> sensor), grid.ts (tracing a ghost's ray grid and fitting its box),
// lod.ts (the per-ghost level-of-detail decision), raster.ts (triangles into layers), layers.ts
// (the low-resolution layers and their cascade). This file drives them for one light.

import { irisShape } from '../../optics/iris.js';
import type { LensSystem, RankedGhost } from '../../optics/ghost-system.js';
import type { FloatImage } from '../../raster/image.js';
import { smearInto, type Plane } from '../../raster/line-smear.js';
import { chiefLanding, GhostGrid } from './grid.js';
import { cascadeLayers, clearWritten, layersFor, scratchLayersFor, touch, type Layer } from './layers.js';
import { FAINT_PEAK, INVISIBLE, ghostDrawing } from './lod.js';
import { inShare, lightSlopes, pxPerMm, type GhostFrameSettings, type GhostLight, type GhostMotion, type GhostStats, type GhostView } from './view.js';
import type { PathPlan } from '../../optics/trace.js';

export { FAINT_PEAK } from './lod.js';
export { lightSlopes, pxPerMm } from './view.js';
export type { GhostFrameSettings, GhostLight, GhostMotion, GhostStats, GhostView } from './view.js';

const ONE: readonly [number, number, number] = [1, 1, 1];
/** Cells per side of the coarse grid that finds each ghost's ray box. */
const FIT_GRID = 12;

/** Add every visible ghost of one light to the frame. */
export function addGhosts(img: FloatImage, system: LensSystem, view: GhostView, light: GhostLight, settings: GhostFrameSettings, stats?: GhostStats): void {
  const lum = 0.2126 * light.flux[0] + 0.7152 * light.flux[1] + 0.0722 * light.flux[2];
  if (lum <= 0 || settings.gain <= 0) return;
  const f = system.focalLengthMm;
  const epRadius = f / (2 * settings.fNumber);
  const stopRadius = epRadius * system.stopRatio;
  const epArea = Math.PI * epRadius * epRadius;
  const [sx, sy] = lightSlopes(system, view, light.xPx, light.yPx);
  const [pxX, pxY] = pxPerMm(system, view);
  const e0 = [light.flux[0] / epArea, light.flux[1] / epArea, light.flux[2] / epArea];
  const mm2PerPx = 1 / (pxX * pxY);
  const shape = irisShape(system.lens.iris);
  const multiRes = settings.quality !== 'high';
  const layers = layersFor(img.width, img.height);
  const centre = Math.floor(system.samples.length / 2);
  // a coarse grid finds each ghost's ray box; the fine grid traces and draws it
  // with motion, ghosts are drawn into the padded scratch: the optical centre moves with the margin
  const motion = settings.motion;
  const drawView = motion ? { ...view, opticalCentre: [view.opticalCentre[0] + motion.pad, view.opticalCentre[1] + motion.pad] as const } : view;
  const coarse = new GhostGrid(system, Math.min(FIT_GRID, system.grid), drawView, sx, sy, stopRadius, pxX, pxY, shape);
  const gridOf = (n: number) => (n === coarse.n ? coarse : new GhostGrid(system, n, drawView, sx, sy, stopRadius, pxX, pxY, shape));
  const grid = gridOf(system.grid);
  const faintGrid = system.faintGrid === system.grid ? grid : gridOf(system.faintGrid);
  // the fitting trace is at this wavelength: drawn with the fitting grid, it needs no trace again
  const fitNm = system.samples[centre].nm;
  const share = settings.share;
  const exposure = settings.exposure ?? 1;
  // with motion, each ghost is drawn alone into these and smeared from them into the layers
  const scratch = motion ? scratchLayersFor(motion.scratch.width, motion.scratch.height) : undefined;
  for (let g = 0; g < system.kept; g++) {
    if (share && !inShare(g, share)) continue;
    const ghost = system.ranked[g];
    // per-ghost switches, gains and tints from the shot
    let own: readonly [number, number, number] = ONE;
    if (settings.paths) {
      const p = settings.paths.get(`${ghost.i + 1}-${ghost.j + 1}`);
      if (p === undefined ? settings.only : p[0] <= 0 && p[1] <= 0 && p[2] <= 0) continue;
      if (p) own = p;
    }
    // paraxial peak estimate: skip what cannot reach a visible value
    const peak = (lum / epArea / exposure) * ghost.strength * mm2PerPx * settings.gain * (own === ONE ? 1 : Math.max(own[0], own[1], own[2]));
    if (peak < INVISIBLE) {
      if (stats) stats.skipped++;
      continue;
    }
    const faintPeak = settings.faintPeak ?? FAINT_PEAK;
    const box = coarse.fitBox(ghost, ghost.plans[centre]);
    if (!box) {
      if (stats) stats.skipped++;
      continue;
    }
    const { faint, level } = ghostDrawing(coarse, peak, lum / epArea / exposure, settings.gain, multiRes, faintPeak);
    // with motion: a ghost that moves only a few of its layer's pixels is drawn at shifted places
    // (sharp, as the exact method draws it); one that moves further is smeared from a drawing
    const vg = motion ? ghostVelocity(system, view, ghost, ghost.plans[centre], stopRadius, pxX, pxY, motion) : undefined;
    const shifts = motion && vg ? shiftsFor(motion, vg, level) : undefined;
    const smeared = motion !== undefined && shifts === undefined;
    const layer = smeared ? scratch![level] : layers[level];
    const target = smeared ? motion.scratch : img;
    const samples = faint ? system.faintSamples : system.samples;
    const plans = faint ? ghost.faintPlans : ghost.plans;
    const fine = faint ? faintGrid : grid;
    const matched = faint ? fine.colourMatch(ghost, box, system) : ONE;
    const tone = own === ONE ? matched : ([matched[0] * own[0], matched[1] * own[1], matched[2] * own[2]] as const);
    // drawn with the fitting grid, the fitting wavelength goes first, straight from the fit's trace
    const reuse = fine === coarse && coarse.lastTraced === box ? samples.findIndex((q) => q.nm === fitNm) : -1;
    for (let step = 0; step < samples.length; step++) {
      const w = reuse < 0 ? step : step === 0 ? reuse : step <= reuse ? step - 1 : step;
      const weight = samples[w].rgb;
      const k = settings.gain / view.pixelAspect;
      if (step > 0 || reuse < 0) fine.trace(plans[w], box);
      const rgb: [number, number, number] = [e0[0] * weight[0] * tone[0] * k, e0[1] * weight[1] * tone[1] * k, e0[2] * weight[2] * tone[2] * k];
      if (!shifts) fine.draw(target, layer, rgb);
      else {
        for (let q = 0; q < shifts.w.length; q++) {
          fine.shift(shifts.dx[q], shifts.dy[q]);
          fine.draw(target, layer, [rgb[0] * shifts.w[q], rgb[1] * shifts.w[q], rgb[2] * shifts.w[q]]);
          fine.shift(-shifts.dx[q], -shifts.dy[q]);
        }
      }
    }
    if (smeared) smearGhost(vg!, motion, layer, layers[level], img);
    if (stats) stats.drawn++;
  }
  // cascade the coarse layers down, each into the next finer one (2x bilinear), so the full frame
  // is walked once however many layers were used
  cascadeLayers(layers, img.data, img.width, img.height);
}

/** Most places a slowly moving ghost is drawn at, by its layer (full, 1/2, 1/4, 1/8 resolution). */
const MAX_SHIFTS = [1, 4, 8, 8];
/** Spacing (layer pixels) of those places. */
const SHIFT_STEP = 0.5;

/** A ghost's motion on the frame (px) over the span: as its chief ray moves, or by its paraxial ratio when that is lost. */
function ghostVelocity(system: LensSystem, view: GhostView, ghost: RankedGhost, plan: PathPlan, stopRadius: number, pxX: number, pxY: number, motion: GhostMotion): [number, number] {
  const landing = (p: readonly [number, number]) => {
    const [sx, sy] = lightSlopes(system, view, p[0], p[1]);
    return chiefLanding(system, view, ghost, plan, sx, sy, stopRadius, pxX, pxY);
  };
  const p0 = landing(motion.from);
  const p1 = landing(motion.to);
  const lx = motion.to[0] - motion.from[0];
  const ly = motion.to[1] - motion.from[1];
  return p0 && p1 ? [p1[0] - p0[0], p1[1] - p0[1]] : [(ghost.k * lx) / system.lens.squeeze, ghost.k * ly];
}

/**
 * The places (offsets from the padded drawing, px) and weights to draw a slowly moving ghost at:
 * the span's s-range cut into equal parts SHIFT_STEP layer pixels apart or less, each drawn at its
 * share of the motion's centre with its share of the mass. Undefined when that takes too many.
 */
function shiftsFor(motion: GhostMotion, vg: readonly [number, number], level: number): { dx: number[]; dy: number[]; w: number[] } | undefined {
  let s0 = Infinity;
  let s1 = -Infinity;
  for (let j = 0; j < motion.mass.length; j++) {
    if (motion.mass[j] <= 0) continue;
    s0 = Math.min(s0, motion.a[j], motion.b[j]);
    s1 = Math.max(s1, motion.a[j], motion.b[j]);
  }
  if (s0 > s1) return { dx: [], dy: [], w: [] };
  const scale = 2 ** level;
  const lengthPx = ((s1 - s0) * Math.hypot(vg[0], vg[1])) / scale;
  const n = Math.max(1, Math.ceil(lengthPx / SHIFT_STEP));
  if (n > MAX_SHIFTS[level]) return undefined;
  const dx: number[] = [];
  const dy: number[] = [];
  const w: number[] = [];
  for (let q = 0; q < n; q++) {
    const lo = s0 + ((s1 - s0) * q) / n;
    const hi = s0 + ((s1 - s0) * (q + 1)) / n;
    let m = 0;
    let ms = 0;
    for (let j = 0; j < motion.mass.length; j++) {
      const a = Math.min(motion.a[j], motion.b[j]);
      const b = Math.max(motion.a[j], motion.b[j]);
      if (b - a <= 0) {
        // a still piece: all of it where it is
        if (a >= lo && (a < hi || (q === n - 1 && a <= hi))) {
          m += motion.mass[j];
          ms += motion.mass[j] * a;
        }
        continue;
      }
      const x0 = Math.max(a, lo);
      const x1 = Math.min(b, hi);
      if (x1 <= x0) continue;
      const part = (motion.mass[j] * (x1 - x0)) / (b - a);
      m += part;
      ms += part * 0.5 * (x0 + x1);
    }
    if (m <= 0) continue;
    const sc = ms / m;
    dx.push(sc * vg[0] - motion.pad);
    dy.push(sc * vg[1] - motion.pad);
    w.push(m);
  }
  return { dx, dy, w };
}

/**
 * Smear a ghost drawn alone (into `drawn`, or the motion's scratch frame at full resolution) along
 * its own motion `vg` over the span into `into` (or the frame), and clear what it was drawn into.
 */
function smearGhost(vg: readonly [number, number], motion: GhostMotion, drawn: Layer, into: Layer, img: FloatImage): void {
  const [vx, vy] = vg;
  const full = drawn.scale === 1;
  const src: Plane = full ? { data: motion.scratch.data, width: motion.scratch.width, height: motion.scratch.height, stride: 4 } : { data: drawn.data, width: drawn.w, height: drawn.h, stride: 3 };
  const pad = motion.pad / drawn.scale;
  const dst: Plane = full ? { data: img.data, width: img.width, height: img.height, stride: 4 } : { data: into.data, width: into.w, height: into.h, stride: 3 };
  const wrote = smearInto(src, { x0: drawn.bx0, y0: drawn.by0, x1: drawn.bx1, y1: drawn.by1 }, dst, { vx: vx / drawn.scale, vy: vy / drawn.scale, a: motion.a, b: motion.b, mass: motion.mass }, [pad, pad]);
  if (wrote) {
    touch(into, wrote.x0, wrote.y0, wrote.x1, wrote.y1);
    into.used = true;
  }
  clearWritten(drawn, src.data, src.width, src.height, src.stride);
}
