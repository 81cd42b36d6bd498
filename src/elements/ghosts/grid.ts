// Tracing one ghost's ray grid: the parallel rays of the light's direction over a box of the
// entrance plane, traced along the ghost's path (reflect at i, back to j, on to the sensor), each
// vertex's sensor position, throughput, barrel vignetting, geometry margin and stop-plane position;
// the irradiance per vertex (entrance area over sensor area); fitting the box to the rays that pass;
// and the faint-ghost colour match. Drawing is GridRaster's (raster.ts).

import type { IrisShape } from '../../optics/iris.js';
import type { LensSystem, RankedGhost } from '../../optics/ghost-system.js';
import { RayHit, traceRay, type PathPlan } from '../../optics/trace.js';
import { GridRaster, SPLAT_AREA_PX, type Box } from './raster.js';
import type { GhostView } from './view.js';

/** How far inside the barrel and geometry edges (in their own measures) a colour probe fades in. */
const PROBE_FADE = 0.05;
/** Where in a ghost's ray box colourMatch probes (fractions of the box). */
const COLOUR_PROBES: readonly [number, number][] = [[0.5, 0.5], [0.3, 0.3], [0.7, 0.3], [0.3, 0.7], [0.7, 0.7]];

const hit = new RayHit();

/**
 * Where the ghost's chief ray (through the middle of the iris) lands on the frame, in pixels, for
 * a light seen along slopes (sx, sy); undefined when the ray is lost. A ghost's motion across the
 * frame follows it (the paraxial position ratio misses the lens's distortion by several per cent).
 */
export function chiefLanding(system: LensSystem, view: GhostView, ghost: RankedGhost, plan: PathPlan, sx: number, sy: number, stopRadius: number, pxX: number, pxY: number): [number, number] | undefined {
  const crossing = ghost.stopCrossings.find((c) => Math.abs(c.a) > 1e-9);
  if (!crossing) return undefined;
  const norm = 1 / Math.sqrt(1 + sx * sx + sy * sy);
  const dx = sx * norm;
  const dy = sy * norm;
  const dz = norm;
  const launch = Math.max(system.lens.surfaces[0].semiDiameterMm + 10, (system.lens.hood?.depthMm ?? 0) + 1);
  const gx = (-crossing.b * sx) / crossing.a;
  const gy = (-crossing.b * sy) / crossing.a;
  plan.stopRadiusMm = stopRadius;
  if (!traceRay(plan, gx - (launch * dx) / dz, gy - (launch * dy) / dz, -launch, dx, dy, dz, hit)) return undefined;
  return [view.opticalCentre[0] - hit.x * pxX, view.opticalCentre[1] - hit.y * pxY];
}

/** The traced grid of one ghost at one wavelength (drawn by the GridRaster it extends). */
export class GhostGrid extends GridRaster {
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
    shape: IrisShape,
  ) {
    super(n, shape);
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

  /** the largest flux per pixel of a passing cell folded below a pixel, from the last trace */
  private foldedPeak = 0;
}
