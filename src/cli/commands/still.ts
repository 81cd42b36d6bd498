// `straylight still`: one frame of a shot to a PNG or OpenEXR file.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadShot } from '../../io/load-shot.js';
import { encodeOutput } from '../../io/encode-frame.js';
import { renderFrame } from '../../render/render-frame.js';
import { renderLayers } from '../../render/passes.js';
import type { CommandContext } from '../context.js';
import { Option } from 'commander';
import { fraction, integer, parseFrameRange, QUALITIES, requireExtension } from '../options.js';
import { scaleShot, withGhostQuality } from '../../render/overrides.js';
import type { GhostQuality } from '../../optics/ghost-system.js';

export function registerStill(program: Command, { io }: CommandContext): void {
  program
    .command('still')
    .description('render one frame to a file')
    .argument('<shot>', 'shot file (YAML)')
    .requiredOption('--frame <n>', 'frame number', integer('--frame'))
    .requiredOption('--out <file>', 'output file: .png or .exr')
    .addOption(new Option('--quality <q>', "ghost quality, instead of the shot's (draft is the quickest look)").choices([...QUALITIES]))
    .addOption(new Option('--scale <s>', 'render at this fraction of the frame size (e.g. 0.5), positions and sizes scaled with it').argParser(fraction('--scale')))
    .action(async (shotFile: string, opts: { frame: number; out: string; quality?: GhostQuality; scale?: number }) => {
      requireExtension('--out', opts.out, ['.png', '.exr']);
      const full = await loadShot(shotFile);
      const shot = scaleShot(opts.quality ? withGhostQuality(full, opts.quality) : full, opts.scale ?? 1);
      parseFrameRange(String(opts.frame), shot, '--frame');
      const ext = path.extname(opts.out).toLowerCase();
      const out = path.resolve(opts.out);
      checkWritableFolder(path.dirname(out));
      // the file's extension picks the format; the shot's other output settings apply
      const o = shot.output;
      const asked = ext === '.exr' ? { ...o, format: 'exr' as const } : o.format === 'exr' ? { ...o, format: 'png16' as const, transfer: 'linear' as const } : o;
      // a layered shot's still, as OpenEXR, has its layers too
      const layered = asked.format === 'exr' && asked.passes === 'layers' ? renderLayers(shot, opts.frame) : undefined;
      const bytes = encodeOutput(layered?.combined ?? renderFrame(shot, opts.frame), asked, shot.frame.pixelAspect, { frame: shot.frame, n: opts.frame }, layered?.layers);
      writeOutputFile(out, bytes);
      const { widthPx, heightPx } = shot.frame;
      io.stdout(`${out}: frame ${opts.frame}, ${widthPx}x${heightPx} ${asked.format === 'exr' ? `OpenEXR ${asked.exr.type}` : `${asked.format === 'png8' ? '8' : '16'}-bit PNG, ${asked.transfer}`}\n`);
    });
}
