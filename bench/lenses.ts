// Bench rows for lens preparation, one per preset (target: under 150 ms each): reading and checking
// the lens file, ranking its ghosts and planning their paths at `medium`, its lens table, and the
// iris's diffraction kernel; what a shot pays once before its first frame. Run alone:
// `node dist/bench/lenses.js`.

import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { presetNames, presetPath } from '../src/io/presets.js';
import { starburstKernel } from '../src/optics/diffraction.js';
import { prepareLens } from '../src/optics/ghost-system.js';
import { lensReport } from '../src/optics/report.js';
import { parseLensText } from '../src/shot/lens-file.js';

export function lensRows(runs = 3): [string, string][] {
  const rows: [string, string][] = [];
  for (const name of presetNames()) {
    const prepare = () => {
      const { model } = parseLensText(readFileSync(presetPath(name), 'utf8'), `${name}.yaml`, name);
      const system = prepareLens(model!, 'medium', 1e-6);
      lensReport(model!, system);
      starburstKernel(model!.iris);
      return system;
    };
    const system = prepare(); // warm-up
    const t: number[] = [];
    for (let i = 0; i < runs; i++) {
      const s = performance.now();
      prepare();
      t.push(performance.now() - s);
    }
    t.sort((a, b) => a - b);
    rows.push([`lens preparation ${name} (${system.ranked.length} ghosts; target < 150 ms)`, `${t[t.length >> 1].toFixed(1)} ms (${t[0].toFixed(0)}-${t[t.length - 1].toFixed(0)})`]);
  }
  return rows;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  for (const [name, v] of lensRows(5)) console.log(`  ${name.padEnd(58)} ${v}`);
}
