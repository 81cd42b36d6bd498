// `straylight lens`: what a lens does (focal length, pupil, ghosts ranked by strength), as text,
// JSON or a cross-section plot.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadLens } from '../../io/load-lens.js';
import { chartBytes } from '../../io/svg-png.js';
import { lensSvg } from '../../plot/lens.js';
import { lensGeometry } from '../../optics/geometry.js';
import { ghostMapSvg } from '../../plot/ghost-map.js';
import { ghostMap } from '../../render/ghost-map.js';
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
    .option('--plot-ghosts <file>', 'draw where the ghosts land on the frame for a light at --light, named as in the table: .svg or .png')
    .option('--light <x,y>', 'the light\'s place for --plot-ghosts, pixels on a 1920x1080 frame (default 1400,300)', '1400,300')
    .action((name: string, opts: { json?: boolean; all?: boolean; plot?: string; ghost?: string; plotGhosts?: string; light: string }) => {
      if (opts.plot) requireExtension('--plot', opts.plot, ['.svg', '.png']);
      if (opts.plotGhosts) requireExtension('--plot-ghosts', opts.plotGhosts, ['.svg', '.png']);
      const lightAt = /^\s*(-?\d+(?:\.\d+)?)\s*,\s*(-?\d+(?:\.\d+)?)\s*$/.exec(opts.light);
      if (!lightAt) throw new UsageError(`--light: expected x,y in pixels (e.g. 1400,300), found "${opts.light}"`);
      const { lens, source } = loadLens(name);
      for (const f of [opts.plot, opts.plotGhosts]) if (f) checkWritableFolder(path.dirname(path.resolve(f)));
      const system = prepareLens(lens, 'medium', 0);
      const report = lensReport(lens, system);
      io.stdout(opts.json ? `${JSON.stringify(report, null, 2)}\n` : formatLensReport(report, source, opts.all ? Infinity : 20));
      // what would be hard to make (what could not be made was refused when the lens was read)
      for (const p of lensGeometry(lens)) if (p.severity === 'warning') io.stderr(`warning: ${name}: surface ${p.surface + 1}: ${p.message}\n`);
      if (opts.plot) {
        const g = opts.ghost ?? '1';
        const index = /^\d+$/.test(g) ? Number(g) - 1 : report.ghosts.findIndex((x) => x.name === g);
        if (index < 0 || index >= report.ghosts.length) throw new UsageError(`--ghost: expected a rank from 1 to ${report.ghosts.length} or a ghost's name as the table lists it (e.g. ${report.ghosts[0]?.name ?? '9-5'}), found "${g}"`);
        writeOutputFile(path.resolve(opts.plot), chartBytes(lensSvg(lens, system, { ghost: index }), opts.plot));
      }
      if (opts.plotGhosts) {
        const light = { xPx: Number(lightAt[1]), yPx: Number(lightAt[2]) };
        writeOutputFile(path.resolve(opts.plotGhosts), chartBytes(ghostMapSvg(ghostMap(lens, report, light, `${lens.name}: where the ghosts land`)), opts.plotGhosts));
      }
    });
}
