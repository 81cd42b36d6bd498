// The command line: assembles the commands (one module each under commands/) on a commander
// program and maps errors to exit codes. Only main.ts reads process.argv and exits; tests drive
// run() directly. Adding a command: a module in commands/ exporting register(program, ctx), and one
// line in COMMANDS below.

import { Command, CommanderError } from 'commander';
import { ExitCode, ShotError, StraylightError } from '../errors.js';
import { VERSION } from '../version.js';
import type { CliIO, CommandContext } from './context.js';
import { registerBatch } from './commands/batch.js';
import { registerCheck } from './commands/check.js';
import { registerFarm } from './commands/farm.js';
import { registerFlashes } from './commands/flashes.js';
import { registerLens } from './commands/lens.js';
import { registerImportLens } from './commands/import-lens.js';
import { registerLights } from './commands/lights.js';
import { registerPreview } from './commands/preview.js';
import { registerRender } from './commands/render.js';
import { registerSheet } from './commands/sheet.js';
import { registerStill } from './commands/still.js';
import { registerVerify } from './commands/verify.js';
import { registerVisibility } from './commands/visibility.js';

export type { CliIO } from './context.js';

/** The commands in the order `--help` lists them. */
const COMMANDS: ((program: Command, ctx: CommandContext) => void)[] = [
  registerRender,
  registerLights,
  registerPreview,
  registerImportLens,
  registerBatch,
  registerFarm,
  registerVisibility,
  registerVerify,
  registerFlashes,
  registerSheet,
  registerCheck,
  registerStill,
  registerLens,
];

export function buildProgram(io: CliIO, setExit: (code: number) => void): Command {
  const program = new Command('straylight')
    .description('Render physically based lens-flare passes for shots: a YAML shot file in, numbered frames out.')
    .version(VERSION)
    .exitOverride()
    .configureOutput({
      writeOut: (s) => io.stdout(s),
      writeErr: (s) => io.stderr(s),
    })
    .showHelpAfterError('(run with --help for usage)');
  for (const register of COMMANDS) register(program, { io, setExit });
  return program;
}

export async function run(argv: string[], io: CliIO): Promise<number> {
  let code: number = ExitCode.ok;
  const program = buildProgram(io, (c) => (code = c));
  try {
    await program.parseAsync(argv, { from: 'user' });
    return code;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return ExitCode.ok;
      if (e.code === 'commander.executeSubCommandAsync') return ExitCode.internal;
      return ExitCode.usage;
    }
    if (e instanceof StraylightError) {
      io.stderr(`${e.message}\n`);
      if (e instanceof ShotError) {
        const count = e.diagnostics.length;
        io.stderr(`straylight: ${count} problem${count === 1 ? '' : 's'} found; ${e.outcome}\n`);
      }
      return e.exitCode;
    }
    io.stderr(`straylight: internal error (please report it):\n${(e as Error).stack ?? String(e)}\n`);
    return ExitCode.internal;
  }
}
