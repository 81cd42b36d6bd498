// The data of `lens --plot-ghosts`: the lens's ghosts rendered for one light on a 1920x1080 frame
// (shown at half size, draft quality, exposure raised so the faint ones show), and where the
// strongest ghosts' centres are, by the names of the ghost table.

import { addGhosts } from '../elements/ghosts/index.js';
import { encodePng } from '../io/png.js';
import { prepareLens } from '../optics/ghost-system.js';
import type { LensModel } from '../optics/lens.js';
import type { LensReport } from '../optics/report.js';
import type { GhostMap } from '../plot/ghost-map.js';
import { FloatImage } from '../raster/image.js';

/** How many of the strongest ghosts are named on the map. */
const NAMED = 12;
const FRAME = { widthPx: 1920, heightPx: 1080 };

export function ghostMap(lens: LensModel, report: LensReport, light: { xPx: number; yPx: number }, title: string): GhostMap {
  const half = 0.5;
  const w = FRAME.widthPx * half;
  const h = FRAME.heightPx * half;
  const centre: [number, number] = [w / 2, h / 2];
  const at = { xPx: light.xPx * half, yPx: light.yPx * half };
  const system = prepareLens(lens, 'draft', 0);
  const img = new FloatImage(w, h);
  addGhosts(img, system, { widthPx: w, heightPx: h, pixelAspect: 1, opticalCentre: centre }, { ...at, flux: [1e9, 1e9, 1e9] }, { fNumber: lens.fNumberMin, gain: 1, quality: 'draft' });
  // expose for the ghosts: their 99.5th percentile brightness to 0.8 of white
  const lum: number[] = [];
  for (let i = 0; i < img.data.length; i += 4) lum.push(0.2126 * img.data[i] + 0.7152 * img.data[i + 1] + 0.0722 * img.data[i + 2]);
  lum.sort((a, b) => a - b);
  const ref = lum[Math.floor(lum.length * 0.995)] || lum[lum.length - 1] || 1;
  const gain = ref > 0 ? 0.8 / ref : 1;
  for (let i = 0; i < img.data.length; i++) img.data[i] *= gain;
  const picture = `data:image/png;base64,${encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }).toString('base64')}`;
  const marks = report.ghosts.slice(0, NAMED).map((g) => ({ name: g.name, xPx: centre[0] + g.k * (at.xPx - centre[0]), yPx: centre[1] + g.k * (at.yPx - centre[1]) }));
  return { title, widthPx: w, heightPx: h, picture, light: at, centre, marks };
}
