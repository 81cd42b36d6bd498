// `straylight lights`: the bright lights of a plate sequence found, tracked from frame to frame,
// and written as straylight's own inputs: one track CSV per light and a ready shot file, with
// each light's colour and level from the plate and a plate matte for its occlusion.

import { existsSync } from 'node:fs';
import path from 'node:path';
import { Option, type Command } from 'commander';
import { InputError, UsageError } from '../../errors.js';
import { expandFramePath, parseFrameTemplate } from '../../format/frame-path.js';
import { readFrameLinear } from '../../io/read-frame.js';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { encodePng } from '../../io/png.js';
import { scanPlate } from '../../io/plate-scan.js';
import { chartBytes } from '../../io/svg-png.js';
import { plateLights, shotText, spans, trackCsv } from '../../plate/report.js';
import { linkTracks } from '../../plate/track.js';
import { plateTracksSvg } from '../../plot/plate-tracks.js';
import { FloatImage } from '../../raster/image.js';
import { parseFrameRate } from '../../timeline/frame-rate.js';
import type { CommandContext } from '../context.js';
import { numberIn, positiveInt, requireExtension } from '../options.js';

interface LightsOptions {
  out: string;
  threshold?: number;
  relative?: number;
  minArea: number;
  maxLights: number;
  gate: number;
  maxGap: number;
  minFrames: number;
  rate: string;
  lift: number;
  json?: boolean;
  plot?: string;
  output?: string;
  force?: boolean;
}

export function registerLights(program: Command, { io }: CommandContext): void {
  program
    .command('lights')
    .description('find and track the bright lights of a plate sequence; write their tracks and a shot file')
    .argument('<plate>', 'plate frames: a template such as plate/shot.####.exr (OpenEXR scene-linear, or PNG through its transfer)')
    .requiredOption('-o, --out <shot.yaml>', 'the shot file to write; the tracks go beside it (SHOT.light-1.csv, ...)')
    .addOption(new Option('--threshold <v>', 'a light is pixels at or above this luminance, linear (default 0.95: a display white for PNG plates)').argParser(numberIn('--threshold', 0, 1e12, true)).conflicts('relative'))
    .addOption(new Option('--relative <f>', "instead: this fraction of each frame's robust maximum (its 25th brightest pixel)").argParser(numberIn('--relative', 0, 1, true)))
    .option('--min-area <px>', 'blobs of fewer pixels are ignored', positiveInt('--min-area'), 4)
    .option('--max-lights <n>', 'at most this many blobs a frame, the brightest first', positiveInt('--max-lights'), 8)
    .option('--gate <px>', "largest jump from a track's prediction to the blob it takes", numberIn('--gate', 0, 1e6, true), 48)
    .option('--max-gap <frames>', 'frames a light may be hidden and keep its identity (its path is predicted through the gap)', positiveInt('--max-gap'), 12)
    .option('--min-frames <n>', 'tracks seen on fewer frames are dropped', positiveInt('--min-frames'), 3)
    .option('--rate <fps>', "the plate's frame rate for the shot file: 24, 25, 29.97 or 30000/1001", '24')
    .option('--lift <stops>', "stops added to each light's measured level (a light clipped in the plate is brighter than it says)", numberIn('--lift', -40, 40), 0)
    .option('--json', 'print a summary as JSON')
    .option('--plot <file>', 'draw the tracks over a frame of the plate: .png or .svg')
    .option('--output <template>', 'where the shot renders to, as the shot file writes it (default render/NAME/NAME.####.exr beside it)')
    .option('--force', 'replace a shot file or tracks already there')
    .action(async (plate: string, opts: LightsOptions) => {
      requireExtension('--out', opts.out, ['.yaml', '.yml']);
      if (opts.plot) requireExtension('--plot', opts.plot, ['.svg', '.png']);
      const problem = parseFrameTemplate(plate);
      if (typeof problem === 'string') throw new UsageError(`${plate}: ${problem}`);
      if (opts.output) {
        const bad = parseFrameTemplate(opts.output);
        if (typeof bad === 'string') throw new UsageError(`--output ${opts.output}: ${bad}`);
        requireExtension('--output', opts.output, ['.exr', '.png']);
      }
      const rate = parseFrameRate(opts.rate.includes('/') ? opts.rate : Number(opts.rate));
      if (typeof rate === 'string') throw new UsageError(`--rate: ${rate}, found "${opts.rate}"`);
      const shotFile = path.resolve(opts.out);
      const dir = path.dirname(shotFile);
      const base = path.basename(shotFile).replace(/\.ya?ml$/i, '');
      checkWritableFolder(dir);
      if (opts.plot) checkWritableFolder(path.dirname(path.resolve(opts.plot)));
      if (existsSync(shotFile) && !opts.force) throw new InputError(`${opts.out} exists; give --force to replace it (nothing was written)`);

      const absolute = opts.relative === undefined ? (opts.threshold ?? 0.95) : undefined;
      const threshold = absolute === undefined ? { relative: opts.relative! } : { absolute };
      const scan = scanPlate(path.resolve(plate), plate, { threshold, minArea: opts.minArea, maxCount: opts.maxLights });
      const tracks = linkTracks(scan.frames, { gate: opts.gate, maxGap: opts.maxGap, minFrames: opts.minFrames });
      const thresholds = scan.frames.map((f) => f.threshold);
      const tMin = Math.min(...thresholds);
      if (tracks.length === 0) {
        const seen = scan.frames.reduce((n, f) => n + f.blobs.length, 0);
        throw new InputError(
          seen === 0
            ? `${plate}: no light reaches the threshold (${absolute !== undefined ? `luminance ${absolute}` : `${opts.relative} of each frame's robust maximum`}) on any frame; lower --threshold, or give --relative; nothing was written`
            : `${plate}: ${seen} bright spots, but none seen on ${opts.minFrames} frames in a row within the gate (${opts.gate} px); lower --min-frames or widen --gate; nothing was written`,
        );
      }
      const lights = plateLights(tracks, opts.lift, scan.displayReferred ? 0.99 : Infinity);
      const csvName = (l: { name: string }) => `${base}.${l.name}.csv`;
      const outputs = [shotFile, ...lights.map((l) => path.join(dir, csvName(l)))];
      const taken = outputs.filter((f) => existsSync(f));
      if (taken.length && !opts.force) throw new InputError(`${taken.map((f) => path.relative(process.cwd(), f)).join(', ')} exist${taken.length === 1 ? 's' : ''}; give --force to replace (nothing was written)`);

      const first = scan.frames[0].frame;
      const last = scan.frames[scan.frames.length - 1].frame;
      const relPlate = path.relative(dir, path.resolve(plate)).split(path.sep).join('/');
      for (const l of lights) writeOutputFile(path.join(dir, csvName(l)), Buffer.from(trackCsv(l)));
      const text = shotText(lights, {
        plate: relPlate,
        csv: csvName,
        width: scan.width,
        height: scan.height,
        rate: opts.rate.includes('/') ? `"${opts.rate}"` : opts.rate,
        first,
        last,
        // a relative threshold becomes the plate matte's absolute one: its lowest over the frames
        threshold: absolute ?? tMin,
        output: opts.output ?? `render/${base}/${base}.####.exr`,
      });
      writeOutputFile(shotFile, Buffer.from(text));

      if (opts.plot) {
        // shown over the frame on which the most lights are seen, the one nearest the middle
        const seenOn = (f: number) => lights.filter((l) => l.rows.some((r) => r.frame === f && !r.predicted)).length;
        const mid = (first + last) / 2;
        const shownFrame = scan.frames.map((f) => f.frame).reduce((a, b) => (seenOn(b) > seenOn(a) || (seenOn(b) === seenOn(a) && Math.abs(b - mid) < Math.abs(a - mid)) ? b : a));
        const img = new FloatImage(scan.width, scan.height);
        const rgb = readFrameLinear(expandFramePath(path.resolve(plate), shownFrame)).rgb;
        for (let i = 0; i < scan.width * scan.height; i++) img.data.set([rgb[i * 3], rgb[i * 3 + 1], rgb[i * 3 + 2], 1], i * 4);
        const png = encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' });
        const svg = plateTracksSvg({
          title: `Lights tracked in ${path.basename(plate)}, frames ${first}-${last}`,
          subtitle: `shown over frame ${shownFrame}; solid: seen, dashed: predicted behind something`,
          width: scan.width,
          height: scan.height,
          png,
          frame: shownFrame,
          tracks: lights.map((l) => ({ name: l.name, first: l.rows[0].frame, last: l.rows[l.rows.length - 1].frame, predicted: l.rows.filter((r) => r.predicted).length, points: l.rows })),
        });
        writeOutputFile(path.resolve(opts.plot), chartBytes(svg, opts.plot));
      }

      const summary = lights.map((l) => ({
        name: l.name,
        track: path.join(path.dirname(opts.out), csvName(l)),
        first: l.rows[0].frame,
        last: l.rows[l.rows.length - 1].frame,
        predicted: l.rows.filter((r) => r.predicted).map((r) => r.frame),
        colour: l.colour,
        radiusPx: l.radiusPx,
        peak: l.peak,
        clipped: l.clipped,
      }));
      if (opts.json) {
        io.stdout(JSON.stringify({ plate, shot: opts.out, width: scan.width, height: scan.height, first, last, lights: summary }, null, 2) + '\n');
      } else {
        io.stdout(`${opts.out}: ${lights.length} light${lights.length === 1 ? '' : 's'} from ${plate} (frames ${first}-${last})\n`);
        for (const s of summary) {
          const hidden = s.predicted.length ? `; predicted behind something on ${spans(s.predicted)}` : '';
          io.stdout(`  ${s.name}: frames ${s.first}-${s.last}${hidden}; radius ${s.radiusPx.toFixed(1)} px; ${s.track}\n`);
        }
      }
      const clipped = lights.filter((l) => l.clipped);
      if (clipped.length && opts.lift === 0) {
        io.stderr(`warning: ${clipped.map((l) => l.name).join(', ')} ${clipped.length === 1 ? 'is' : 'are'} clipped in the plate: ${clipped.length === 1 ? 'its' : 'their'} level is a floor; --lift STOPS raises it (a bright lamp is 8 to 14 stops over white)\n`);
      }
    });
}
