// Real (sequential) ray tracing through spherical surfaces along a light path: Snell's law in
// vector form, mirror reflection, the vertex-side intersection of each sphere.
//
// Rays are not killed at the barrel: each ray records the largest ratio of its height to a
// surface's clear semi-diameter ("vignetting"), and where it crosses the stop plane, so the
// renderer can cut both edges smoothly by interpolating them across a triangle. Where geometry
// fails (a ray misses a sphere, or is totally internally reflected) the ray is not dropped either:
// it is continued at grazing and records how far past the limit it went ("margin" < 0), so those
// edges too come out smooth instead of snapping to the ray grid.

import { reflectance } from './coating.js';
import { indexAfter, indexBefore, vertexZ, type LensModel, type LightPath } from './lens.js';

/** Everything about one path at one wavelength that does not depend on the ray. */
export interface PathPlan {
  n: number;
  z: Float64Array;
  radius: Float64Array;
  semi: Float64Array;
  /** index on the side the ray arrives from, and on the other side */
  nIn: Float64Array;
  nOut: Float64Array;
  reflect: Uint8Array;
  stop: Uint8Array;
  /** 1 / radius (0 for a plane), 1 / semi-diameter^2 and nIn / nOut, so tracing multiplies */
  invRadius: Float64Array;
  invSemi2: Float64Array;
  eta: Float64Array;
  /** for refractions: normal-incidence transmission 1 - R (coating included) over the bare one */
  transmit: Float64Array;
  /** for reflections: coating layers in the order the ray meets them */
  layers: { index: number; thicknessNm: number }[][];
  /** for reflections: reflectance tabulated over the incidence cosine (REFLECT_STEPS + 1 values) */
  reflectTable: (Float64Array | null)[];
  sensorZ: number;
  nm: number;
  stopRadiusMm: number;
  /** the lens's front barrel/hood opening (radius 0: none) */
  hoodZ: number;
  hoodRadius: number;
}

/** Steps of the reflectance table over the incidence cosine (its error is below 1e-4 relative). */
const REFLECT_STEPS = 256;

/**
 * Reflectance against the incidence cosine, tabulated; rows are spaced in cos^2 so they are
 * dense near grazing and near the critical angle, where reflectance changes fastest.
 */
function reflectTable(n0: number, ns: number, layers: { index: number; thicknessNm: number }[], nm: number): Float64Array {
  const t = new Float64Array(REFLECT_STEPS + 1);
  for (let k = 0; k <= REFLECT_STEPS; k++) t[k] = reflectance(n0, ns, layers, nm, Math.sqrt(k / REFLECT_STEPS));
  return t;
}

function lookupReflect(t: Float64Array, cos: number): number {
  const f = Math.min(1, cos * cos) * REFLECT_STEPS;
  const i = Math.min(REFLECT_STEPS - 1, Math.floor(f));
  const w = f - i;
  return t[i] + (t[i + 1] - t[i]) * w;
}

export function planPath(lens: LensModel, path: LightPath, nm: number, stopRadiusMm: number): PathPlan {
  const n = path.length;
  const zs = vertexZ(lens);
  const plan: PathPlan = {
    n,
    z: new Float64Array(n),
    radius: new Float64Array(n),
    semi: new Float64Array(n),
    nIn: new Float64Array(n),
    nOut: new Float64Array(n),
    reflect: new Uint8Array(n),
    stop: new Uint8Array(n),
    invRadius: new Float64Array(n),
    invSemi2: new Float64Array(n),
    eta: new Float64Array(n),
    transmit: new Float64Array(n),
    layers: [],
    reflectTable: [],
    sensorZ: zs[zs.length - 1],
    nm,
    stopRadiusMm,
    hoodZ: lens.hood ? -lens.hood.depthMm : 0,
    hoodRadius: lens.hood ? lens.hood.radiusMm : 0,
  };
  path.forEach((ev, e) => {
    const s = lens.surfaces[ev.surface];
    const front = indexBefore(lens, ev.surface, nm);
    const back = indexAfter(lens, ev.surface, nm);
    plan.z[e] = zs[ev.surface];
    plan.radius[e] = s.radiusMm;
    plan.semi[e] = s.semiDiameterMm;
    plan.nIn[e] = ev.dir === 1 ? front : back;
    plan.nOut[e] = ev.dir === 1 ? back : front;
    plan.reflect[e] = ev.action === 'reflect' ? 1 : 0;
    plan.stop[e] = s.stop ? 1 : 0;
    plan.invRadius[e] = s.radiusMm === 0 ? 0 : 1 / s.radiusMm;
    plan.invSemi2[e] = 1 / (s.semiDiameterMm * s.semiDiameterMm);
    plan.eta[e] = plan.nIn[e] / plan.nOut[e];
    const layers = ev.dir === 1 ? s.coating : [...s.coating].reverse();
    plan.layers.push(layers);
    plan.reflectTable.push(ev.action === 'reflect' && !s.stop ? reflectTable(plan.nIn[e], plan.nOut[e], layers, nm) : null);
    // the coating's gain in transmission at normal incidence; the angle enters through the bare
    // Fresnel transmission at trace time (it falls to 0 at grazing incidence)
    plan.transmit[e] = s.stop ? 1 : (1 - reflectance(plan.nIn[e], plan.nOut[e], layers, nm, 1)) / (1 - reflectance(plan.nIn[e], plan.nOut[e], [], nm, 1));
  });
  return plan;
}

/** The result of tracing one ray; reused between rays to avoid allocation. */
export class RayHit {
  ok = false;
  /** position on the sensor plane, mm */
  x = 0;
  y = 0;
  /** stop-plane positions over the stop radius, one per crossing */
  stopU = new Float64Array(3);
  stopV = new Float64Array(3);
  stopCount = 0;
  /** largest height / clear semi-diameter met along the path */
  vignette = 0;
  /** reflectances of the reflections times transmissions of the refractions */
  throughput = 1;
  /** smallest geometric slack met (sphere discriminant / r^2, 1 - sin^2 of refraction); < 0 = lost */
  margin = 1;
  /** how many of the path's surfaces it met (all, unless lost running parallel to a plane) */
  met = 0;
  /** where it met the path's last surface (z, y for a plot) */
  px = 0;
  py = 0;
  pz = 0;
  /** direction cosines when it reached the sensor */
  dx = 0;
  dy = 0;
  dz = 1;
}

/**
 * Trace a ray from (ox, oy, oz) along the unit vector (dx, dy, dz) through the planned path to the
 * sensor plane. Returns false if it is lost.
 *
 * Written for V8's optimiser: every double stays unboxed in the loop. Three patterns here once made
 * it box them (2.7 kB of garbage a ray, and more than a third of the time): a step variable set
 * to 0 on one branch and tested after the branches, an optional `points` array pushed to in the
 * loop (even when absent), and the direction parameters reassigned in the loop. The path's points
 * for a plot come from tracePoints instead.
 */
export function traceRay(plan: PathPlan, ox: number, oy: number, oz: number, dx0: number, dy0: number, dz0: number, out: RayHit): boolean {
  // the unary plus makes these plain doubles for the optimiser; a parameter reassigned in the loop
  // was kept as a tagged value instead, and every new direction was boxed
  let px = +ox;
  let py = +oy;
  let pz = +oz;
  let dx = +dx0;
  let dy = +dy0;
  let dz = +dz0;
  out.ok = false;
  out.met = 0;
  out.stopCount = 0;
  out.vignette = 0;
  // kept in locals while tracing, stored at the end
  let throughput = 1;
  let margin = 1;
  let vig2 = 0;
  if (plan.hoodRadius > 0 && dz > 0) {
    // the hood's opening counts like a clear aperture (a ray launched behind it is not checked)
    const t = (plan.hoodZ - pz) / dz;
    if (t >= 0) vig2 = ((px + t * dx) ** 2 + (py + t * dy) ** 2) / (plan.hoodRadius * plan.hoodRadius);
  }
  const { z: zs, radius: radii, invRadius, stop, invSemi2, reflect, reflectTable, eta: etas, nIn, nOut, transmit } = plan;
  const events = plan.n;
  for (let e = 0; e < events; e++) {
    const zv = zs[e];
    const r = radii[e];
    // intersection with the surface; each branch moves the ray there itself (a step variable
    // shared by both, 0 on one branch, made V8 box every double in the loop: 2.7 kB of garbage a ray)
    let nx = 0;
    let ny = 0;
    let nz = -1;
    if (r === 0) {
      if (Math.abs(dz) < 1e-12) return false;
      const t = (zv - pz) / dz;
      px += t * dx;
      py += t * dy;
      pz += t * dz;
    } else {
      const cz = zv + r;
      const ocz = pz - cz;
      const b = px * dx + py * dy + ocz * dz;
      const c = px * px + py * py + ocz * ocz - r * r;
      let disc = b * b - c;
      const ir = invRadius[e];
      const slack = disc * ir * ir;
      if (slack < margin) margin = slack;
      if (disc < 0) disc = 0; // continue at the tangent point; the margin says it missed
      const sq = Math.sqrt(disc);
      // of the two crossings, keep the one on the vertex's side of the centre: (z - cz) has the sign of -r
      const t1 = -b - sq;
      const t2 = -b + sq;
      const z1 = pz + t1 * dz - cz;
      const t = z1 * -r > 0 ? t1 : t2;
      px += t * dx;
      py += t * dy;
      pz += t * dz;
      nx = px * ir;
      ny = py * ir;
      nz = (pz - cz) * ir;
    }
    if (stop[e]) {
      if (out.stopCount < 3) {
        out.stopU[out.stopCount] = px / plan.stopRadiusMm;
        out.stopV[out.stopCount] = py / plan.stopRadiusMm;
        out.stopCount++;
      }
      continue;
    }
    // the squared ratio here (no square root per surface); the root is taken once at the end
    const v2 = (px * px + py * py) * invSemi2[e];
    if (v2 > vig2) vig2 = v2;
    // orient the normal against the ray
    let cosi = -(nx * dx + ny * dy + nz * dz);
    if (cosi < 0) {
      nx = -nx;
      ny = -ny;
      nz = -nz;
      cosi = -cosi;
    }
    if (reflect[e]) {
      throughput *= lookupReflect(reflectTable[e]!, cosi);
      dx += 2 * cosi * nx;
      dy += 2 * cosi * ny;
      dz += 2 * cosi * nz;
    } else {
      const eta = etas[e];
      let k = 1 - eta * eta * (1 - cosi * cosi);
      if (k < margin) margin = k;
      if (k < 0) k = 0; // total internal reflection: continue at grazing; the margin says it is lost
      const cost = Math.sqrt(k);
      const f = eta * cosi - cost;
      dx = eta * dx + f * nx;
      dy = eta * dy + f * ny;
      dz = eta * dz + f * nz;
      // bare Fresnel transmission at this angle (Smith eq. 11.1), times the coating's gain
      const n1 = nIn[e];
      const n2 = nOut[e];
      // at grazing incidence (and past total internal reflection, where the ray goes on at grazing)
      // nothing is transmitted; the formulas would divide 0 by 0 there
      const ds = n1 * cosi + n2 * cost;
      const dp = n2 * cosi + n1 * cost;
      if (ds > 0 && dp > 0) {
        const rs = (n1 * cosi - n2 * cost) / ds;
        const rp = (n2 * cosi - n1 * cost) / dp;
        throughput *= (1 - 0.5 * (rs * rs + rp * rp)) * transmit[e];
      } else throughput = 0;
    }
  }
  out.met = events;
  out.px = px;
  out.py = py;
  out.pz = pz;
  out.vignette = Math.sqrt(vig2);
  out.margin = margin;
  // a ray continued past a miss or total internal reflection (margin < 0) can meet later surfaces
  // at impossible angles; it carries no light (and must not carry NaN into the interpolation)
  out.throughput = throughput >= 0 && Number.isFinite(throughput) ? throughput : 0;
  if (dz <= 1e-12 || !Number.isFinite(px + py + dx + dy)) return false;
  const t = (plan.sensorZ - pz) / dz;
  out.x = px + t * dx;
  out.y = py + t * dy;
  out.dx = dx;
  out.dy = dy;
  out.dz = dz;
  out.ok = true;
  return true;
}

/**
 * The (z, y) points where a ray meets each surface of the path and then the sensor, for drawing
 * (each prefix of the path traced again: cheap for one ray, and it keeps the tracer lean).
 * Empty when the ray is lost.
 */
export function tracePoints(plan: PathPlan, ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, out: RayHit): number[] {
  const pts: number[] = [];
  for (let k = 1; k <= plan.n; k++) {
    // a prefix ending after a reflection heads away from the sensor: only the surfaces count here
    traceRay({ ...plan, n: k }, ox, oy, oz, dx, dy, dz, out);
    if (out.met !== k) return [];
    pts.push(out.pz, out.py);
  }
  if (!traceRay(plan, ox, oy, oz, dx, dy, dz, out)) return [];
  pts.push(plan.sensorZ, out.y);
  return pts;
}
