// Writes the plate-lights demo's plate, deterministically: `node dist/tools/make-demo-plate.js`.
// An invented shot: at dusk, a lamp on a slow-moving boom (a crane lamp seen across a park)
// passes behind the branches of a tree that sway in the wind; a thick bough hides it for a few
// frames. 960x540, frames 1001-1048, 8-bit sRGB PNG; the lamp's core is clipped, as in footage.

import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { encodePng } from '../src/io/png.js';
import { FloatImage } from '../src/raster/image.js';

const W = 960;
const H = 540;
const out = path.resolve(process.argv[2] ?? 'shots/plate');
mkdirSync(out, { recursive: true });

function segDist(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax;
  const dy = by - ay;
  const t = Math.max(0, Math.min(1, ((px - ax) * dx + (py - ay) * dy) / (dx * dx + dy * dy)));
  return Math.hypot(px - ax - t * dx, py - ay - t * dy);
}

/** The lamp's path: left to right along a shallow arc, in pixels. */
export function lampAt(f: number): [number, number] {
  const s = (f - 1001) / 47;
  return [120 + 720 * s, 210 - 70 * Math.sin(Math.PI * s)];
}

for (let f = 1001; f <= 1048; f++) {
  const img = new FloatImage(W, H);
  const d = img.data;
  // dusk sky: a flat colour per row (rows compress to almost nothing)
  for (let y = 0; y < H; y++) {
    const k = y / H;
    const sky = [0.02 + 0.05 * k, 0.03 + 0.04 * k, 0.08 + 0.02 * k];
    for (let x = 0; x < W; x++) d.set([sky[0], sky[1], sky[2], 1], (y * W + x) * 4);
  }
  // the lamp: a clipped core and a warm halo (linear light; the PNG clips at white)
  const [lx, ly] = lampAt(f);
  for (let y = Math.max(0, Math.floor(ly - 60)); y < Math.min(H, ly + 60); y++) {
    for (let x = Math.max(0, Math.floor(lx - 60)); x < Math.min(W, lx + 60); x++) {
      const r = Math.hypot(x + 0.5 - lx, y + 0.5 - ly);
      const core = r < 5 ? 6 : r < 6 ? 6 * (6 - r) : 0;
      const halo = 0.5 * Math.exp(-r / 9);
      const i = (y * W + x) * 4;
      d[i] += core + halo * 1.0;
      d[i + 1] += core + halo * 0.72;
      d[i + 2] += core + halo * 0.42;
    }
  }
  // the tree: a bough across the frame and twigs, swaying, near black, anti-aliased edges
  const sway = 6 * Math.sin((2 * Math.PI * (f - 1001)) / 30);
  const limbs: [number, number, number, number, number][] = [
    // x0, y0, x1, y1, half-width
    [960, 40, 380 + sway, 205, 9],
    [520 + sway, 166, 470 + sway * 1.4, 120, 3],
    [700 + sway * 0.5, 115, 640 + sway, 60, 3],
    [560 + sway, 150, 600 + sway * 1.6, 250, 2.5],
    [300 + sway * 1.8, 100, 250 + sway * 2, 190, 2],
  ];
  // a clump of leaves on the bough: the lamp passes behind it for a few frames
  const clump = { x: 585 + sway, y: 142, rx: 46, ry: 24 };
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const e = Math.hypot((x + 0.5 - clump.x) / clump.rx, (y + 0.5 - clump.y) / clump.ry);
      // a ragged rim: the radius wobbles with the angle
      const a = Math.atan2(y + 0.5 - clump.y, x + 0.5 - clump.x);
      const rim = 1 + 0.12 * Math.sin(7 * a + f * 0.3) + 0.08 * Math.sin(13 * a);
      let cover = Math.min(1, Math.max(0, (rim - e) * clump.ry + 0.5));
      for (const [x0, y0, x1, y1, hw] of limbs) {
        const dd = segDist(x + 0.5, y + 0.5, x0, y0, x1, y1);
        cover = Math.max(cover, Math.min(1, Math.max(0, hw + 0.5 - dd)));
      }
      if (cover > 0) {
        const i = (y * W + x) * 4;
        for (let c = 0; c < 3; c++) d[i + c] = d[i + c] * (1 - cover) + 0.008 * cover;
      }
    }
  }
  writeFileSync(path.join(out, `park.${f}.png`), encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
}
