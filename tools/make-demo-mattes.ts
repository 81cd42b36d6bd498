// Writes the demo shot's depth mattes, deterministically: `node dist/tools/make-demo-mattes.js`.
// An invented scene: a moored boat's mast sways in front of the harbour (12 m away), with a
// spreader and two stays; everything else is far (1000 m). Stored as 8-bit grey PNGs, depth
// normalised between near 1 m and far 1000 m (the demo shot's encoding).

import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { encodePng } from '../src/io/png.js';
import { FloatImage } from '../src/raster/image.js';

const W = 960;
const H = 540;
const NEAR = 1;
const FAR = 1000;
const MAST_DEPTH = 12;
const out = path.resolve(process.argv[2] ?? 'shots/mattes');
mkdirSync(out, { recursive: true });

const norm = (depth: number) => (depth - NEAR) / (FAR - NEAR);

/** Distance from point p to segment a-b. */
function segDist(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax;
  const dy = by - ay;
  const t = Math.max(0, Math.min(1, ((px - ax) * dx + (py - ay) * dy) / (dx * dx + dy * dy)));
  return Math.hypot(px - ax - t * dx, py - ay - t * dy);
}

for (let f = 1001; f <= 1048; f++) {
  const sway = 10 * Math.sin((2 * Math.PI * (f - 1001)) / 40);
  const mastX = 296 + sway;
  const img = new FloatImage(W, H);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const cx = x + 0.5;
      const cy = y + 0.5;
      // the mast leans with the sway: its foot moves less than its top
      const atY = mastX - sway * (cy / H) * 0.6;
      const mast = Math.abs(cx - atY) < 8;
      const spreader = Math.abs(cy - 124) < 3 && Math.abs(cx - (mastX - sway * 0.14)) < 120;
      const stay1 = segDist(cx, cy, mastX, 20, 640, H) < 1.5;
      const stay2 = segDist(cx, cy, mastX, 20, 20, H) < 1.5;
      const v = norm(mast || spreader || stay1 || stay2 ? MAST_DEPTH : FAR);
      img.data.set([v, v, v, 0], (y * W + x) * 4);
    }
  }
  writeFileSync(path.join(out, `harbour-mast.${f}.png`), encodePng(img, { bitDepth: 8, transfer: 'linear', alpha: 'none' }));
}
console.log(`wrote 48 depth mattes to ${out}`);
