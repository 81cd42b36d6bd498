// `straylight still`: one frame of a shot to a PNG or OpenEXR file.

import path from 'node:path';
import type { Command } from 'commander';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { loadShot } from '../../io/load-shot.js';
import { encodeOutput } from '../../io/encode-frame.js';
import { renderFrame } from '../../render/render-frame.js';
import type { CommandContext } from '../context.js';
import { integer, requireExtension } from '../options.js';

export function registerStill(program: Command, _ctx: CommandContext): void {
  program
    .command('still')
    .description('render one frame to a file')
    .argument('<shot>', 'shot file (YAML)')
    .requiredOption('--frame <n>', 'frame number', integer('--frame'))
    .requiredOption('--out <file>', 'output file: .png or .exr')
    .action((shotFile: string, opts: { frame: number; out: string }) => {
      const shot = loadShot(shotFile);
      const ext = path.extname(opts.out).toLowerCase();
      requireExtension('--out', opts.out, ['.png', '.exr']);
      // the file's extension picks the format; the shot's other output settings apply
      const o = shot.output;
      const asked = ext === '.exr' ? { ...o, format: 'exr' as const } : o.format === 'exr' ? { ...o, format: 'png16' as const, transfer: 'linear' as const } : o;
      writeFileAtomic(path.resolve(opts.out), encodeOutput(renderFrame(shot, opts.frame), asked, shot.frame.pixelAspect));
    });
}
