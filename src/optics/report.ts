// What `straylight lens` reports: the lens's computed first-order data and its ghosts ranked by
// strength (the drawing is plot/lens.ts).

import { prepareLens, type LensSystem } from './ghost-system.js';
import { ghostPath, type LensModel } from './lens.js';
import { RayHit, planPath, traceRay } from './trace.js';

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
