// `straylight visibility`: how much of each light its mattes let through, frame by frame, as CSV
// rows and an optional plot.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadShot } from '../../io/load-shot.js';
import { chartBytes } from '../../io/svg-png.js';
import { visibilitySvg } from '../../plot/visibility.js';
import { framesToTimecode } from '../../timeline/timecode.js';
import { lightVisibility, matteProvider } from '../../render/render-frame.js';
import { shutterTimes } from '../../timeline/shutter.js';
import { lightGain, lightState } from '../../render/frame-state.js';
import type { CommandContext } from '../context.js';
import { requireExtension } from '../options.js';

export function registerVisibility(program: Command, { io }: CommandContext): void {
  program
    .command('visibility')
    .description('how much of each light its mattes let through, frame by frame (averaged over the shutter)')
    .argument('<shot>', 'shot file (YAML)')
    .option('--csv <file>', 'write frame,light,x,y,visibility,effective_intensity rows to a CSV file')
    .option('--plot <file>', 'draw each light\'s visibility over the frame range: a chart as .svg or .png')
    .action((shotFile: string, opts: { csv?: string; plot?: string }) => {
      if (opts.plot) requireExtension('--plot', opts.plot, ['.svg', '.png']);
      const shot = loadShot(shotFile);
      for (const f of [opts.csv, opts.plot]) if (f) checkWritableFolder(path.dirname(path.resolve(f)));
      const mattes = matteProvider(shot);
      const rows: string[] = ['frame,light,x,y,visibility,effective_intensity'];
      const curves = shot.lights.map(() => [] as number[]);
      const offFrame = shot.lights.map(() => [] as boolean[]);
      for (let f = shot.frame.first; f <= shot.frame.last; f++) {
        const times = shutterTimes(shot.shutter, f, shot.seed);
        shot.lights.forEach((light, li) => {
          let v = 0;
          let g = 0;
          for (const t of times) {
            v += lightVisibility(shot, light, t, mattes);
            g += lightGain(light, t);
          }
          v /= times.length;
          g /= times.length;
          const s = lightState(light, f);
          curves[li].push(v);
          offFrame[li].push(s.xPx < 0 || s.yPx < 0 || s.xPx >= shot.frame.widthPx || s.yPx >= shot.frame.heightPx);
          rows.push(`${f},${light.name},${s.xPx.toFixed(2)},${s.yPx.toFixed(2)},${v.toFixed(4)},${(v * g).toPrecision(6)}`);
        });
      }
      if (opts.csv) writeOutputFile(path.resolve(opts.csv), Buffer.from(rows.join('\n') + '\n'));
      else io.stdout(rows.join('\n') + '\n');
      if (opts.plot) {
        const chart = visibilitySvg({
          title: `Visibility of each light: ${path.basename(shotFile)}, frames ${shot.frame.first}-${shot.frame.last}`,
          first: shot.frame.first,
          last: shot.frame.last,
          timecode: (n) => framesToTimecode(shot.frame.timecodeStartFrames + (n - shot.frame.first), shot.frame.rate, shot.frame.dropFrame),
          curves: shot.lights.map((light, li) => ({ name: light.name, values: curves[li], offFrame: offFrame[li] })),
        });
        writeOutputFile(path.resolve(opts.plot), chartBytes(chart, opts.plot));
      }
    });
}
