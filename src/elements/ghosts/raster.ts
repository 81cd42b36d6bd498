// Rasterising one traced ghost grid: each grid cell becomes two triangles on the sensor; per
// pixel the irradiance, the barrel-vignetting ratio, the geometry margin and the stop-plane
// position are interpolated across the triangle, and the iris polygon (or circle) and the
// barrel's edge cut the ghost with anti-aliased edges. Rows are cut in closed form into edge
// stretches (masks per pixel) and an interior (irradiance only). Sub-pixel triangles (caustics)
// are splatted as points carrying their exact flux. GridRaster holds the grid's per-vertex data;
// GhostGrid (grid.ts) fills it by tracing.

import { irisMargin, type IrisShape } from '../../optics/iris.js';
import type { FloatImage } from '../../raster/image.js';
import { pixelBound, touch, type Layer } from './layers.js';

/** Triangles smaller than this (px^2, full resolution) are drawn as point splats of their flux. */
export const SPLAT_AREA_PX = 1;

/** Headroom on the mask limits along a row (coverage units; rounding is below 1e-12). */
const MASK_SLACK = 1e-6;

/** Box literals list x0, y0, x1, y1 in that order everywhere: one object shape for V8. */
export interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

/** The per-vertex data of a traced ghost grid (n x n cells), and its rasterisation. */
export class GridRaster {
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
  /** entrance area of one grid cell, mm^2 (foreshortened) */
  cellEntrance = 0;

  constructor(
    n: number,
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
  }

  /** Move the traced grid on the frame by (dx, dy) px (a ghost drawn at several places of its motion). */
  shift(dx: number, dy: number): void {
    const { vx, vy } = this;
    for (let v = 0; v < vx.length; v++) {
      vx[v] += dx;
      vy[v] += dy;
    }
  }

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
    // the pixels the rows' spans reach after the masks: the layer's written box grows by these
    // only (a triangle the barrel or the iris cuts away leaves it as it was), so what reads the
    // box (the shutter's smear of a ghost, the cascade) covers what was drawn, not the ray grid's
    // whole reach
    let wx0 = maxX + 1;
    let wx1 = minX - 1;
    let wy0 = maxY + 1;
    let wy1 = minY - 1;
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
      if (pxFrom < wx0) wx0 = pxFrom;
      if (pxTo > wx1) wx1 = pxTo;
      if (py < wy0) wy0 = py;
      wy1 = py;
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
    if (wx1 >= wx0) touch(layer, wx0, wy0, wx1, wy1);
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
