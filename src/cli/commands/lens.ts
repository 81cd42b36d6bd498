// `straylight lens`: what a lens does (focal length, pupil, ghosts ranked by strength), as text,
// JSON or a cross-section plot.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadLens } from '../../io/load-lens.js';
import { encodePng } from '../../io/png.js';
import { prepareLens } from '../../optics/ghost-system.js';
import { formatLensReport, lensPlot, lensReport } from '../../optics/report.js';
import type { CommandContext } from '../context.js';
import { requireExtension } from '../options.js';

export function registerLens(program: Command, { io }: CommandContext): void {
  program
    .command('lens')
    .description('show a lens: computed focal length, pupil, and its ghosts ranked by strength')
    .argument('<lens>', 'a preset name (see lenses/) or a lens file (YAML)')
    .option('--json', 'print the report as JSON')
    .option('--all', 'list every ghost, not only the 20 strongest')
    .option('--plot <file>', 'draw the lens cross-section and the strongest ghost\'s rays to a PNG')
    .action((name: string, opts: { json?: boolean; all?: boolean; plot?: string }) => {
      if (opts.plot) requireExtension('--plot', opts.plot, ['.png']);
      const { lens, source } = loadLens(name);
      if (opts.plot) checkWritableFolder(path.dirname(path.resolve(opts.plot)));
      const system = prepareLens(lens, 'medium', 0);
      const report = lensReport(lens, system);
      io.stdout(opts.json ? `${JSON.stringify(report, null, 2)}\n` : formatLensReport(report, source, opts.all ? Infinity : 20));
      if (opts.plot) {
        writeOutputFile(path.resolve(opts.plot), encodePng(lensPlot(lens, system), { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
      }
    });
}
