// Lens ghosts, ray traced (Hullin, Eisemann, Seidel & Lee, "Physically-based real-time lens flare
// rendering", ACM TOG 30(4), 2011): for each ghost path a regular grid of parallel rays over the
// part of the entrance plane that can reach the iris is traced at several wavelengths; each grid
// cell becomes two triangles on the sensor whose irradiance is the cell's entrance area over its
// sensor area. Per pixel, the stop-plane position and the barrel-vignetting ratio, interpolated
// across the triangle, cut the iris polygon and the lens-barrel clipping with anti-aliased edges.
//
// Cost control: ghosts whose paraxial peak cannot reach a visible value are skipped; large ghosts
// (smooth inside) are drawn into half- or quarter-resolution buffers, upsampled once per call.

import { irisMargin, irisShape, type IrisShape } from '../optics/iris.js';
import type { GhostQuality, LensSystem, RankedGhost } from '../optics/ghost-system.js';
import { RayHit, traceRay, type PathPlan } from '../optics/trace.js';
import type { FloatImage } from '../raster/image.js';

export interface GhostView {
  widthPx: number;
  heightPx: number;
  pixelAspect: number;
  opticalCentre: readonly [number, number];
}

export interface GhostLight {
  xPx: number;
  yPx: number;
  /** RGB flux of the light's image (disk radiance x area), display units */
  flux: readonly [number, number, number];
}

export interface GhostFrameSettings {
  fNumber: number;
  gain: number;
  quality: GhostQuality;
  /** the faint-ghost threshold (default FAINT_PEAK; 0 draws every ghost in full) */
  faintPeak?: number;
}

export interface GhostStats {
  drawn: number;
  skipped: number;
}

/** Pixel values below this are not worth drawing (a quarter of one 16-bit code). */
const INVISIBLE = 1 / (4 * 65535);
/** Triangles smaller than this (px^2, full resolution) are drawn as point splats of their flux. */
const SPLAT_AREA_PX = 1;
/** Ghost sizes (largest side, px) above which it is drawn at half and at quarter resolution. */
const HALF_RES_PX = 240;
const QUARTER_RES_PX = 600;
/**
 * Below `high`, a ghost whose paraxial peak is under this (linear display value) is faint: it is
 * traced on the quality's lighter grid with fewer wavelengths and drawn one resolution step
 * coarser (down to an eighth). Its colour fringes and edges then differ by less than the quality
 * step itself (measured in DEVELOPERS.md), and such ghosts are most of the cost: large, dim discs.
 */
export const FAINT_PEAK = 2e-3;
const ONE: readonly [number, number, number] = [1, 1, 1];
/** How far inside the barrel and geometry edges (in their own measures) a colour probe fades in. */
const PROBE_FADE = 0.05;
/** Where in a ghost's ray box colourMatch probes (fractions of the box). */
const COLOUR_PROBES: readonly [number, number][] = [[0.5, 0.5], [0.3, 0.3], [0.7, 0.3], [0.3, 0.7], [0.7, 0.7]];
/** Cells per side of the coarse grid that finds each ghost's ray box. */
const FIT_GRID = 12;

/** Pixels per sensor millimetre, horizontally and vertically. */
export function pxPerMm(system: LensSystem, view: GhostView): [number, number] {
  const sx = view.widthPx / system.lens.sensorWidthMm;
  return [sx, sx * view.pixelAspect];
}

/** Incoming ray slopes for a light seen at (xPx, yPx): its paraxial image lands there. */
export function lightSlopes(system: LensSystem, view: GhostView, xPx: number, yPx: number): [number, number] {
  const [sx, sy] = pxPerMm(system, view);
  const f = system.focalLengthMm;
  // the image is inverted on the sensor and shown upright: display offset D (mm) needs slope -D/f;
  // an anamorphic front squeezes the horizontal field angle by its squeeze factor
  return [-((xPx - view.opticalCentre[0]) / sx / f) / system.lens.squeeze, -((yPx - view.opticalCentre[1]) / sy / f)];
}

/** RGB accumulation buffer at 1/scale resolution. */
interface Layer {
  scale: number;
  w: number;
  h: number;
  data: Float32Array;
  used: boolean;
  /** the layer pixels written since the last upsample (inclusive bounds) */
  bx0: number;
  by0: number;
  bx1: number;
  by1: number;
}

/**
 * A pixel bound from Math.floor/ceil as a small integer: clamped far outside any frame, and -0 made
 * 0, so arithmetic on it stays in V8's integer representation (a -0 arriving there after the code
 * was optimised sends it back to the interpreter, once per thread).
 */
function pixelBound(v: number): number {
  return v < -1e9 ? -1e9 : v > 1e9 ? 1e9 : v | 0;
}

/** Grow the layer's written box to take in x0..x1, y0..y1. */
function touch(layer: Layer, x0: number, y0: number, x1: number, y1: number): void {
  // every store happens on every call: a store first made late (the box growing right after the
  // code was optimised) would find no feedback and send the callers back to the interpreter
  layer.bx0 = x0 < layer.bx0 ? x0 : layer.bx0;
  layer.by0 = y0 < layer.by0 ? y0 : layer.by0;
  layer.bx1 = x1 > layer.bx1 ? x1 : layer.bx1;
  layer.by1 = y1 > layer.by1 ? y1 : layer.by1;
}

function resetBox(layer: Layer): void {
  layer.bx0 = layer.by0 = Infinity;
  layer.bx1 = layer.by1 = -Infinity;
}

// low-resolution layers, kept per thread and cleared after use (no fresh memory each call)
let layerCache: { w: number; h: number; layers: Layer[] } | undefined;
function layersFor(width: number, height: number): Layer[] {
  if (!layerCache || layerCache.w !== width || layerCache.h !== height) {
    layerCache = {
      w: width,
      h: height,
      layers: [1, 2, 4, 8].map((scale) => {
        const w = Math.ceil(width / scale);
        const h = Math.ceil(height / scale);
        return { scale, w, h, data: scale === 1 ? new Float32Array(0) : new Float32Array(w * h * 3), used: false, bx0: Infinity, by0: Infinity, bx1: -Infinity, by1: -Infinity };
      }),
    };
  }
  return layerCache.layers;
}

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
  const coarse = new GhostGrid(system, Math.min(FIT_GRID, system.grid), view, sx, sy, stopRadius, pxX, pxY, shape);
  const gridOf = (n: number) => (n === coarse.n ? coarse : new GhostGrid(system, n, view, sx, sy, stopRadius, pxX, pxY, shape));
  const grid = gridOf(system.grid);
  const faintGrid = system.faintGrid === system.grid ? grid : gridOf(system.faintGrid);
  // the fitting trace is at this wavelength: drawn with the fitting grid, it needs no trace again
  const fitNm = system.samples[centre].nm;
  for (let g = 0; g < system.kept; g++) {
    const ghost = system.ranked[g];
    // paraxial peak estimate: skip what cannot reach a visible value
    const peak = (lum / epArea) * ghost.strength * mm2PerPx * settings.gain;
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
    // faint by the paraxial estimate and by the traced one: a ghost can focus into bright caustic
    // rims that the paraxial peak does not see, and those need the full grid and spectrum
    const faint = multiRes && peak < faintPeak && (lum / epArea) * coarse.tracedPeak() * settings.gain < faintPeak;
    let level = 0;
    if (multiRes) {
      const size = coarse.passingSizePx();
      level = size > QUARTER_RES_PX ? 2 : size > HALF_RES_PX ? 1 : 0;
      if (faint && size > HALF_RES_PX / 2) level++;
    }
    const layer = layers[level];
    const samples = faint ? system.faintSamples : system.samples;
    const plans = faint ? ghost.faintPlans : ghost.plans;
    const fine = faint ? faintGrid : grid;
    const tone = faint ? fine.colourMatch(ghost, box, system) : ONE;
    // drawn with the fitting grid, the fitting wavelength goes first, straight from the fit's trace
    const reuse = fine === coarse && coarse.lastTraced === box ? samples.findIndex((q) => q.nm === fitNm) : -1;
    for (let step = 0; step < samples.length; step++) {
      const w = reuse < 0 ? step : step === 0 ? reuse : step <= reuse ? step - 1 : step;
      const weight = samples[w].rgb;
      const k = settings.gain / view.pixelAspect;
      if (step > 0 || reuse < 0) fine.trace(plans[w], box);
      fine.draw(img, layer, [e0[0] * weight[0] * tone[0] * k, e0[1] * weight[1] * tone[1] * k, e0[2] * weight[2] * tone[2] * k]);
    }
    if (stats) stats.drawn++;
  }
  // cascade the coarse layers down, each into the next finer one (2x bilinear), so the full frame
  // is walked once however many layers were used
  for (let l = layers.length - 1; l >= 1; l--) {
    const layer = layers[l];
    if (layer.used && layer.bx1 >= layer.bx0) {
      if (l === 1) upsample2x(layer, img.data, img.width, img.height, 4, undefined);
      else upsample2x(layer, layers[l - 1].data, layers[l - 1].w, layers[l - 1].h, 3, layers[l - 1]);
    }
    layer.used = false;
    resetBox(layer);
  }
}

/** Box literals list x0, y0, x1, y1 in that order everywhere: one object shape for V8. */
interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

const hit = new RayHit();

/** Headroom on the mask limits along a row (coverage units; rounding is below 1e-12). */
const MASK_SLACK = 1e-6;


/** The traced grid of one ghost at one wavelength, and its rasterisation. */
class GhostGrid {
  readonly n: number;
  readonly side: number;
  readonly vx: Float64Array;
  readonly vy: Float64Array;
  readonly valid: Uint8Array;
  readonly energy: Float64Array;
  readonly thr: Float64Array;
  readonly vig: Float64Array;
  readonly geo: Float64Array;
  readonly su: Float64Array;
  readonly sv: Float64Array;
  readonly counts: Uint8Array;
  crossings = 0;
  private readonly dx: number;
  private readonly dy: number;
  private readonly dz: number;
  private readonly launch: number;

  constructor(
    readonly system: LensSystem,
    n: number,
    readonly view: GhostView,
    sx: number,
    sy: number,
    readonly stopRadius: number,
    readonly pxX: number,
    readonly pxY: number,
    readonly shape: IrisShape,
  ) {
    this.n = n;
    this.side = this.n + 1;
    this.counts = new Uint8Array(this.side * this.side);
    const m = this.side * this.side;
    this.vx = new Float64Array(m);
    this.vy = new Float64Array(m);
    this.valid = new Uint8Array(m);
    this.energy = new Float64Array(m);
    this.thr = new Float64Array(m);
    this.vig = new Float64Array(m);
    this.geo = new Float64Array(m);
    this.su = new Float64Array(m * 3);
    this.sv = new Float64Array(m * 3);
    const norm = 1 / Math.sqrt(1 + sx * sx + sy * sy);
    this.dx = sx * norm;
    this.dy = sy * norm;
    this.dz = norm;
    // start in front of the hood, so every ray passes its plane
    this.launch = Math.max(system.lens.surfaces[0].semiDiameterMm + 10, (system.lens.hood?.depthMm ?? 0) + 1);
  }

  /** Whether vertex v's ray gets through the barrel and the iris (with a small margin). */
  private passes(v: number, margin: number): boolean {
    if (!this.valid[v] || this.vig[v] > 1 + margin || this.geo[v] < -margin) return false;
    for (let c = 0; c < this.crossings; c++) {
      const u = this.su[v * 3 + c];
      const w = this.sv[v * 3 + c];
      if (u * u + w * w > (1 + margin) ** 2) return false;
    }
    return true;
  }

  /**
   * The entrance-plane box to trace: start from the paraxial pupil of the ghost path (for each
   * stop crossing |A y + B u| <= stop radius), and widen it while rays on its border still pass.
   */
  fitBox(ghost: RankedGhost, plan: PathPlan): Box | undefined {
    // headroom past the front element: on a curved front surface the barrel's cut does not sit
    // exactly at the semi-diameter on the vertex plane, and it must fall inside the grid
    const front = this.system.lens.surfaces[0].semiDiameterMm * 1.25;
    const sx = this.dx / this.dz;
    const sy = this.dy / this.dz;
    let box: Box = { x0: -front, y0: -front, x1: front, y1: front };
    for (const { a, b } of ghost.stopCrossings) {
      if (Math.abs(a) < 1e-9) continue;
      const half = Math.abs(this.stopRadius / a) * 1.15;
      const cx = (-b * sx) / a;
      const cy = (-b * sy) / a;
      box = { x0: Math.max(box.x0, cx - half), y0: Math.max(box.y0, cy - half), x1: Math.min(box.x1, cx + half), y1: Math.min(box.y1, cy + half) };
    }
    if (box.x1 <= box.x0 || box.y1 <= box.y0) box = { x0: -front, y0: -front, x1: front, y1: front };
    let searched = false;
    for (let round = 0; round < 4; round++) {
      this.trace(plan, box);
      const n = this.n;
      const s = this.side;
      let any = false;
      const grow = { l: false, r: false, t: false, b: false };
      // near misses on the border count too: a thin passing sliver can touch the border between
      // two grid points
      for (let k = 0; k <= n; k++) {
        if (this.passes(k, 0.25)) grow.t = true;
        if (this.passes(n * s + k, 0.25)) grow.b = true;
        if (this.passes(k * s, 0.25)) grow.l = true;
        if (this.passes(k * s + n, 0.25)) grow.r = true;
      }
      for (let v = 0; v < s * s && !any; v++) any = this.passes(v, 0.05);
      if (!any && round === 0 && !searched) {
        // aberrations can move the passing rays outside the paraxial box: look over the whole front
        searched = true;
        box = { x0: -front, y0: -front, x1: front, y1: front };
        round--;
        continue;
      }
      if (!any) return round === 0 ? undefined : box;
      const w = box.x1 - box.x0;
      const h = box.y1 - box.y0;
      const next: Box = {
        x0: grow.l ? Math.max(-front, box.x0 - 0.5 * w) : box.x0,
        y0: grow.t ? Math.max(-front, box.y0 - 0.5 * h) : box.y0,
        x1: grow.r ? Math.min(front, box.x1 + 0.5 * w) : box.x1,
        y1: grow.b ? Math.min(front, box.y1 + 0.5 * h) : box.y1,
      };
      if (next.x0 === box.x0 && next.x1 === box.x1 && next.y0 === box.y0 && next.y1 === box.y1) break;
      box = next;
    }
    // the last growth step is traced too: the shrinking below reads the grid of `box`
    if (this.lastTraced !== box) this.trace(plan, box);
    // shrink onto the rays that pass (a thin cat's eye would otherwise get only a few cells),
    // keeping a cell and a half of margin; each shrunk box is traced with 4% more on every side
    // for the other wavelengths' chromatic shift, so the last one traced is the box returned
    let shrunk = false;
    for (let round = 0; round < 2; round++) {
      const n = this.n;
      const s = this.side;
      const cw = (box.x1 - box.x0) / n;
      const ch = (box.y1 - box.y0) / n;
      let i0 = n;
      let i1 = 0;
      let j0 = n;
      let j1 = 0;
      for (let j = 0; j <= n; j++) {
        for (let i = 0; i <= n; i++) {
          if (!this.passes(j * s + i, 0.05)) continue;
          i0 = Math.min(i0, i);
          i1 = Math.max(i1, i);
          j0 = Math.min(j0, j);
          j1 = Math.max(j1, j);
        }
      }
      if (i1 < i0) break;
      const tight: Box = { x0: box.x0 + (i0 - 1.5) * cw, y0: box.y0 + (j0 - 1.5) * ch, x1: box.x0 + (i1 + 1.5) * cw, y1: box.y0 + (j1 + 1.5) * ch };
      const clipped: Box = { x0: Math.max(box.x0, tight.x0), y0: Math.max(box.y0, tight.y0), x1: Math.min(box.x1, tight.x1), y1: Math.min(box.y1, tight.y1) };
      if ((clipped.x1 - clipped.x0) * (clipped.y1 - clipped.y0) > 0.6 * (box.x1 - box.x0) * (box.y1 - box.y0)) break;
      box = this.chromaticMargin(clipped, front);
      shrunk = true;
      this.trace(plan, box);
    }
    // not shrunk: the margin is added after the last trace (the caller traces it again). It is
    // worked out on every call: a call first made late leaves V8 no feedback and deopts fitBox
    const margined = this.chromaticMargin(box, front);
    return shrunk ? box : margined;
  }

  /** The box with 4% more on every side (within the front) for the other wavelengths' chromatic shift. */
  private chromaticMargin(box: Box, front: number): Box {
    const mx = 0.04 * (box.x1 - box.x0);
    const my = 0.04 * (box.y1 - box.y0);
    return { x0: Math.max(-front, box.x0 - mx), y0: Math.max(-front, box.y0 - my), x1: Math.min(front, box.x1 + mx), y1: Math.min(front, box.y1 + my) };
  }

  /** The box of the last trace (the grid holds its rays). */
  lastTraced: Box | undefined;

  /**
   * RGB factors that give a faint ghost, drawn with the lighter wavelength set, the colour the full
   * set gives it: the throughput of a few rays through the box, traced at every wavelength of both
   * sets, weighted into RGB. Fewer samples see the coatings' reflectance curves at fewer points
   * (and the curves move with the angle of incidence), which would shift the ghost's tint and
   * brightness without this. Falls back to the normal-incidence ratio when no test ray passes.
   */
  colourMatch(ghost: RankedGhost, box: Box, system: LensSystem): readonly [number, number, number] {
    const full = [0, 0, 0];
    const lite = [0, 0, 0];
    const pf = [0, 0, 0];
    const pl = [0, 0, 0];
    const { dx, dy, dz, launch } = this;
    for (const [fx, fy] of COLOUR_PROBES) {
      const gx = box.x0 + fx * (box.x1 - box.x0);
      const gy = box.y0 + fy * (box.y1 - box.y0);
      // a probe counts with the weight of its worst wavelength, fading out smoothly as any of them
      // nears the barrel's or the geometry's edge: the same rays for both sets, and no jump in the
      // ghost's colour from frame to frame as a probe crosses an edge
      let weight = 1;
      pf.fill(0);
      pl.fill(0);
      for (let set = 0; set < 2 && weight > 0; set++) {
        const plans = set === 0 ? ghost.plans : ghost.faintPlans;
        const samples = set === 0 ? system.samples : system.faintSamples;
        const acc = set === 0 ? pf : pl;
        for (let w = 0; w < plans.length; w++) {
          plans[w].stopRadiusMm = this.stopRadius;
          if (!traceRay(plans[w], gx - (launch * dx) / dz, gy - (launch * dy) / dz, -launch, dx, dy, dz, hit)) {
            weight = 0;
            break;
          }
          weight = Math.min(weight, (1 - hit.vignette) / PROBE_FADE, hit.margin / PROBE_FADE);
          if (weight <= 0) break;
          for (let c = 0; c < 3; c++) acc[c] += hit.throughput * samples[w].rgb[c];
        }
      }
      if (weight <= 0) continue;
      for (let c = 0; c < 3; c++) {
        full[c] += weight * pf[c];
        lite[c] += weight * pl[c];
      }
    }
    if (!(lite[0] > 0 && lite[1] > 0 && lite[2] > 0)) return ghost.faintColour;
    return [full[0] / lite[0], full[1] / lite[1], full[2] / lite[2]];
  }

  /**
   * The largest irradiance of the last trace over passing rays (per px^2, per unit of entrance
   * irradiance): the vertices' area ratios, and for cells folded below a pixel (caustics) their
   * whole flux in one pixel.
   */
  tracedPeak(): number {
    let peak = this.foldedPeak;
    for (let v = 0; v < this.side * this.side; v++) if (this.passes(v, 0) && this.energy[v] > peak) peak = this.energy[v];
    return peak;
  }

  /** Largest side (px) of the region whose rays pass, from the last trace. */
  passingSizePx(): number {
    let x0 = Infinity;
    let x1 = -Infinity;
    let y0 = Infinity;
    let y1 = -Infinity;
    for (let v = 0; v < this.side * this.side; v++) {
      if (!this.passes(v, 0)) continue;
      x0 = Math.min(x0, this.vx[v]);
      x1 = Math.max(x1, this.vx[v]);
      y0 = Math.min(y0, this.vy[v]);
      y1 = Math.max(y1, this.vy[v]);
    }
    return Math.max(x1 - x0, y1 - y0, 0);
  }

  /** Trace the grid over the box and compute each vertex's irradiance. */
  trace(plan: PathPlan, box: Box): void {
    const { n, side, dx, dy, dz, launch, view } = this;
    plan.stopRadiusMm = this.stopRadius;
    this.lastTraced = box;
    const cw = (box.x1 - box.x0) / n;
    const ch = (box.y1 - box.y0) / n;
    for (let j = 0; j <= n; j++) {
      for (let i = 0; i <= n; i++) {
        const v = j * side + i;
        const gx = box.x0 + i * cw;
        const gy = box.y0 + j * ch;
        const ok = traceRay(plan, gx - (launch * dx) / dz, gy - (launch * dy) / dz, -launch, dx, dy, dz, hit);
        this.valid[v] = ok ? 1 : 0;
        if (!ok) continue;
        this.vx[v] = view.opticalCentre[0] - hit.x * this.pxX;
        this.vy[v] = view.opticalCentre[1] - hit.y * this.pxY;
        this.thr[v] = hit.throughput;
        this.vig[v] = hit.vignette;
        this.geo[v] = hit.margin;
        this.crossings = hit.stopCount;
        for (let c = 0; c < hit.stopCount; c++) {
          this.su[v * 3 + c] = hit.stopU[c];
          this.sv[v * 3 + c] = hit.stopV[c];
        }
      }
    }
    // anamorphic: the ghost is compressed horizontally about its own centre (see README)
    const squeeze = this.system.lens.squeeze;
    if (squeeze !== 1) {
      let mx = 0;
      let count = 0;
      for (let v = 0; v < side * side; v++) {
        if (this.valid[v] && this.vig[v] <= 1) {
          mx += this.vx[v];
          count++;
        }
      }
      if (count > 0) {
        mx /= count;
        for (let v = 0; v < side * side; v++) if (this.valid[v]) this.vx[v] = mx + (this.vx[v] - mx) / squeeze;
      }
    }
    // irradiance at each vertex: entrance area (foreshortened by cos theta) over sensor area,
    // averaged over its cells of at least a pixel (folded, sub-pixel cells near a caustic are
    // drawn as point splats carrying their exact flux instead, so they neither flicker nor leak
    // their clamped density into neighbours); times the path's throughput
    const entrance = cw * ch * dz;
    this.cellEntrance = entrance;
    const e = this.energy;
    e.fill(0);
    const counts = this.counts;
    counts.fill(0);
    const { vx, vy, valid } = this;
    this.foldedPeak = 0;
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        const a = j * side + i;
        const b = a + 1;
        const c = a + side + 1;
        const d = a + side;
        if (!(valid[a] && valid[b] && valid[c] && valid[d])) continue;
        const area = 0.5 * Math.abs((vx[c] - vx[a]) * (vy[d] - vy[b]) - (vx[d] - vx[b]) * (vy[c] - vy[a]));
        if (area < SPLAT_AREA_PX) {
          // a folded cell (a caustic) puts its whole flux into about one pixel
          if (this.passes(a, 0)) this.foldedPeak = Math.max(this.foldedPeak, entrance * this.thr[a]);
          continue;
        }
        // sensor area gathered per vertex; the irradiance is then the cells' entrance area over
        // their sensor area together, so a nearly folded cell beside a vertex cannot blow its value up
        // (an average of the cells' ratios did, and large triangles smeared it across the frame)
        e[a] += area;
        e[b] += area;
        e[c] += area;
        e[d] += area;
        counts[a]++;
        counts[b]++;
        counts[c]++;
        counts[d]++;
      }
    }
    for (let v = 0; v < side * side; v++) {
      const value = counts[v] ? ((counts[v] * entrance) / e[v]) * this.thr[v] : 0;
      e[v] = Number.isFinite(value) ? value : 0;
    }
  }

  /** entrance area of one grid cell, mm^2 (foreshortened) */
  cellEntrance = 0;
  /** the largest flux per pixel of a passing cell folded below a pixel, from the last trace */
  private foldedPeak = 0;

  draw(img: FloatImage, layer: Layer, scale: [number, number, number]): void {
    const { n, side, valid, vig, geo } = this;
    layer.used = true;
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        const a = j * side + i;
        const b = a + 1;
        const c = a + side + 1;
        const d = a + side;
        if (!(valid[a] && valid[b] && valid[c] && valid[d])) continue;
        // cells wholly outside the barrel, or lost, at every corner carry nothing
        // (min/max read all four corners every time, where && chains would first read some late)
        if (Math.min(vig[a], vig[b], vig[c], vig[d]) > 1.2) continue;
        if (Math.max(geo[a], geo[b], geo[c], geo[d]) < -0.2) continue;
        this.triangle(img, layer, a, b, c, scale);
        this.triangle(img, layer, a, c, d, scale);
      }
    }
  }

  // per-triangle plane coefficients: value = p0 + ox gx + oy gy, coverage = 0.5 + value * inv
  private readonly p0 = new Float64Array(128);
  private readonly pgx = new Float64Array(128);
  private readonly pgy = new Float64Array(128);
  private readonly pinv = new Float64Array(128);
  private planes = 0;
  private readonly cu0 = new Float64Array(3);
  private readonly cugx = new Float64Array(3);
  private readonly cugy = new Float64Array(3);
  private readonly cv0 = new Float64Array(3);
  private readonly cvgx = new Float64Array(3);
  private readonly cvgy = new Float64Array(3);
  private readonly cw = new Float64Array(3);
  private ex1 = 0;
  private ey1 = 0;
  private ex2 = 0;
  private ey2 = 0;

  /**
   * Add a mask plane from its values at the three corners, unless every corner is fully inside
   * it (the plane is affine, so its minimum over the triangle is at a corner). Returns false when
   * every corner is fully outside: the triangle is masked away.
   */
  private addPlane(va: number, vb: number, vc: number): boolean {
    const gx = (vb - va) * this.ex1 - (vc - va) * this.ey1;
    const gy = (vc - va) * this.ex2 - (vb - va) * this.ey2;
    const inv = 1 / Math.max(1e-9, Math.sqrt(gx * gx + gy * gy));
    const lo = Math.min(va, vb, vc);
    const hi = Math.max(va, vb, vc);
    // a pixel's coverage changes by at most one pixel's worth of the plane: half-width 0.5 / inv
    if (lo * inv > 0.5 + 0.71) return true;
    if (hi * inv < -0.5 - 0.71) return false;
    const k = this.planes++;
    this.p0[k] = va;
    this.pgx[k] = gx;
    this.pgy[k] = gy;
    this.pinv[k] = inv;
    return true;
  }

  private triangle(img: FloatImage, layer: Layer, a: number, b: number, c: number, scale: [number, number, number]): void {
    const s = layer.scale;
    const x0 = this.vx[a] / s;
    const y0 = this.vy[a] / s;
    const x1 = this.vx[b] / s;
    const y1 = this.vy[b] / s;
    const x2 = this.vx[c] / s;
    const y2 = this.vy[c] / s;
    const area2 = (x1 - x0) * (y2 - y0) - (x2 - x0) * (y1 - y0);
    if (Math.abs(0.5 * area2) * s * s < SPLAT_AREA_PX) {
      this.splat(img, layer, a, b, c, (x0 + x1 + x2) / 3, (y0 + y1 + y2) / 3, scale);
      return;
    }
    const minX = Math.max(0, Math.ceil(Math.min(x0, x1, x2) - 0.5));
    const maxX = Math.min(layer.w - 1, Math.floor(Math.max(x0, x1, x2) - 0.5));
    const minY = Math.max(0, Math.ceil(Math.min(y0, y1, y2) - 0.5));
    const maxY = Math.min(layer.h - 1, Math.floor(Math.max(y0, y1, y2) - 0.5));
    if (minX > maxX || minY > maxY) return;
    touch(layer, minX, minY, maxX, maxY);
    const inv = 1 / area2;
    this.ex1 = (y2 - y0) * inv;
    this.ey1 = (y1 - y0) * inv;
    this.ex2 = (x1 - x0) * inv;
    this.ey2 = (x2 - x0) * inv;
    this.planes = 0;
    // the barrel: 1 - vignetting ratio; the geometry: rays that missed a sphere or were totally
    // reflected have a negative margin
    const { vig, geo, su, sv, shape } = this;
    if (!this.addPlane(1 - vig[a], 1 - vig[b], 1 - vig[c])) return;
    // the margin is not a distance: only near its zero does it mark an edge
    const ga = geo[a];
    const gb = geo[b];
    const gc = geo[c];
    if (Math.min(ga, gb, gc) < 0.05 && !this.addPlane(ga, gb, gc)) return;
    // blade edges of every stop crossing first, then (for a rounded iris) the circle
    const nb = shape.nx.length;
    const o = shape.offset;
    for (let k = 0; k < this.crossings; k++) {
      const ua = su[a * 3 + k];
      const ub = su[b * 3 + k];
      const uc = su[c * 3 + k];
      const va = sv[a * 3 + k];
      const vb = sv[b * 3 + k];
      const vc = sv[c * 3 + k];
      for (let e = 0; e < nb; e++) {
        const nx = shape.nx[e];
        const ny = shape.ny[e];
        if (!this.addPlane(o - (ua * nx + va * ny), o - (ub * nx + vb * ny), o - (uc * nx + vc * ny))) return;
      }
    }
    const polyPlanes = this.planes;
    // circle: u and v of each crossing, kept only where a corner is near or past the rim
    const { cu0, cugx, cugy, cv0, cvgx, cvgy, cw } = this;
    let nc = 0;
    const { ex1, ey1, ex2, ey2 } = this;
    if (shape.circle) {
      for (let k = 0; k < this.crossings; k++) {
        const ua = su[a * 3 + k];
        const ub = su[b * 3 + k];
        const uc = su[c * 3 + k];
        const va = sv[a * 3 + k];
        const vb = sv[b * 3 + k];
        const vc = sv[c * 3 + k];
        if (Math.max(ua * ua + va * va, ub * ub + vb * vb, uc * uc + vc * vc) < 0.81) continue;
        const ugx = (ub - ua) * ex1 - (uc - ua) * ey1;
        const ugy = (uc - ua) * ex2 - (ub - ua) * ey2;
        const vgx = (vb - va) * ex1 - (vc - va) * ey1;
        const vgy = (vc - va) * ex2 - (vb - va) * ey2;
        cu0[nc] = ua;
        cugx[nc] = ugx;
        cugy[nc] = ugy;
        cv0[nc] = va;
        cvgx[nc] = vgx;
        cvgy[nc] = vgy;
        cw[nc] = Math.max(1e-9, 0.5 * (Math.sqrt(ugx * ugx + ugy * ugy) + Math.sqrt(vgx * vgx + vgy * vgy)));
        nc++;
      }
    }
    const { p0, pgx, pgy, pinv } = this;
    const ea = this.energy[a];
    const eb = this.energy[b];
    const ec = this.energy[c];
    const egx = (eb - ea) * ex1 - (ec - ea) * ey1;
    const egy = (ec - ea) * ex2 - (eb - ea) * ey2;
    const s0 = scale[0];
    const s1 = scale[1];
    const s2 = scale[2];
    // both targets are read on every call: a property first read late (the first full-resolution
    // ghost) would leave V8 without feedback for it and send this function back to the interpreter
    const imgData = img.data;
    const layerData = layer.data;
    const imgWidth = img.width;
    const layerWidth = layer.w;
    const full = layer.scale === 1;
    const d = full ? imgData : layerData;
    const stride = full ? 4 : 3;
    const w = full ? imgWidth : layerWidth;
    // the three barycentric constraints' slopes along a row (see the span below)
    const sl0 = ex1;
    const sl1 = -ey1;
    const sl2 = -(ex1 - ey1);
    for (let py = minY; py <= maxY; py++) {
      const oy = py + 0.5 - y0;
      // the row's span inside the triangle: barycentric weights wb = ox ex1 - oy ey2 and
      // wc = oy ex2 - ox ey1 are affine in ox; solve wb >= 0, wc >= 0, wb + wc <= 1 for ox:
      // each weight is slope * ox + rest >= 0, a lower or an upper bound on ox
      let lo = minX + 0.5 - x0;
      let hi = maxX + 0.5 - x0;
      const r0 = -oy * ey2;
      const r1 = oy * ex2;
      const r2 = 1 - oy * (ex2 - ey2);
      if (sl0 > 0) lo = Math.max(lo, -r0 / sl0);
      else if (sl0 < 0) hi = Math.min(hi, -r0 / sl0);
      else if (r0 < 0) continue;
      if (sl1 > 0) lo = Math.max(lo, -r1 / sl1);
      else if (sl1 < 0) hi = Math.min(hi, -r1 / sl1);
      else if (r1 < 0) continue;
      if (sl2 > 0) lo = Math.max(lo, -r2 / sl2);
      else if (sl2 < 0) hi = Math.min(hi, -r2 / sl2);
      else if (r2 < 0) continue;
      let pxFrom = Math.max(minX, Math.ceil(lo + x0 - 0.5 - 1e-9));
      let pxTo = Math.min(maxX, Math.floor(hi + x0 - 0.5 + 1e-9));
      if (pxFrom > pxTo) continue;
      // Along the row every mask is known in closed form (the planes are affine in x, a circle's
      // squared radius quadratic), so the span is cut to where each mask can be above 0, and split
      // into edge stretches, where masks are evaluated per pixel, and an interior where every mask
      // is at least 1 and only the irradiance is needed. The limits keep MASK_SLACK of headroom
      // (far above rounding), so each pixel gets exactly the value the per-pixel test would give.
      let inFrom = pxFrom;
      let inTo = pxTo;
      const bx = 0.5 - x0; // ox = px + bx
      for (let p = 0; p < polyPlanes && pxFrom <= pxTo; p++) {
        // coverage = a0 + slope * px
        const slope = pgx[p] * pinv[p];
        const a0 = 0.5 + (p0[p] + bx * pgx[p] + oy * pgy[p]) * pinv[p];
        if (slope > 0) {
          pxFrom = Math.max(pxFrom, pixelBound(Math.floor((-MASK_SLACK - a0) / slope)) + 1);
          inFrom = Math.max(inFrom, Math.ceil((1 + MASK_SLACK - a0) / slope));
        } else if (slope < 0) {
          pxTo = Math.min(pxTo, pixelBound(Math.ceil((-MASK_SLACK - a0) / slope)) - 1);
          inTo = Math.min(inTo, Math.floor((1 + MASK_SLACK - a0) / slope));
        } else {
          // (spans start at column 0 or later, so -1 empties them)
          if (a0 <= -MASK_SLACK) pxTo = -1;
          if (a0 < 1 + MASK_SLACK) inTo = -1;
        }
      }
      for (let q = 0; q < nc && pxFrom <= pxTo; q++) {
        // r^2 = qa px^2 + 2 qb px + qc; coverage >= 1 where r <= 1 - cw/2, > 0 only where r < 1 + cw/2
        const au = cu0[q] + bx * cugx[q] + oy * cugy[q];
        const av = cv0[q] + bx * cvgx[q] + oy * cvgy[q];
        const qa = cugx[q] * cugx[q] + cvgx[q] * cvgx[q];
        const qb = au * cugx[q] + av * cvgx[q];
        const qc = au * au + av * av;
        const outer = 1 + 0.5 * cw[q] + MASK_SLACK;
        const inner = 1 - 0.5 * cw[q] - MASK_SLACK;
        if (qa < 1e-18) {
          // (nearly) constant along the row: test it pixel by pixel
          inTo = -1;
          continue;
        }
        const dOut = qb * qb - qa * (qc - outer * outer);
        if (dOut <= 0) {
          pxTo = -1;
          break;
        }
        const sOut = Math.sqrt(dOut);
        pxFrom = Math.max(pxFrom, Math.floor((-qb - sOut) / qa));
        pxTo = Math.min(pxTo, Math.ceil((-qb + sOut) / qa));
        const dIn = inner > 0 ? qb * qb - qa * (qc - inner * inner) : -1;
        if (dIn <= 0) {
          inTo = -1;
          continue;
        }
        const sIn = Math.sqrt(dIn);
        inFrom = Math.max(inFrom, Math.ceil((-qb - sIn) / qa));
        inTo = Math.min(inTo, Math.floor((-qb + sIn) / qa));
      }
      if (pxFrom > pxTo) continue;
      if (inFrom < pxFrom) inFrom = pxFrom;
      if (inTo > pxTo) inTo = pxTo;
      if (inFrom > inTo) {
        inFrom = pxTo + 1;
        inTo = pxTo;
      }
      const row = py * w;
      // the interior, then the left and the right edge stretches (one loop body for both)
      for (let px = inFrom; px <= inTo; px++) {
        const ox = px + 0.5 - x0;
        const e = ea + ox * egx + oy * egy;
        if (e <= 0) continue;
        const i = (row + px) * stride;
        d[i] += e * s0;
        d[i + 1] += e * s1;
        d[i + 2] += e * s2;
      }
      for (let side = 0; side < 2; side++) {
        const from = side === 0 ? pxFrom : Math.max(pxFrom, inTo + 1);
        const to = side === 0 ? inFrom - 1 : pxTo;
        for (let px = from; px <= to; px++) {
          const ox = px + 0.5 - x0;
          let mask = 1;
          for (let p = 0; p < polyPlanes; p++) {
            const cov = 0.5 + (p0[p] + ox * pgx[p] + oy * pgy[p]) * pinv[p];
            if (cov < mask) mask = cov;
            if (mask <= 0) break;
          }
          for (let q = 0; q < nc && mask > 0; q++) {
            const u = cu0[q] + ox * cugx[q] + oy * cugy[q];
            const v = cv0[q] + ox * cvgx[q] + oy * cvgy[q];
            const cov = 0.5 + (1 - Math.sqrt(u * u + v * v)) / cw[q];
            if (cov < mask) mask = cov;
          }
          if (mask <= 0) continue;
          const e = (ea + ox * egx + oy * egy) * mask;
          if (e <= 0) continue;
          const i = (row + px) * stride;
          d[i] += e * s0;
          d[i + 1] += e * s1;
          d[i + 2] += e * s2;
        }
      }
    }
  }

  /**
   * A sub-pixel triangle: half its cell's flux (entrance area x throughput, masked at its centre
   * by the barrel, the geometry and the iris) added at its centroid with bilinear weights.
   */
  private splat(img: FloatImage, layer: Layer, a: number, b: number, c: number, cx: number, cy: number, scale: [number, number, number]): void {
    const third = 1 / 3;
    const vig = (this.vig[a] + this.vig[b] + this.vig[c]) * third;
    const geo = (this.geo[a] + this.geo[b] + this.geo[c]) * third;
    if (vig >= 1 || geo < 0) return;
    for (let k = 0; k < this.crossings; k++) {
      const u = (this.su[a * 3 + k] + this.su[b * 3 + k] + this.su[c * 3 + k]) * third;
      const v = (this.sv[a * 3 + k] + this.sv[b * 3 + k] + this.sv[c * 3 + k]) * third;
      if (irisMargin(this.shape, u, v) < 0) return;
    }
    const thr = (this.thr[a] + this.thr[b] + this.thr[c]) * third;
    // flux in full-resolution pixel units: density x pixel area (1 px^2 at full resolution)
    const flux = 0.5 * this.cellEntrance * thr;
    const full = layer.scale === 1;
    const w = full ? img.width : layer.w;
    const h = full ? img.height : layer.h;
    const stride = full ? 4 : 3;
    const d = full ? img.data : layer.data;
    // a layer pixel covers scale^2 full-resolution pixels: spread the flux as density over it
    const amount = flux / (layer.scale * layer.scale);
    const fx = cx - 0.5;
    const fy = cy - 0.5;
    const ix = Math.floor(fx);
    const iy = Math.floor(fy);
    const tx = fx - ix;
    const ty = fy - iy;
    touch(layer, ix, iy, ix + 1, iy + 1);
    for (let k = 0; k < 4; k++) {
      const x = ix + (k & 1);
      const y = iy + (k >> 1);
      const wgt = (k & 1 ? tx : 1 - tx) * (k >> 1 ? ty : 1 - ty);
      if (x < 0 || y < 0 || x >= w || y >= h || wgt <= 0) continue;
      const i = (y * w + x) * stride;
      d[i] += amount * wgt * scale[0];
      d[i + 1] += amount * wgt * scale[1];
      d[i + 2] += amount * wgt * scale[2];
    }
  }
}

/**
 * Add a layer to the next finer buffer (twice its resolution) by bilinear interpolation, over the
 * part written since the last call, and clear that part. Values are densities per full-resolution
 * pixel, so interpolating keeps the energy. `into`, when the target is itself a layer, has its
 * written box and use mark extended.
 */
function upsample2x(layer: Layer, out: Float32Array, ow: number, oh: number, stride: number, into: Layer | undefined): void {
  const { w, h, data } = layer;
  // target pixels whose bilinear footprint reaches a written layer pixel
  const xa = Math.max(0, 2 * layer.bx0 - 1);
  const xb = Math.min(ow - 1, 2 * layer.bx1 + 2);
  const ya = Math.max(0, 2 * layer.by0 - 1);
  const yb = Math.min(oh - 1, 2 * layer.by1 + 2);
  if (into) {
    touch(into, xa, ya, xb, yb);
    into.used = true;
  }
  const row = new Float32Array(w * 3);
  // the horizontal taps and weights repeat on every row: work them out once
  const span = xb - xa + 1;
  const i0s = new Int32Array(span);
  const i1s = new Int32Array(span);
  const txs = new Float32Array(span);
  for (let x = xa; x <= xb; x++) {
    const fx = Math.min(w - 1, Math.max(0, (x + 0.5) / 2 - 0.5));
    const x0 = Math.floor(fx);
    i0s[x - xa] = x0 * 3;
    i1s[x - xa] = Math.min(w - 1, x0 + 1) * 3;
    txs[x - xa] = fx - x0;
  }
  for (let y = ya; y <= yb; y++) upsampleRow(data, w, h, y, row, xa, xb, i0s, i1s, txs, out, ow, stride);
  const by0 = Math.max(0, layer.by0);
  const by1 = Math.min(h - 1, layer.by1);
  const bx0 = Math.max(0, layer.bx0);
  const bx1 = Math.min(w - 1, layer.bx1);
  for (let y = by0; y <= by1; y++) data.fill(0, (y * w + bx0) * 3, (y * w + bx1 + 1) * 3);
}

/**
 * Target row y of upsample2x (its own function so V8 optimises it by call count in a thread's
 * first frame instead of compiling the whole layer walk on stack replacement).
 */
function upsampleRow(data: Float32Array, w: number, h: number, y: number, row: Float32Array, xa: number, xb: number, i0s: Int32Array, i1s: Int32Array, txs: Float32Array, out: Float32Array, ow: number, stride: number): void {
  const fy = Math.min(h - 1, Math.max(0, (y + 0.5) / 2 - 0.5));
  const y0 = Math.floor(fy);
  const y1 = Math.min(h - 1, y0 + 1);
  const ty = fy - y0;
  // the layer row interpolated at this height, over the columns the span needs
  const ca = Math.max(0, (xa >> 1) - 1);
  const cb = Math.min(w - 1, (xb >> 1) + 1);
  for (let i = ca * 3; i < (cb + 1) * 3; i++) row[i] = data[y0 * w * 3 + i] + (data[y1 * w * 3 + i] - data[y0 * w * 3 + i]) * ty;
  const base = y * ow;
  // away from the layer's first and last columns the taps are fixed: target column 2k takes
  // 3/4 of layer column k and 1/4 of k - 1, column 2k + 1 3/4 of k and 1/4 of k + 1; walked in
  // pairs with the three columns in registers. The edges take the general taps.
  let fast0 = Math.max(xa, 2);
  if (fast0 & 1) fast0++;
  const fast1 = Math.min(xb, 2 * w - 3);
  for (let x = xa; x <= xb; x++) {
    if (x === fast0 && fast0 + 1 <= fast1) {
      let k3 = (x >> 1) * 3;
      let o = (base + x) * stride;
      for (; x + 1 <= fast1; x += 2, k3 += 3, o += 2 * stride) {
        const a0 = row[k3 - 3];
        const a1 = row[k3 - 2];
        const a2 = row[k3 - 1];
        const b0 = row[k3];
        const b1 = row[k3 + 1];
        const b2 = row[k3 + 2];
        const c0 = row[k3 + 3];
        const c1 = row[k3 + 4];
        const c2 = row[k3 + 5];
        out[o] += a0 + (b0 - a0) * 0.75;
        out[o + 1] += a1 + (b1 - a1) * 0.75;
        out[o + 2] += a2 + (b2 - a2) * 0.75;
        out[o + stride] += b0 + (c0 - b0) * 0.25;
        out[o + stride + 1] += b1 + (c1 - b1) * 0.25;
        out[o + stride + 2] += b2 + (c2 - b2) * 0.25;
      }
      if (x > xb) return;
    }
    const k = x - xa;
    const i0 = i0s[k];
    const i1 = i1s[k];
    const tx = txs[k];
    const o = (base + x) * stride;
    out[o] += row[i0] + (row[i1] - row[i0]) * tx;
    out[o + 1] += row[i0 + 1] + (row[i1 + 1] - row[i0 + 1]) * tx;
    out[o + 2] += row[i0 + 2] + (row[i1 + 2] - row[i0 + 2]) * tx;
  }
}
