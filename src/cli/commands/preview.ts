// `straylight preview`: a local web page for shaping a shot's look, frame by frame, redrawn as the
// shot file (or any file it reads) is saved. Runs until interrupted.

import { Option, type Command } from 'commander';
import { UsageError } from '../../errors.js';
import type { GhostQuality } from '../../optics/ghost-system.js';
import { startPreview } from '../../preview/server.js';
import type { CommandContext } from '../context.js';
import { checkPlateTemplate } from '../../review/source.js';
import { fraction, integer, QUALITIES } from '../options.js';

/** The port when none is given. */
export const DEFAULT_PREVIEW_PORT = 8707;

export function registerPreview(program: Command, { io }: CommandContext): void {
  program
    .command('preview')
    .description('a local web page that shows the shot frame by frame and redraws it when the shot is saved')
    .argument('<shot>', 'shot file (YAML)')
    .option('--plate <template>', 'plate frames shown under the pass (e.g. plate/shot.####.exr)')
    .option('--port <n>', `port on 127.0.0.1 (0: any free port)`, integer('--port'), DEFAULT_PREVIEW_PORT)
    .addOption(new Option('--quality <q>', 'ghost quality of the preview').choices([...QUALITIES]).default('draft'))
    .addOption(new Option('--scale <s>', 'fraction of the frame size the preview draws at (default: at most 960 pixels wide)').argParser(fraction('--scale')))
    .action(async (shotFile: string, opts: { plate?: string; port: number; quality: GhostQuality; scale?: number }) => {
      if (opts.port < 0 || opts.port > 65535) throw new UsageError(`--port: ${opts.port} is not a port (0 to 65535)`);
      checkPlateTemplate(opts.plate, '--plate');
      const log = (line: string) => io.stderr(`${line}\n`);
      let server;
      try {
        server = await startPreview({ shotFile, plate: opts.plate, port: opts.port, quality: opts.quality, ...(opts.scale !== undefined ? { scale: opts.scale } : {}), log });
      } catch (e) {
        const code = (e as NodeJS.ErrnoException).code;
        if (code === 'EADDRINUSE') throw new UsageError(`--port: port ${opts.port} on 127.0.0.1 is in use: choose another (--port 0 picks a free one)`);
        if (code === 'EACCES') throw new UsageError(`--port: port ${opts.port} needs privileges this user lacks: choose one above 1023`);
        throw e;
      }
      io.stdout(`preview of ${shotFile}: ${server.url} (this machine only; Ctrl-C to stop)\n`);
      await new Promise<void>((resolve) => {
        if (!io.signal) return; // no way to be stopped: run until the process ends
        if (io.signal.aborted) resolve();
        io.signal.addEventListener('abort', () => resolve(), { once: true });
      });
      await server.close();
      io.stdout('preview stopped\n');
    });
}
