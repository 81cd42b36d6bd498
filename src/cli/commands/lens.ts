// `straylight lens`: what a lens does (focal length, pupil, ghosts ranked by strength), as text,
// JSON or a cross-section plot.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadLens } from '../../io/load-lens.js';
import { chartBytes } from '../../io/svg-png.js';
import { lensSvg } from '../../plot/lens.js';
import { UsageError } from '../../errors.js';
import { prepareLens } from '../../optics/ghost-system.js';
import { formatLensReport, lensReport } from '../../optics/report.js';
import type { CommandContext } from '../context.js';
import { requireExtension } from '../options.js';

export function registerLens(program: Command, { io }: CommandContext): void {
  program
    .command('lens')
    .description('show a lens: computed focal length, pupil, and its ghosts ranked by strength')
    .argument('<lens>', 'a preset name (see lenses/) or a lens file (YAML)')
    .option('--json', 'print the report as JSON')
    .option('--all', 'list every ghost, not only the 20 strongest')
    .option('--plot <file>', 'draw the lens section with one ghost\'s rays: .svg or .png')
    .option('--ghost <rank-or-name>', 'the ghost --plot draws: its rank in the table (default 1) or its name (e.g. 9-5)')
    .action((name: string, opts: { json?: boolean; all?: boolean; plot?: string; ghost?: string }) => {
      if (opts.plot) requireExtension('--plot', opts.plot, ['.svg', '.png']);
      const { lens, source } = loadLens(name);
      if (opts.plot) checkWritableFolder(path.dirname(path.resolve(opts.plot)));
      const system = prepareLens(lens, 'medium', 0);
      const report = lensReport(lens, system);
      io.stdout(opts.json ? `${JSON.stringify(report, null, 2)}\n` : formatLensReport(report, source, opts.all ? Infinity : 20));
      if (opts.plot) {
        const g = opts.ghost ?? '1';
        const index = /^\d+$/.test(g) ? Number(g) - 1 : report.ghosts.findIndex((x) => x.name === g);
        if (index < 0 || index >= report.ghosts.length) throw new UsageError(`--ghost: expected a rank from 1 to ${report.ghosts.length} or a ghost's name as the table lists it (e.g. ${report.ghosts[0]?.name ?? '9-5'}), found "${g}"`);
        writeOutputFile(path.resolve(opts.plot), chartBytes(lensSvg(lens, system, { ghost: index }), opts.plot));
      }
    });
}
