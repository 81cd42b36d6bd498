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
import type { LensSystem } from '../../optics/ghost-system.js';
import type { FloatImage } from '../../raster/image.js';
import { GhostGrid } from './grid.js';
import { cascadeLayers, layersFor } from './layers.js';
import { FAINT_PEAK, INVISIBLE, ghostDrawing } from './lod.js';
import { lightSlopes, pxPerMm, type GhostFrameSettings, type GhostLight, type GhostStats, type GhostView } from './view.js';

export { FAINT_PEAK } from './lod.js';
export { lightSlopes, pxPerMm } from './view.js';
export type { GhostFrameSettings, GhostLight, GhostStats, GhostView } from './view.js';

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
  const coarse = new GhostGrid(system, Math.min(FIT_GRID, system.grid), view, sx, sy, stopRadius, pxX, pxY, shape);
  const gridOf = (n: number) => (n === coarse.n ? coarse : new GhostGrid(system, n, view, sx, sy, stopRadius, pxX, pxY, shape));
  const grid = gridOf(system.grid);
  const faintGrid = system.faintGrid === system.grid ? grid : gridOf(system.faintGrid);
  // the fitting trace is at this wavelength: drawn with the fitting grid, it needs no trace again
  const fitNm = system.samples[centre].nm;
  const share = settings.share;
  for (let g = 0; g < system.kept; g++) {
    if (share && g % share.count !== share.index) continue;
    const ghost = system.ranked[g];
    // per-ghost switches, gains and tints from the shot
    let own: readonly [number, number, number] = ONE;
    if (settings.paths) {
      const p = settings.paths.get(`${ghost.i + 1}-${ghost.j + 1}`);
      if (p === undefined ? settings.only : p[0] <= 0 && p[1] <= 0 && p[2] <= 0) continue;
      if (p) own = p;
    }
    // paraxial peak estimate: skip what cannot reach a visible value
    const peak = (lum / epArea) * ghost.strength * mm2PerPx * settings.gain * (own === ONE ? 1 : Math.max(own[0], own[1], own[2]));
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
    const { faint, level } = ghostDrawing(coarse, peak, lum / epArea, settings.gain, multiRes, faintPeak);
    const layer = layers[level];
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
      fine.draw(img, layer, [e0[0] * weight[0] * tone[0] * k, e0[1] * weight[1] * tone[1] * k, e0[2] * weight[2] * tone[2] * k]);
    }
    if (stats) stats.drawn++;
  }
  // cascade the coarse layers down, each into the next finer one (2x bilinear), so the full frame
  // is walked once however many layers were used
  cascadeLayers(layers, img.data, img.width, img.height);
}
