// `straylight verify`: is a rendered sequence complete and intact against its manifest.

import path from 'node:path';
import { existsSync, statSync } from 'node:fs';
import type { Command } from 'commander';
import { ExitCode, InputError } from '../../errors.js';
import { loadShot } from '../../io/load-shot.js';
import { shotHash } from '../../io/manifest.js';
import { outputSequences } from '../../render/passes.js';
import { formatVerify, sequencesIn, verifySequence, type VerifyReport } from '../../render/verify.js';
import type { CommandContext } from '../context.js';

export function registerVerify(program: Command, { io, setExit }: CommandContext): void {
  program
    .command('verify')
    .description('check that a rendered sequence is complete and intact against its manifest')
    .argument('<shot-or-folder>', 'a shot file, or a folder holding rendered sequences and their manifests')
    .option('--json', 'print the report as JSON')
    .action(async (arg: string, opts: { json?: boolean }) => {
      let reports: VerifyReport[];
      if (existsSync(arg) && statSync(arg).isDirectory()) {
        const templates = sequencesIn(path.resolve(arg));
        if (templates.length === 0) throw new InputError(`${arg}: no sequence manifest in this folder`);
        reports = templates.map((t) => verifySequence(t));
      } else {
        const shot = await loadShot(arg);
        reports = outputSequences(shot).map((q) => verifySequence(q.shot.output.template, { first: shot.frame.first, last: shot.frame.last, hash: shotHash(q.shot) }));
      }
      io.stdout(opts.json ? `${JSON.stringify(reports, null, 2)}\n` : reports.map(formatVerify).join(''));
      if (reports.some((r) => r.missing.length || r.corrupt.length || !Number.isFinite(r.first))) setExit(ExitCode.framesFailed);
    });
}
