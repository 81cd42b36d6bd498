// How far the faint-ghost shortcut moves the picture: zoom-like-35 at 1920x1080 with a sun-bright
// light at several positions, drawn at `medium` with every ghost in full (faintPeak 0), as shipped,
// and at `high`; differences in 8-bit sRGB codes over black (IEC 61966-2-1), the strictest view.
// Run: `npx tsc -p . && node dist/tools/ghost-lod-check.js` (about a minute). DEVELOPERS.md quotes it.
// With `--reference`, `medium` and `high` are also compared with a 128x128-ray grid at 7 wavelengths
// (every ghost in full; converged to about 0.3% in a ghost's energy), at two of the positions: a
// few minutes. That is the check for changes to how ghosts are fitted or drawn.

import { readFileSync } from 'node:fs';
import { addGhosts, type GhostView } from '../src/elements/ghosts/index.js';
import { presetPath } from '../src/io/presets.js';
import { prepareLens } from '../src/optics/ghost-system.js';
import { FloatImage } from '../src/raster/image.js';
import { parseLensText } from '../src/shot/lens-file.js';
import { srgbEncode } from '../src/colour/srgb.js';

const { model } = parseLensText(readFileSync(presetPath('zoom-like-35'), 'utf8'), 'zoom-like-35.yaml', 'zoom-like-35');
const view: GhostView = { widthPx: 1920, heightPx: 1080, pixelAspect: 1, opticalCentre: [960, 540] };
const flux = 2 ** 14 * Math.PI * 100;
const medium = prepareLens(model!, 'medium', 1e-6);
const high = prepareLens(model!, 'high', 1e-6);

function codes(img: FloatImage): Uint8Array {
  const out = new Uint8Array((img.data.length / 4) * 3);
  for (let p = 0, o = 0; p < img.data.length; p += 4) for (let c = 0; c < 3; c++) out[o++] = Math.round(255 * srgbEncode(Math.min(1, Math.max(0, img.data[p + c]))));
  return out;
}

function draw(x: number, y: number, quality: 'medium' | 'high', faintPeak?: number): Uint8Array {
  const img = new FloatImage(1920, 1080);
  addGhosts(img, quality === 'high' ? high : medium, view, { xPx: x, yPx: y, flux: [flux, flux, flux] }, { fNumber: 4, gain: 1, quality, ...(faintPeak === undefined ? {} : { faintPeak }) });
  return codes(img);
}

function compare(a: Uint8Array, b: Uint8Array): string {
  const d = new Float64Array(a.length);
  let s2 = 0;
  for (let i = 0; i < a.length; i++) {
    d[i] = Math.abs(a[i] - b[i]);
    s2 += d[i] * d[i];
  }
  d.sort();
  const pct = (p: number) => d[Math.floor(p * (d.length - 1))];
  return `rms ${Math.sqrt(s2 / a.length).toFixed(2)}, p99.9 ${pct(0.999)}, max ${d[d.length - 1]}`;
}

if (process.argv.includes('--reference')) {
  const reference = prepareLens(model!, 'high', 1e-6);
  reference.grid = 128;
  reference.faintGrid = 128;
  for (const [x, y] of [[960, 540], [1400, 300]]) {
    const img = new FloatImage(1920, 1080);
    addGhosts(img, reference, view, { xPx: x, yPx: y, flux: [flux, flux, flux] }, { fNumber: 4, gain: 1, quality: 'high' });
    const ref = codes(img);
    console.log(`light (${x}, ${y}) against the 128-ray reference: medium ${compare(draw(x, y, 'medium'), ref)}; high ${compare(draw(x, y, 'high'), ref)}`);
  }
  process.exit(0);
}

for (const [x, y] of [[1400, 300], [200, 900], [1900, 100], [960, 540], [2100, 500]]) {
  const full = draw(x, y, 'medium', 0);
  const shipped = draw(x, y, 'medium');
  const ref = draw(x, y, 'high');
  console.log(`light (${x}, ${y}): shipped vs full ${compare(shipped, full)}; full vs high ${compare(full, ref)}; shipped vs high ${compare(shipped, ref)}`);
}
