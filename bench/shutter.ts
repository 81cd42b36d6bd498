// The shutter rows of `npm run bench` on their own: a frame through double-gauss-50 at 960x540 and
// 1920x1080 (the sequence rows' sun at frame 20 of 48: 6 px across a 180-degree shutter), the smear
// method at 8 samples against one sample, median of 5 after one warm-up. `node dist/bench/shutter.js`.

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { renderFrame } from '../src/render/render-frame.js';
import { flareShot } from './sequence-child.js';

const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
const time = (f: () => void, n = 5): number => {
  f();
  const ts: number[] = [];
  for (let i = 0; i < n; i++) {
    const t = performance.now();
    f();
    ts.push(performance.now() - t);
  }
  ts.sort((a, b) => a - b);
  return ts[n >> 1];
};
try {
  for (const [w, h] of [[960, 540], [1920, 1080]]) {
    const one = flareShot(w, h, 48, dir);
    const smear = { ...one, shutter: { angleDeg: 180, samples: 8, phaseDeg: -90, method: 'smear' as const } };
    const t1 = time(() => renderFrame(one, 20));
    const t8 = time(() => renderFrame(smear, 20));
    console.log(`frame ${w}x${h}, 8 shutter samples (smear) vs 1: ${t8.toFixed(1)} ms vs ${t1.toFixed(1)} ms (x${(t8 / t1).toFixed(2)})`);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
