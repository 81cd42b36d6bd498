// `npm run bench`: stage costs at production sizes, as ratios measured in one run.
// Each figure is the median of several runs after a warm-up. Later stages add their rows here.

import { encodePng } from '../src/io/png.js';
import { renderFrame } from '../src/render/render-frame.js';
import { resolveShot } from '../src/shot/resolve.js';
import type { ResolvedShot } from '../src/shot/types.js';

const RUNS = Number(process.env.BENCH_RUNS ?? 7);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function time(fn: () => void): number {
  fn(); // warm-up
  const t: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const start = performance.now();
    fn();
    t.push(performance.now() - start);
  }
  return median(t);
}

/** A 1920x1080 shot like the demo's: two lights with glow, one partly off frame. */
function hdShot(width: number, height: number): ResolvedShot {
  const text = `version: 1
frame: { width: ${width}, height: ${height}, rate: 24, first: 1, last: 1 }
lights:
  - { name: beacon, position: [${width * 0.4}, ${height * 0.25}], intensity: 5, radius: 10, colour: { kelvin: 2800 } }
  - { name: lamp, position: [${width * 0.98}, ${height * 0.76}], intensity: 1, radius: 5, colour: { kelvin: 4500 } }
flare:
  glow: { fraction: 0.25, size: 12, falloff: 2.4 }
output: { path: "bench.####.png" }
`;
  return resolveShot(text, 'bench.yaml', { readText: () => '' });
}

const rows: [string, number][] = [];
const shot = hdShot(1920, 1080);
let img = renderFrame(shot, 1);
const synth = time(() => {
  img = renderFrame(shot, 1);
});
const encode16 = time(() => encodePng(img, { bitDepth: 16, transfer: 'srgb', alpha: 'none' }));
const encode8 = time(() => encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
rows.push(['frame synthesis 1920x1080 (2 lights: disk + glow)', synth]);
rows.push(['PNG encode 1920x1080, 16-bit sRGB', encode16]);
rows.push(['PNG encode 1920x1080, 8-bit sRGB', encode8]);

console.log(`straylight bench (median of ${RUNS} runs, Node ${process.version})`);
for (const [name, ms] of rows) console.log(`  ${name.padEnd(52)} ${ms.toFixed(1).padStart(8)} ms`);
console.log(`  ${'ratio synthesis / 16-bit PNG encode'.padEnd(52)} ${(synth / encode16).toFixed(2).padStart(8)}`);
