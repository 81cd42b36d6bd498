// `straylight flashes`: screens a rendered sequence (over black, and over a plate if given) for
// flashing that can trigger photosensitive seizures (WCAG 2.x SC 2.3.1 thresholds).

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { chartBytes } from '../../io/svg-png.js';
import { flashesSvg } from '../../plot/flashes.js';
import { framesToTimecode } from '../../timeline/timecode.js';
import { requireExtension } from '../options.js';
import { ExitCode } from '../../errors.js';
import { FlashAnalyser, type FlashReport } from '../../safety/flash.js';
import { addPlate, checkPlateTemplate, openSource, readPlate, readSource } from '../../review/source.js';
import type { CommandContext } from '../context.js';
import { formatFlashReport } from '../flash-report.js';

export function registerFlashes(program: Command, { io, setExit }: CommandContext): void {
  program
    .command('flashes')
    .description('screen a rendered sequence for flashing that can trigger photosensitive seizures')
    .argument('<shot-or-sequence>', 'a shot file (screens its rendered output) or a frame template such as render/x.####.png')
    .option('--plate <template>', 'judge the pass added over this background plate sequence too')
    .option('--rate <fps>', 'frame rate of a sequence given by template (default 24)')
    .option('--json', 'print the report as JSON')
    .option('--plot <file>', 'draw luminance and flashes a second against the limits, flagged spans shaded: .svg or .png (over the plate when --plate is given)')
    .action(async (arg: string, opts: { plate?: string; rate?: string; json?: boolean; plot?: string }) => {
      checkPlateTemplate(opts.plate, '--plate');
      if (opts.plot) {
        requireExtension('--plot', opts.plot, ['.svg', '.png']);
        checkWritableFolder(path.dirname(path.resolve(opts.plot)));
      }
      const src = await openSource(arg, opts.rate);
      let black: FlashAnalyser | undefined;
      let plated: FlashAnalyser | undefined;
      for (const f of src.frames) {
        // separate passes are judged summed, as they will be seen
        const frame = readSource(src, f);
        black ??= new FlashAnalyser(frame.width, frame.height, src.rate);
        black.addFrame(f, frame.rgb, 3);
        if (opts.plate) {
          plated ??= new FlashAnalyser(frame.width, frame.height, src.rate);
          plated.addFrame(f, addPlate(frame, readPlate(opts.plate, f, frame.width, frame.height, '--plate')).rgb, 3);
        }
      }
      // a bare template has no timecode of its own: label frames by their numbers
      const tc = src.timecode ?? { rate: src.rate, dropFrame: false, startFrames: src.frames[0], first: src.frames[0] };
      const reports: [string, FlashReport][] = [['over black', black!.report()]];
      if (plated) reports.push(['added over the plate', plated.report()]);
      if (opts.json) {
        io.stdout(`${JSON.stringify(Object.fromEntries(reports.map(([k, r]) => [k === 'over black' ? 'overBlack' : 'overPlate', r])), null, 2)}\n`);
      } else {
        io.stdout(reports.map(([k, r]) => formatFlashReport(r, tc, k)).join('\n'));
      }
      if (opts.plot) {
        const [over, report] = reports[reports.length - 1];
        const analyser = plated ?? black!;
        const chart = flashesSvg({
          title: `Flash screening: ${path.basename(arg)}, frames ${report.firstFrame}-${report.lastFrame}`,
          over,
          trace: analyser.trace,
          spans: report.spans,
          timecode: (n) => framesToTimecode(tc.startFrames + n - tc.first, tc.rate, tc.dropFrame),
        });
        writeOutputFile(path.resolve(opts.plot), chartBytes(chart, opts.plot));
      }
      if (reports.some(([, r]) => r.spans.length > 0)) setExit(ExitCode.flashes);
    });
}
