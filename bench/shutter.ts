// The shutter rows of `npm run bench`, run in a process of their own (as a render's frames are, in a
// fresh worker; the bench's own process has by then the heap and JIT state of every row before):
// a frame through double-gauss-50 at 960x540 and 1920x1080 (the sequence rows' sun at frame 20 of
// 48: 6 px across a 180-degree shutter) at 8 samples with the smear and the exact method, against
// one sample; median of 5 after one warm-up, the three interleaved run by run so a drift in the
// machine's speed weighs on all alike. `node dist/bench/shutter.js` prints the rows; the bench
// reads the last line (JSON).

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { renderFrame } from '../src/render/render-frame.js';
import type { ResolvedShot } from '../src/shot/types.js';
import { flareShot } from './sequence-child.js';

export interface ShutterRow {
  width: number;
  height: number;
  oneMs: number;
  smearMs: number;
  exactMs: number;
}

const RUNS = 5;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1];
const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
const rows: ShutterRow[] = [];
try {
  for (const [w, h] of [[960, 540], [1920, 1080]]) {
    const one = flareShot(w, h, 48, dir);
    const open = (method: 'smear' | 'exact'): ResolvedShot => ({ ...one, shutter: { angleDeg: 180, samples: 8, phaseDeg: -90, method } });
    const shots = [one, open('smear'), open('exact')];
    const times: number[][] = [[], [], []];
    for (const s of shots) renderFrame(s, 20); // warm-up
    for (let r = 0; r < RUNS; r++) {
      shots.forEach((s, i) => {
        const t = performance.now();
        renderFrame(s, 20);
        times[i].push(performance.now() - t);
      });
    }
    const [oneMs, smearMs, exactMs] = times.map(median);
    rows.push({ width: w, height: h, oneMs, smearMs, exactMs });
    console.log(`frame ${w}x${h}, 8 shutter samples (smear; exact) vs 1: ${smearMs.toFixed(1)}; ${exactMs.toFixed(1)} ms vs ${oneMs.toFixed(1)} ms (x${(smearMs / oneMs).toFixed(2)}; x${(exactMs / oneMs).toFixed(2)})`);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
console.log(JSON.stringify(rows));
