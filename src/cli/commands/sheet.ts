// `straylight sheet`: a contact sheet of a rendered sequence, every Nth frame, numbered.

import path from 'node:path';
import { Option, type Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { encodePng } from '../../io/png.js';
import { contactSheet, sheetSvg } from '../../review/sheet.js';
import { chartBytes } from '../../io/svg-png.js';
import { loadShot } from '../../io/load-shot.js';
import { checkPlateTemplate, drawnSource, openSource } from '../../review/source.js';
import type { GhostQuality } from '../../optics/ghost-system.js';
import type { CommandContext } from '../context.js';
import { fraction, positiveInt, QUALITIES, requireExtension } from '../options.js';

export function registerSheet(program: Command, { io }: CommandContext): void {
  program
    .command('sheet')
    .description('make a contact sheet of a rendered sequence: every Nth frame, frame numbers printed')
    .argument('<shot-or-sequence>', 'a shot file (its rendered output) or a frame template such as render/x.####.png')
    .requiredOption('-o, --out <file>', 'the sheet to write: .png (8-bit sRGB) or .svg')
    .addOption(new Option('--every <n>', 'one tile every N frames (default: at most 24 tiles)').argParser(positiveInt('--every')))
    .addOption(new Option('--columns <n>', 'tiles a row').default(6).argParser(positiveInt('--columns')))
    .addOption(new Option('--tile-width <px>', 'tile width in pixels').default(320).argParser(positiveInt('--tile-width')))
    .option('--over <plate>', 'show the pass added over this background plate sequence (linear light)')
    .option('--rate <fps>', 'frame rate of a sequence given by template (default 24)')
    .addOption(new Option('--quality <q>', "draw the shot's frames now at this ghost quality instead of reading its render").choices([...QUALITIES]))
    .addOption(new Option('--scale <s>', "draw the shot's frames now at this fraction of their size instead of reading its render").argParser(fraction('--scale')))
    .action(async (arg: string, opts: { out: string; every?: number; columns: number; tileWidth: number; over?: string; rate?: string; quality?: GhostQuality; scale?: number }) => {
      requireExtension('--out', opts.out, ['.png', '.svg'], 'the sheet');
      checkPlateTemplate(opts.over);
      checkWritableFolder(path.dirname(path.resolve(opts.out)));
      // --quality or --scale: a quick look drawn now, without the render (which is never touched)
      const quick = opts.quality !== undefined || opts.scale !== undefined;
      const drawn = quick ? await drawnSource(arg, { quality: opts.quality, scale: opts.scale }) : undefined;
      const src = drawn ? drawn.src : await openSource(arg, opts.rate);
      const every = opts.every ?? Math.max(1, Math.ceil(src.frames.length / 24));
      const { image, frames, labels, tileHeight } = contactSheet(src, { every, columns: opts.columns, tileWidth: opts.tileWidth, over: opts.over });
      // a shot's sheet names its lens too
      const shot = drawn ? drawn.shot : /\.ya?ml$/i.test(arg) ? await loadShot(arg) : undefined;
      const lens = shot?.lens ? `; lens ${shot.lens.source}, f/${shot.lens.fNumber[0].value}${shot.lens.fNumber.length > 1 ? ' (keyed)' : ''}` : '';
      const look = drawn ? `; drawn at ${[opts.quality ? `${opts.quality} quality` : '', opts.scale !== undefined ? `scale ${opts.scale}` : ''].filter(Boolean).join(', ')}, not the render` : '';
      const title = `${path.basename(arg)}, frames ${frames[0]}-${frames[frames.length - 1]} every ${every}${opts.over ? ', over the plate' : ''}${lens}${look}`;
      const picture = `data:image/png;base64,${encodePng(image, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }).toString('base64')}`;
      writeOutputFile(path.resolve(opts.out), chartBytes(sheetSvg(picture, image.width, image.height, title, labels, tileHeight), opts.out));
      io.stdout(`${opts.out}: ${frames.length} frames (${frames[0]}-${frames[frames.length - 1]}, every ${every}), ${image.width}x${image.height}\n`);
    });
}
