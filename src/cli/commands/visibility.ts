// `straylight visibility`: how much of each light its mattes let through, frame by frame, as CSV
// rows and an optional plot.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadShot } from '../../io/load-shot.js';
import { chartBytes } from '../../io/svg-png.js';
import { visibilitySvg } from '../../plot/visibility.js';
import { visibilityChart, visibilityRows } from '../../render/visibility-curves.js';
import type { CommandContext } from '../context.js';
import { requireExtension } from '../options.js';

export function registerVisibility(program: Command, { io }: CommandContext): void {
  program
    .command('visibility')
    .description('how much of each light its mattes let through, frame by frame (averaged over the shutter)')
    .argument('<shot>', 'shot file (YAML)')
    .option('--csv <file>', 'write frame,light,x,y,visibility,effective_intensity,depth rows to a CSV file')
    .option('--plot <file>', 'draw each light\'s visibility over the frame range: a chart as .svg or .png')
    .action(async (shotFile: string, opts: { csv?: string; plot?: string }) => {
      if (opts.plot) requireExtension('--plot', opts.plot, ['.svg', '.png']);
      const shot = await loadShot(shotFile);
      for (const f of [opts.csv, opts.plot]) if (f) checkWritableFolder(path.dirname(path.resolve(f)));
      const found = visibilityRows(shot);
      // x and y are empty while the light is behind the camera; depth is empty without one
      const num = (v: number | undefined, d: number) => (v === undefined ? '' : v.toFixed(d));
      const rows = ['frame,light,x,y,visibility,effective_intensity,depth', ...found.map((r) => `${r.frame},${r.light},${num(r.xPx, 3)},${num(r.yPx, 3)},${r.visibility.toFixed(4)},${r.effectiveIntensity.toPrecision(6)},${r.depth === undefined ? '' : r.depth.toPrecision(7)}`)];
      if (opts.csv) writeOutputFile(path.resolve(opts.csv), Buffer.from(rows.join('\n') + '\n'));
      else io.stdout(rows.join('\n') + '\n');
      if (opts.plot) {
        const chart = visibilitySvg(visibilityChart(shot, found, `Visibility of each light: ${path.basename(shotFile)}, frames ${shot.frame.first}-${shot.frame.last}`));
        writeOutputFile(path.resolve(opts.plot), chartBytes(chart, opts.plot));
      }
    });
}
