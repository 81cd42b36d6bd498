// What `straylight lens` reports: the lens's computed first-order data and its ghosts ranked by
// strength, and a cross-section plot with the strongest ghost's traced rays.

import { FloatImage } from '../raster/image.js';
import { drawLine, drawPolyline, fill, type Rgb } from '../raster/draw.js';
import { prepareLens, type LensSystem } from './ghost-system.js';
import { ghostPath, vertexZ, type LensModel } from './lens.js';
import { RayHit, planPath, tracePoints, traceRay } from './trace.js';

export interface GhostRow {
  /** the ghost's name in a shot's flare.ghosts.paths and solo: "first-second" */
  name: string;
  /** 1-based surface numbers, front to back: reflected first at `first`, then at `second` */
  first: number;
  second: number;
  k: number;
  /**
   * radius of the ghost on the sensor for a light on the axis at the widest aperture, mm: from the
   * rays that get through the barrel, the hood and the stop (as the renderer draws it); 0 when the
   * barrel cuts it away entirely
   */
  radiusMm: number;
  /** the paraxial radius, which ignores the clear apertures, mm */
  paraxialRadiusMm: number;
  /** paraxial peak over entering irradiance, times the path's transmission (as rendered) */
  strength: number;
  /** the transmission of the path's refractions at normal incidence (coatings included) */
  transmission: number;
  tint: string;
  tintRgb: [number, number, number];
}

export interface LensReport {
  name: string;
  note: string;
  focalLengthMm: number;
  fNumberMin: number;
  entrancePupilMm: number;
  sensorWidthMm: number;
  squeeze: number;
  glassSurfaces: number;
  ghostCount: number;
  ghosts: GhostRow[];
}

/** A plain word for a tint (largest channel 1). */
export function tintName([r, g, b]: readonly number[]): string {
  const max = Math.max(r, g, b);
  const min = Math.min(r, g, b);
  if (max - min < 0.12) return 'neutral';
  const d = max - min;
  let h = max === r ? ((g - b) / d) % 6 : max === g ? (b - r) / d + 2 : (r - g) / d + 4;
  h = (h * 60 + 360) % 360;
  const names: [number, string][] = [[20, 'red'], [45, 'orange'], [70, 'yellow'], [160, 'green'], [200, 'cyan'], [250, 'blue'], [290, 'violet'], [335, 'magenta'], [360, 'red']];
  return names.find(([limit]) => h < limit)![1];
}

/** Rays across the front (a meridional line) traced for each ghost's clipped size. */
const SIZE_RAYS = 401;

export function lensReport(lens: LensModel, system: LensSystem = prepareLens(lens, 'medium', 0)): LensReport {
  const ep = system.focalLengthMm / lens.fNumberMin;
  const stopRadius = (ep / 2) * system.stopRatio;
  // traced as the renderer traces: through the lens with its hood, parallel rays from in front
  const traced = system.lens;
  const front = traced.surfaces[0].semiDiameterMm * 1.25;
  const launch = Math.max(traced.surfaces[0].semiDiameterMm + 10, (traced.hood?.depthMm ?? 0) + 1);
  const hit = new RayHit();
  const through = () => {
    if (hit.vignette > 1 || hit.margin < 0) return false;
    for (let c = 0; c < hit.stopCount; c++) if (hit.stopU[c] ** 2 + hit.stopV[c] ** 2 > 1) return false;
    return true;
  };
  const ghosts = system.ranked.map((g) => {
    const limiting = g.stopCrossings.reduce((best, c) => (Math.abs(c.a) > Math.abs(best.a) ? c : best), g.stopCrossings[0]);
    const entryRadius = limiting && Math.abs(limiting.a) > 1e-9 ? stopRadius / Math.abs(limiting.a) : ep / 2;
    const hex = g.tint.map((c) => Math.round(Math.max(0, Math.min(1, c)) * 255).toString(16).padStart(2, '0')).join('');
    const plan = planPath(traced, ghostPath(traced, g), 550, stopRadius);
    // the axial ray meets every surface at normal incidence: its throughput is R_i R_j times the
    // transmissions of the path's refractions
    const axial = traceRay(plan, 0, 0, -launch, 0, 0, 1, hit) && g.reflectance > 0 ? hit.throughput / g.reflectance : 1;
    // the ghost of a light on the axis, as far across as the rays that get through reach
    let lo = Infinity;
    let hi = -Infinity;
    for (let s = 0; s < SIZE_RAYS; s++) {
      const x = -front + (2 * front * s) / (SIZE_RAYS - 1);
      if (!traceRay(plan, x, 0, -launch, 0, 0, 1, hit) || !through()) continue;
      lo = Math.min(lo, hit.x);
      hi = Math.max(hi, hit.x);
    }
    return {
      name: `${g.i + 1}-${g.j + 1}`,
      first: g.i + 1,
      second: g.j + 1,
      k: g.k,
      radiusMm: hi >= lo ? (hi - lo) / 2 : 0,
      paraxialRadiusMm: Math.abs(g.a) * entryRadius,
      strength: g.strength * axial,
      transmission: axial,
      tint: `${tintName(g.tint)} #${hex}`,
      tintRgb: g.tint,
    };
  });
  return {
    name: lens.name,
    note: lens.note,
    focalLengthMm: system.focalLengthMm,
    fNumberMin: lens.fNumberMin,
    entrancePupilMm: ep,
    sensorWidthMm: lens.sensorWidthMm,
    squeeze: lens.squeeze,
    glassSurfaces: lens.surfaces.filter((s) => !s.stop).length,
    ghostCount: system.ranked.length,
    ghosts,
  };
}

export function formatLensReport(r: LensReport, source: string, limit = 20): string {
  const lines = [
    `lens      ${r.name} (${source})${r.note ? `: ${r.note}` : ''}`,
    `focal     ${r.focalLengthMm.toFixed(2)} mm (computed from the prescription at the d line)`,
    `aperture  f/${r.fNumberMin} widest; entrance pupil ${r.entrancePupilMm.toFixed(2)} mm across`,
    `sensor    ${r.sensorWidthMm} mm wide${r.squeeze !== 1 ? `; anamorphic squeeze ${r.squeeze}x` : ''}`,
    `ghosts    ${r.ghostCount} two-reflection paths from ${r.glassSurfaces} reflecting surfaces; strongest first:`,
    '',
    '  rank  ghost  reflects at  position k  radius mm  strength   tint',
  ];
  r.ghosts.slice(0, limit).forEach((g, n) => {
    lines.push(
      `  ${String(n + 1).padStart(4)}  ${g.name.padEnd(5)}  ${`${g.first} then ${g.second}`.padEnd(11)}  ${g.k.toFixed(3).padStart(10)}  ${g.radiusMm.toFixed(2).padStart(9)}  ${g.strength.toExponential(1).padStart(8)}   ${g.tint}`,
    );
  });
  if (r.ghosts.length > limit) lines.push(`  ... ${r.ghosts.length - limit} weaker (--all lists every one)`);
  lines.push('', 'ghost: its name in a shot (flare.ghosts.paths, solo); k: ghost centre over the light\'s image height (negative: across the centre); radius: of the rays that');
  lines.push('get through the barrel and the stop, light on the axis, widest aperture; strength: paraxial peak irradiance over');
  lines.push('the irradiance entering the lens, times the transmission of the path\'s other surfaces.');
  return lines.join('\n') + '\n';
}

const INK: Rgb = [0.85, 0.85, 0.85];
const GLASS: Rgb = [0.35, 0.55, 0.85];
const STOP: Rgb = [1, 0.8, 0.2];
const RAY: Rgb = [1, 0.35, 0.25];

/** Cross-section of the lens (meridional plane) with the strongest ghost's rays, as an image. */
export function lensPlot(lens: LensModel, system: LensSystem, widthPx = 1400, heightPx = 600): FloatImage {
  const img = new FloatImage(widthPx, heightPx);
  fill(img, [0.04, 0.04, 0.05]);
  const z = vertexZ(lens);
  const maxSemi = Math.max(...lens.surfaces.filter((s) => !s.stop).map((s) => s.semiDiameterMm));
  const lengthMm = z[z.length - 1];
  const margin = 40;
  const scale = Math.min((widthPx - 2 * margin) / (lengthMm + 10), (heightPx - 2 * margin) / (2.4 * maxSemi));
  const X = (zz: number) => margin + (zz + 5) * scale;
  const Y = (yy: number) => heightPx / 2 - yy * scale;
  drawLine(img, X(-5), Y(0), X(lengthMm + 5), Y(0), 1, [0.3, 0.3, 0.3]);
  // sensor
  drawLine(img, X(lengthMm), Y(-lens.sensorWidthMm / 2), X(lengthMm), Y(lens.sensorWidthMm / 2), 2, INK);
  lens.surfaces.forEach((s, k) => {
    const h = s.semiDiameterMm;
    if (s.stop) {
      const r = (system.focalLengthMm / (2 * lens.fNumberMin)) * system.stopRatio;
      drawLine(img, X(z[k]), Y(r), X(z[k]), Y(r + 0.25 * maxSemi), 3, STOP);
      drawLine(img, X(z[k]), Y(-r), X(z[k]), Y(-r - 0.25 * maxSemi), 3, STOP);
      return;
    }
    // the surface's profile: sag z(y) = R - sign(R) sqrt(R^2 - y^2)
    const pts: number[] = [];
    for (let t = -1; t <= 1.0001; t += 0.05) {
      const y = t * h;
      const sag = s.radiusMm === 0 ? 0 : s.radiusMm - Math.sign(s.radiusMm) * Math.sqrt(Math.max(0, s.radiusMm ** 2 - y * y));
      pts.push(X(z[k] + sag), Y(y));
    }
    drawPolyline(img, pts, 2, s.glass.kind === 'air' && (k === 0 || lens.surfaces[k - 1].glass.kind === 'air') ? INK : GLASS);
  });
  // the strongest ghost: a fan of meridional rays from a light slightly off axis
  const g = system.ranked[0];
  if (g) {
    const plan = planPath(lens, ghostPath(lens, g), 550, (system.focalLengthMm / (2 * lens.fNumberMin)) * system.stopRatio);
    const hit = new RayHit();
    const slope = 0.05;
    const norm = 1 / Math.hypot(1, slope);
    const ep = system.focalLengthMm / (2 * lens.fNumberMin);
    for (let t = -1; t <= 1.0001; t += 0.25) {
      const y0 = t * ep * 0.95;
      const launch = 5;
      const pts = tracePoints(plan, 0, y0 - launch * slope, -launch, 0, slope * norm, norm, hit);
      if (pts.length === 0 || hit.vignette > 1) continue;
      const xy: number[] = [X(-launch), Y(y0 - launch * slope)];
      for (let q = 0; q < pts.length; q += 2) xy.push(X(pts[q]), Y(pts[q + 1]));
      drawPolyline(img, xy, 1.2, RAY);
    }
  }
  return img;
}
