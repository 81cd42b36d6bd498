// `straylight check`: validates a shot file (or a lens file) and prints what it will render:
// range and timecode, lights, lens, mattes, every element, where the output goes, and how many
// workers fit in memory; warnings for what will surprise (a sub-pixel starburst, output outside
// the shot's and the current folder).

import { availableParallelism } from 'node:os';
import { Option, type Command } from 'commander';
import { loadLens, looksLikeLensFile } from '../../io/load-lens.js';
import { loadShot } from '../../io/load-shot.js';
import { prepareLens } from '../../optics/ghost-system.js';
import { formatLensReport, lensReport } from '../../optics/report.js';
import { availableBytes } from '../../render/memory.js';
import type { CommandContext } from '../context.js';
import { memorySize, positiveInt } from '../options.js';
import { shotSummary } from '../summary.js';

export function registerCheck(program: Command, { io }: CommandContext): void {
  program
    .command('check')
    .description('validate a shot file (or a lens file) and print what it will render')
    .argument('<file>', 'shot file (YAML), or a lens file')
    .addOption(new Option('--jobs <n>', 'the worker count to plan memory for (default: the available parallelism)').argParser(positiveInt('--jobs')))
    .addOption(new Option('--max-memory <size>', 'the memory budget to plan for, e.g. 8G (default: 80% of what is free)').argParser(memorySize('--max-memory')))
    .action(async (file: string, opts: { jobs?: number; maxMemory?: number }) => {
      if (looksLikeLensFile(file)) {
        const { lens } = loadLens(file);
        const report = lensReport(lens, prepareLens(lens, 'medium', 0));
        io.stdout(`${file}: a lens file (not a shot); it is valid\n${formatLensReport(report, 'file', 5)}`);
        return;
      }
      const shot = await loadShot(file);
      io.stdout(shotSummary(shot, file, { cwd: process.cwd(), jobs: opts.jobs ?? availableParallelism(), budgetBytes: opts.maxMemory ?? availableBytes() }));
    });
}
