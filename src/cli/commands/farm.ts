// `straylight farm slurm`: the Slurm job scripts that spread a shot's shards over a cluster and
// verify the sequence after; optionally submits them.

import path from 'node:path';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { Option, type Command } from 'commander';
import { ExitCode, StraylightError } from '../../errors.js';
import { writeOutputFile } from '../../io/output-file.js';
import { loadShot } from '../../io/load-shot.js';
import { slurmScripts } from '../../farm/slurm.js';
import type { CommandContext } from '../context.js';
import { positiveInt } from '../options.js';

export function registerFarm(program: Command, { io }: CommandContext): void {
  const farm = program.command('farm').description('spread a shot over a cluster with its own scheduler');
  farm
    .command('slurm')
    .description('write (and with --submit, submit) Slurm scripts: a job array rendering the shards, then a verify job')
    .argument('<shot>', 'shot file (YAML)')
    .requiredOption('--tasks <n>', 'array tasks, one shard each', positiveInt('--tasks'))
    .addOption(new Option('--jobs-per-task <n>', 'worker threads (and CPUs asked) per task').default(2).argParser(positiveInt('--jobs-per-task')))
    .option('--dir <folder>', 'where the scripts and logs go (default: slurm/ beside the frames)')
    .option('--partition <name>', 'Slurm partition')
    .option('--submit', 'submit with sbatch now (the verify job waits for the array)')
    .action(async (shotFile: string, opts: { tasks: number; jobsPerTask: number; dir?: string; partition?: string; submit?: boolean }) => {
      const shot = await loadShot(shotFile);
      const folder = path.resolve(opts.dir ?? path.join(path.dirname(shot.output.template), 'slurm'));
      const bin = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', '..', '..', 'bin', 'straylight.js');
      const scripts = slurmScripts({ shotFile: path.resolve(shotFile), tasks: opts.tasks, jobsPerTask: opts.jobsPerTask, folder, partition: opts.partition, node: process.execPath, bin });
      for (const [name, text] of Object.entries({ 'render.sbatch': scripts.render, 'verify.sbatch': scripts.verify, 'submit.sh': scripts.submit })) {
        writeOutputFile(path.join(folder, name), Buffer.from(text));
      }
      if (!opts.submit) {
        io.stdout(`wrote ${folder}/render.sbatch, verify.sbatch and submit.sh; submit with: bash ${path.join(folder, 'submit.sh')}\n`);
        return;
      }
      let out: string;
      try {
        out = execFileSync('bash', [path.join(folder, 'submit.sh')], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
      } catch (e) {
        throw new StraylightError(`sbatch failed: ${((e as { stderr?: string }).stderr ?? (e as Error).message).trim()}`, ExitCode.framesFailed);
      }
      io.stdout(out);
    });
}
