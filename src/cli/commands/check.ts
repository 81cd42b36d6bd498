// `straylight check`: validates a shot file and prints what it will render.

import type { Command } from 'commander';
import { loadShot } from '../../io/load-shot.js';
import type { CommandContext } from '../context.js';
import { shotSummary } from '../summary.js';

export function registerCheck(program: Command, { io }: CommandContext): void {
  program
    .command('check')
    .description('validate a shot file and print what it will render')
    .argument('<shot>', 'shot file (YAML)')
    .action((shotFile: string) => {
      const shot = loadShot(shotFile);
      io.stdout(shotSummary(shot, shotFile));
    });
}
