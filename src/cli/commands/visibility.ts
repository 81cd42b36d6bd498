// `straylight visibility`: how much of each light its mattes let through, frame by frame, as CSV
// rows and an optional plot.

import path from 'node:path';
import type { Command } from 'commander';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadShot } from '../../io/load-shot.js';
import { encodePng } from '../../io/png.js';
import { FloatImage } from '../../raster/image.js';
import { drawLine, drawPolyline, fill } from '../../raster/draw.js';
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
    .option('--plot <file>', 'draw each light\'s visibility over the frame range to a PNG')
    .action((shotFile: string, opts: { csv?: string; plot?: string }) => {
      if (opts.plot) requireExtension('--plot', opts.plot, ['.png']);
      const shot = loadShot(shotFile);
      for (const f of [opts.csv, opts.plot]) if (f) checkWritableFolder(path.dirname(path.resolve(f)));
      const mattes = matteProvider(shot);
      const rows: string[] = ['frame,light,x,y,visibility,effective_intensity'];
      const curves = shot.lights.map(() => [] as number[]);
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
          rows.push(`${f},${light.name},${s.xPx.toFixed(2)},${s.yPx.toFixed(2)},${v.toFixed(4)},${(v * g).toPrecision(6)}`);
        });
      }
      if (opts.csv) writeOutputFile(path.resolve(opts.csv), Buffer.from(rows.join('\n') + '\n'));
      else io.stdout(rows.join('\n') + '\n');
      if (opts.plot) {
        const W = 1200;
        const H = 160 + 120 * shot.lights.length;
        const img = new FloatImage(W, H);
        fill(img, [0.03, 0.03, 0.035]);
        const colours: [number, number, number][] = [[1, 0.55, 0.2], [0.3, 0.7, 1], [0.5, 1, 0.4], [1, 0.4, 0.8]];
        const n = shot.frame.last - shot.frame.first;
        const X = (k: number) => 60 + ((W - 100) * k) / Math.max(1, n);
        curves.forEach((c, li) => {
          const top = 40 + li * 120;
          const Y = (v: number) => top + 100 * (1 - v);
          drawLine(img, X(0), Y(0), X(n), Y(0), 1, [0.25, 0.25, 0.25]);
          drawLine(img, X(0), Y(1), X(n), Y(1), 1, [0.25, 0.25, 0.25]);
          drawPolyline(img, c.flatMap((v, k) => [X(k), Y(v)]), 2, colours[li % colours.length]);
        });
        writeOutputFile(path.resolve(opts.plot), encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
      }
    });
}
