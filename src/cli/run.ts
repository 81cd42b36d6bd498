// The command line: parses flags, calls the library, prints, and returns an exit code. Only
// main.ts reads process.argv and exits; tests drive run() directly.

import path from 'node:path';
import { Command, CommanderError, Option } from 'commander';
import { ExitCode, InputError, StraylightError, UsageError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { loadShot } from '../io/load-shot.js';
import { checkOutputTemplate } from '../shot/resolve.js';
import type { AlphaMode, OutputFormat, ResolvedShot } from '../shot/types.js';
import { renderSequence, shardFrames, type FrameRange } from '../render/sequence.js';
import { renderFrame } from '../render/render-frame.js';
import { availableParallelism } from 'node:os';
import type { Shard } from '../io/manifest.js';
import { loadLens } from '../io/load-lens.js';
import { encodePng } from '../io/png.js';
import { encodeOutput } from '../io/encode-frame.js';
import { prepareLens } from '../optics/ghost-system.js';
import { formatLensReport, lensPlot, lensReport } from '../optics/report.js';
import { existsSync } from 'node:fs';
import { FlashAnalyser, type FlashReport } from '../safety/flash.js';
import { readFrameLinear } from '../io/read-frame.js';
import { expandFramePath } from '../io/frame-path.js';
import { formatFlashReport } from './flash-report.js';
import { outputSequences, passTemplate } from '../render/passes.js';
import { batchHtml, type BatchReport, type BatchShot } from '../render/batch-report.js';
import { FloatImage } from '../raster/image.js';
import { slurmScripts } from '../farm/slurm.js';
import { lightVisibility, matteProvider } from '../render/render-frame.js';
import { shutterTimes } from '../render/shutter.js';
import { lightGain, lightState } from '../render/frame-state.js';
import { drawLine, drawPolyline, fill } from '../raster/draw.js';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { formatVerify, sequencesIn, verifySequence, type VerifyReport } from '../render/verify.js';
import { shotHash } from '../io/manifest.js';
import { statSync } from 'node:fs';
import { Progress, renderRate } from './progress.js';
import { VERSION } from '../version.js';
import { contactSheet } from '../review/sheet.js';
import { findFfmpeg, movieKind, writeMovie } from '../review/movie.js';
import { addPlate, checkPlateTemplate, compositeTemplate, openSource, readPlate, readSource, timecodeOf } from '../review/source.js';
import { writeComposites } from '../review/composite.js';
import { shotSummary } from './summary.js';

export interface CliIO {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  stderrIsTTY: boolean;
  /** aborted on SIGINT/SIGTERM: renders stop between frames */
  signal?: AbortSignal;
}

/** Parse "A-B" or "A" (negative numbers allowed: "-5--1"). */
export function parseFrameRange(text: string, shot: ResolvedShot): FrameRange {
  const m = /^\s*(-?\d+)\s*(?:-\s*(-?\d+))?\s*$/.exec(text);
  if (!m) throw new UsageError(`--frames: expected A-B or A (e.g. 1001-1010), found "${text}"`);
  const first = Number(m[1]);
  const last = m[2] === undefined ? first : Number(m[2]);
  if (last < first) throw new UsageError(`--frames: the range ${text} runs backwards`);
  const { first: sf, last: sl } = shot.frame;
  if (first < sf || last > sl) throw new UsageError(`--frames: ${first}-${last} lies outside the shot's range ${sf}-${sl}`);
  return { first, last };
}

/** Parse K/N with 0 <= K < N. */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const k = m ? Number(m[1]) : NaN;
  const n = m ? Number(m[2]) : NaN;
  if (!m || n < 1 || k >= n) throw new UsageError(`--shard: expected K/N with 0 <= K < N (e.g. 0/4), found "${text}"`);
  return { k, n };
}

function positiveInt(name: string) {
  return (v: string): number => {
    const n = Number(v);
    if (!/^\s*\d+\s*$/.test(v) || !Number.isInteger(n) || n < 1) throw new UsageError(`${name}: expected a whole number of at least 1, found "${v}"`);
    return n;
  };
}

function integer(name: string) {
  return (v: string): number => {
    if (!/^\s*-?\d+\s*$/.test(v)) throw new UsageError(`${name}: expected a whole number, found "${v}"`);
    return Number(v);
  };
}

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

  program
    .command('render')
    .description('render the shot (or some of its frames) to its numbered frame sequence')
    .argument('<shot>', 'shot file (YAML)')
    .option('--frames <A-B>', 'render only frames A to B (inside the shot\'s range)')
    .option('--out <template>', 'output path template with #### or %04d, relative to the current folder (default: the shot\'s output.path)')
    .addOption(new Option('--jobs <n>', 'worker threads (default: the available parallelism)').argParser(positiveInt('--jobs')))
    .option('--shard <K/N>', 'render only share K of N (0-based): frames whose index from the first is K mod N')
    .option('--force', 'render every frame, even those the manifest shows are already there')
    .addOption(new Option('--progress <style>', 'progress on stderr: line (default) or json (one JSON object a line, for farm logs)').choices(['line', 'json']))
    .option('--quiet', 'print nothing but errors and safety warnings')
    .option('--fail-on-flash', 'exit 5 when flash screening flags the rendered frames')
    .addOption(new Option('--format <format>', "output format, instead of the shot's (an --out ending in .exr also picks exr)").choices(['png16', 'png8', 'exr']))
    .addOption(new Option('--alpha <mode>', "alpha, instead of the shot's: none (add), premultiplied, or emission (exr: over adds)").choices(['none', 'premultiplied', 'emission']))
    .option('--movie <file>', 'then encode a review movie with ffmpeg: .mov (ProRes 4444 with alpha) or .mp4 (H.264)')
    .option('--over <plate>', 'then write review frames of the pass added over this background plate sequence (linear light; NAME.over.####.png), and make any --movie from them')
    .action(async (shotFile: string, opts: { frames?: string; out?: string; jobs?: number; shard?: string; force?: boolean; progress?: 'line' | 'json'; quiet?: boolean; failOnFlash?: boolean; movie?: string; over?: string; format?: OutputFormat; alpha?: AlphaMode }) => {
      // review options are checked before any work, so an overnight render does not fail at the end
      if (opts.movie) movieKind(opts.movie);
      const ffmpeg = opts.movie ? findFfmpeg() : undefined;
      checkPlateTemplate(opts.over);
      if ((opts.movie || opts.over) && opts.shard) throw new UsageError(`${opts.movie ? '--movie' : '--over'} needs the whole sequence: make it after the shards, with a render of the whole shot (finished frames are kept)`);
      const shot = withOutputOptions(loadShot(shotFile), opts);
      const frames = opts.frames ? parseFrameRange(opts.frames, shot) : { first: shot.frame.first, last: shot.frame.last };
      let template: string | undefined;
      if (opts.out) {
        const problem = checkOutputTemplate(opts.out, shot.output.format);
        if (problem) throw new UsageError(`--out: ${problem}`);
        template = path.resolve(opts.out);
      }
      const shard = opts.shard ? parseShard(opts.shard) : undefined;
      const jobs = opts.jobs ?? availableParallelism();
      let total = shardFrames(frames, shard).length;
      const json = opts.progress === 'json';
      const progress = opts.quiet || json ? undefined : new Progress({ write: io.stderr, isTTY: io.stderrIsTTY }, total, 'render');
      const started = performance.now();
      let count = 0;
      let kept = 0;
      const emit = (o: object) => io.stderr(`${JSON.stringify(o)}\n`);
      // every render screens what it makes for flashing (photosensitive seizure risk); a share of a
      // sharded render sees every Nth frame only, so the whole is screened after (see `farm`)
      const sharded = Boolean(shard && shard.n > 1);
      const analyser = new FlashAnalyser(shot.frame.widthPx, shot.frame.heightPx, shot.frame.rate);
      const sequences = outputSequences(shot);
      total *= sequences.length;
      if (progress) progress.total = total;
      const result = { written: [] as number[], skipped: [] as number[], failed: [] as { frame: number; error: string }[], interrupted: false, manifest: '' };
      for (const seq of sequences) {
        if (result.interrupted) break;
        const r = await renderSequence(seq.shot, {
          frames,
          template: template ? writtenTemplate(seq, template) : undefined,
          shard,
          jobs,
          force: opts.force,
          signal: io.signal,
          onCells: sequences.length === 1 && !sharded ? (f, cells) => analyser.addCells(f, cells) : undefined,
          onFrame: (e) => {
            count++;
            if (e.kind === 'skipped') kept++;
            if (json) {
              const secs = (performance.now() - started) / 1000;
              emit({ event: e.kind, frame: e.frame, ...(sequences.length > 1 ? { pass: seq.name } : {}), done: count, total, fps: Number(renderRate(count - kept, secs).toFixed(3)), ...(e.kind === 'failed' ? { error: e.error } : {}) });
            } else if (e.kind === 'failed') {
              io.stderr(`${progress && io.stderrIsTTY ? '\n' : ''}frame ${e.frame}${sequences.length > 1 ? ` (${seq.name} pass)` : ''} failed: ${e.error}\n`);
            }
            progress?.frameDone(e.kind);
          },
        });
        result.written.push(...r.written);
        result.skipped.push(...r.skipped);
        result.failed.push(...r.failed);
        result.interrupted = r.interrupted;
        result.manifest = r.manifest;
      }
      progress?.finish();
      const dest = template ?? shot.output.template;
      const seconds = (performance.now() - started) / 1000;
      if (json) {
        emit({ event: 'summary', written: result.written.length, skipped: result.skipped.length, failed: result.failed.length, interrupted: result.interrupted, seconds: Number(seconds.toFixed(3)), manifest: result.manifest });
      }
      if (result.interrupted) {
        io.stderr(`interrupted: ${result.written.length + result.skipped.length} of ${total} frames are in ${dest}; finished frames are whole and recorded in ${result.manifest}\n`);
        setExit(ExitCode.interrupted);
      } else if (result.failed.length > 0) {
        io.stderr(`${result.failed.length} of ${total} frames failed (${result.failed.map((f) => f.frame).join(', ')}); the other ${result.written.length + result.skipped.length} are in place\n`);
        setExit(ExitCode.framesFailed);
      } else if (progress) {
        const keptNote = result.skipped.length ? ` (${result.skipped.length} already there, kept)` : '';
        const where = sequences.length > 1 ? `${sequences.length} passes (${sequences.map((q) => q.name).join(', ')}) beside ${dest}` : dest;
        const n = result.written.length;
        io.stderr(`rendered ${n} frame${n === 1 ? '' : 's'} to ${where}${keptNote} in ${seconds.toFixed(1)} s\n`);
      }
      if (!result.interrupted && sharded) {
        if (!opts.quiet) io.stderr(`flash screening needs every frame in order: run straylight flashes ${shotFile} when all shards are done\n`);
      } else if (!result.interrupted && result.failed.length === 0) {
        // separate passes are judged together, as the viewer will see them: read back and summed
        const report = sequences.length === 1 ? analyser.report() : screenSequences(sequences.map((q) => writtenTemplate(q, template)), frames, shot).report();
        if (report.spans.length > 0) {
          io.stderr(`WARNING: this pass may flash dangerously for viewers with photosensitive epilepsy.\n${formatFlashReport(report, timecodeOf(shot), 'over black')}`);
          if (opts.failOnFlash) setExit(ExitCode.flashes);
        }
      }
      if ((opts.movie || opts.over) && !result.interrupted && result.failed.length === 0) {
        const templates = sequences.map((q) => writtenTemplate(q, template));
        const src = { templates, frames: frameList(frames), rate: shot.frame.rate, timecode: timecodeOf(shot), pixelAspect: shot.frame.pixelAspect };
        // composites and movie in one pass over the frames
        const review = opts.over ? compositeTemplate(template ?? shot.output.template) : undefined;
        if (opts.movie) {
          const movie = await writeMovie(src, opts.movie, { over: opts.over, composites: review, ffmpeg, signal: io.signal });
          if (!opts.quiet) io.stderr(`movie: ${movie.file} (${movie.frames} frames, ${movie.kind === 'h264' ? 'H.264' : 'ProRes 4444 with alpha'}${opts.over ? ', over the plate' : ''})\n`);
        } else if (opts.over) writeComposites(src, opts.over, review!, io.signal);
        if (review && !opts.quiet) io.stderr(`review frames: ${review} (${src.frames.length} frames over the plate)\n`);
      }
    });

  program
    .command('batch')
    .description('render many shots, going on past failures, and write a report (JSON and an HTML page)')
    .argument('<shots...>', 'shot files')
    .option('--report <file.json>', 'where to write the report; the HTML page goes beside it', 'straylight-report.json')
    .addOption(new Option('--jobs <n>', 'worker threads per shot (default: the available parallelism)').argParser(positiveInt('--jobs')))
    .option('--force', 'render every frame, even those already there')
    .option('--quiet', 'print nothing but errors and safety warnings')
    .action(async (shots: string[], opts: { report: string; jobs?: number; force?: boolean; quiet?: boolean }) => {
      if (!opts.report.endsWith('.json')) throw new UsageError(`--report: the file must end in .json, found "${opts.report}"`);
      const report: BatchReport = { tool: `straylight ${VERSION}`, started: new Date().toISOString(), finished: '', shots: [] };
      for (const file of shots) {
        if (io.signal?.aborted) break;
        const started = performance.now();
        const entry: BatchShot = { shot: file, status: 'ok', frames: 0, written: 0, skipped: 0, failed: [], seconds: 0, flashes: [], warnings: [] };
        report.shots.push(entry);
        try {
          const shot = loadShot(file);
          entry.output = shot.output.template;
          entry.frames = shot.frame.last - shot.frame.first + 1;
          const sequences = outputSequences(shot);
          entry.frames *= sequences.length;
          let interrupted = false;
          for (const seq of sequences) {
            const result = await renderSequence(seq.shot, { jobs: opts.jobs ?? availableParallelism(), force: opts.force, signal: io.signal });
            entry.written += result.written.length;
            entry.skipped += result.skipped.length;
            entry.failed.push(...result.failed);
            interrupted ||= result.interrupted;
          }
          entry.status = interrupted ? 'interrupted' : entry.failed.length ? 'frames-failed' : 'ok';
          // screen the whole sequence as it is on disk now (kept frames included), passes summed
          if (entry.status === 'ok') {
            entry.flashes = screenSequences(sequences.map((q) => q.shot.output.template), { first: shot.frame.first, last: shot.frame.last }, shot).report().spans;
          }
          const mid = Math.round((shot.frame.first + shot.frame.last) / 2);
          const thumbFile = expandFramePath(shot.output.template, mid);
          if (existsSync(thumbFile)) entry.thumbnail = thumbnail(thumbFile);
          if (!opts.quiet) io.stderr(`${file}: ${entry.status}, ${entry.written} rendered, ${entry.skipped} kept, ${entry.failed.length} failed\n`);
          if (entry.flashes.length) io.stderr(`WARNING: ${file} may flash dangerously for viewers with photosensitive epilepsy (frames ${entry.flashes.map((s) => `${s.firstFrame}-${s.lastFrame}`).join(', ')})\n`);
        } catch (e) {
          entry.status = 'bad-input';
          entry.error = e instanceof StraylightError ? e.message : (e as Error).stack ?? String(e);
          io.stderr(`${file}: not rendered:\n${entry.error}\n`);
        }
        entry.seconds = (performance.now() - started) / 1000;
      }
      report.finished = new Date().toISOString();
      const json = path.resolve(opts.report);
      writeFileAtomic(json, Buffer.from(`${JSON.stringify(report, null, 2)}\n`));
      writeFileAtomic(json.replace(/\.json$/, '.html'), Buffer.from(batchHtml(report)));
      const bad = report.shots.filter((s) => s.status !== 'ok').length;
      if (!opts.quiet) io.stderr(`batch: ${report.shots.length - bad} of ${report.shots.length} shots rendered; report in ${json} and ${json.replace(/\.json$/, '.html')}\n`);
      if (io.signal?.aborted) setExit(ExitCode.interrupted);
      else if (bad) setExit(ExitCode.framesFailed);
    });

  const farm = program.command('farm').description('spread a shot over a cluster with its own scheduler');
  farm
    .command('slurm')
    .description('write (and with --submit, submit) Slurm scripts: a job array rendering the shards, then a verify job')
    .argument('<shot>', 'shot file (YAML)')
    .requiredOption('--tasks <n>', 'array tasks, one shard each', positiveInt('--tasks'))
    .addOption(new Option('--jobs-per-task <n>', 'worker threads (and CPUs asked) per task').default(2).argParser(positiveInt('--jobs-per-task')))
    .option('--dir <folder>', 'where the scripts and logs go (default: slurm/ beside the frames)')
    .option('--partition <name>', 'Slurm partition')
    .option('--submit', 'submit with sbatch now (the verify job waits for the array)')
    .action((shotFile: string, opts: { tasks: number; jobsPerTask: number; dir?: string; partition?: string; submit?: boolean }) => {
      const shot = loadShot(shotFile);
      const folder = path.resolve(opts.dir ?? path.join(path.dirname(shot.output.template), 'slurm'));
      const bin = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', '..', 'bin', 'straylight.js');
      const scripts = slurmScripts({ shotFile: path.resolve(shotFile), tasks: opts.tasks, jobsPerTask: opts.jobsPerTask, folder, partition: opts.partition, node: process.execPath, bin });
      for (const [name, text] of Object.entries({ 'render.sbatch': scripts.render, 'verify.sbatch': scripts.verify, 'submit.sh': scripts.submit })) {
        writeFileAtomic(path.join(folder, name), Buffer.from(text));
      }
      if (!opts.submit) {
        io.stdout(`wrote ${folder}/render.sbatch, verify.sbatch and submit.sh; submit with: bash ${path.join(folder, 'submit.sh')}\n`);
        return;
      }
      let out: string;
      try {
        out = execFileSync('bash', [path.join(folder, 'submit.sh')], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
      } catch (e) {
        throw new StraylightError(`sbatch failed: ${((e as { stderr?: string }).stderr ?? (e as Error).message).trim()}`, ExitCode.framesFailed);
      }
      io.stdout(out);
    });

  program
    .command('visibility')
    .description('how much of each light its mattes let through, frame by frame (averaged over the shutter)')
    .argument('<shot>', 'shot file (YAML)')
    .option('--csv <file>', 'write frame,light,x,y,visibility,effective_intensity rows to a CSV file')
    .option('--plot <file>', 'draw each light\'s visibility over the frame range to a PNG')
    .action((shotFile: string, opts: { csv?: string; plot?: string }) => {
      if (opts.plot && path.extname(opts.plot).toLowerCase() !== '.png') throw new UsageError(`--plot: the file must end in .png, found "${opts.plot}"`);
      const shot = loadShot(shotFile);
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
      if (opts.csv) writeFileAtomic(path.resolve(opts.csv), Buffer.from(rows.join('\n') + '\n'));
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
        writeFileAtomic(path.resolve(opts.plot), encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
      }
    });

  program
    .command('verify')
    .description('check that a rendered sequence is complete and intact against its manifest')
    .argument('<shot-or-folder>', 'a shot file, or a folder holding rendered sequences and their manifests')
    .option('--json', 'print the report as JSON')
    .action((arg: string, opts: { json?: boolean }) => {
      let reports: VerifyReport[];
      if (existsSync(arg) && statSync(arg).isDirectory()) {
        const templates = sequencesIn(path.resolve(arg));
        if (templates.length === 0) throw new InputError(`${arg}: no sequence manifest in this folder`);
        reports = templates.map((t) => verifySequence(t));
      } else {
        const shot = loadShot(arg);
        reports = outputSequences(shot).map((q) => verifySequence(q.shot.output.template, { first: shot.frame.first, last: shot.frame.last, hash: shotHash(q.shot) }));
      }
      io.stdout(opts.json ? `${JSON.stringify(reports, null, 2)}\n` : reports.map(formatVerify).join(''));
      if (reports.some((r) => r.missing.length || r.corrupt.length || !Number.isFinite(r.first))) setExit(ExitCode.framesFailed);
    });

  program
    .command('flashes')
    .description('screen a rendered sequence for flashing that can trigger photosensitive seizures')
    .argument('<shot-or-sequence>', 'a shot file (screens its rendered output) or a frame template such as render/x.####.png')
    .option('--plate <template>', 'judge the pass added over this background plate sequence too')
    .option('--rate <fps>', 'frame rate of a sequence given by template (default 24)')
    .option('--json', 'print the report as JSON')
    .action((arg: string, opts: { plate?: string; rate?: string; json?: boolean }) => {
      checkPlateTemplate(opts.plate, '--plate');
      const src = openSource(arg, opts.rate);
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
      if (reports.some(([, r]) => r.spans.length > 0)) setExit(ExitCode.flashes);
    });

  program
    .command('sheet')
    .description('make a contact sheet of a rendered sequence: every Nth frame, frame numbers printed')
    .argument('<shot-or-sequence>', 'a shot file (its rendered output) or a frame template such as render/x.####.png')
    .requiredOption('-o, --out <file.png>', 'the sheet to write (8-bit sRGB PNG)')
    .addOption(new Option('--every <n>', 'one tile every N frames (default: at most 24 tiles)').argParser(positiveInt('--every')))
    .addOption(new Option('--columns <n>', 'tiles a row').default(6).argParser(positiveInt('--columns')))
    .addOption(new Option('--tile-width <px>', 'tile width in pixels').default(320).argParser(positiveInt('--tile-width')))
    .option('--over <plate>', 'show the pass added over this background plate sequence (linear light)')
    .option('--rate <fps>', 'frame rate of a sequence given by template (default 24)')
    .action((arg: string, opts: { out: string; every?: number; columns: number; tileWidth: number; over?: string; rate?: string }) => {
      if (path.extname(opts.out).toLowerCase() !== '.png') throw new UsageError(`--out: the sheet is a PNG; the file must end in .png, found "${opts.out}"`);
      checkPlateTemplate(opts.over);
      const src = openSource(arg, opts.rate);
      const every = opts.every ?? Math.max(1, Math.ceil(src.frames.length / 24));
      const { image, frames } = contactSheet(src, { every, columns: opts.columns, tileWidth: opts.tileWidth, over: opts.over });
      writeFileAtomic(path.resolve(opts.out), encodePng(image, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
      io.stdout(`${opts.out}: ${frames.length} frames (${frames[0]}-${frames[frames.length - 1]}, every ${every}), ${image.width}x${image.height}\n`);
    });

  program
    .command('check')
    .description('validate a shot file and print what it will render')
    .argument('<shot>', 'shot file (YAML)')
    .action((shotFile: string) => {
      const shot = loadShot(shotFile);
      io.stdout(shotSummary(shot, shotFile));
    });

  program
    .command('still')
    .description('render one frame to a file')
    .argument('<shot>', 'shot file (YAML)')
    .requiredOption('--frame <n>', 'frame number', integer('--frame'))
    .requiredOption('--out <file>', 'output file: .png or .exr')
    .action((shotFile: string, opts: { frame: number; out: string }) => {
      const shot = loadShot(shotFile);
      const ext = path.extname(opts.out).toLowerCase();
      if (ext !== '.png' && ext !== '.exr') throw new UsageError(`--out: the file must end in .png or .exr, found "${opts.out}"`);
      // the file's extension picks the format; the shot's other output settings apply
      const o = shot.output;
      const asked = ext === '.exr' ? { ...o, format: 'exr' as const } : o.format === 'exr' ? { ...o, format: 'png16' as const, transfer: 'linear' as const } : o;
      writeFileAtomic(path.resolve(opts.out), encodeOutput(renderFrame(shot, opts.frame), asked, shot.frame.pixelAspect));
    });

  program
    .command('lens')
    .description('show a lens: computed focal length, pupil, and its ghosts ranked by strength')
    .argument('<lens>', 'a preset name (see lenses/) or a lens file (YAML)')
    .option('--json', 'print the report as JSON')
    .option('--all', 'list every ghost, not only the 20 strongest')
    .option('--plot <file>', 'draw the lens cross-section and the strongest ghost\'s rays to a PNG')
    .action((name: string, opts: { json?: boolean; all?: boolean; plot?: string }) => {
      if (opts.plot && path.extname(opts.plot).toLowerCase() !== '.png') throw new UsageError(`--plot: the file must end in .png, found "${opts.plot}"`);
      const { lens, source } = loadLens(name);
      const system = prepareLens(lens, 'medium', 0);
      const report = lensReport(lens, system);
      io.stdout(opts.json ? `${JSON.stringify(report, null, 2)}\n` : formatLensReport(report, source, opts.all ? Infinity : 20));
      if (opts.plot) {
        writeFileAtomic(path.resolve(opts.plot), encodePng(lensPlot(lens, system), { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
      }
    });

  return program;
}

/**
 * The shot with the command line's output choices applied: --format (or an --out ending in .exr),
 * --alpha. OpenEXR is always linear; a PNG made from an EXR shot stays linear (as `still` does).
 */
function withOutputOptions(shot: ResolvedShot, opts: { out?: string; format?: OutputFormat; alpha?: AlphaMode }): ResolvedShot {
  const o = shot.output;
  const ext = opts.out ? path.extname(opts.out).toLowerCase() : '';
  const format = opts.format ?? (ext === '.exr' ? 'exr' : ext === '.png' && o.format === 'exr' ? 'png16' : o.format);
  const alpha = opts.alpha ?? o.alpha;
  if (alpha === 'emission' && format !== 'exr') throw new UsageError('--alpha emission needs the exr format (PNG stores straight alpha, so light under a zero alpha would be lost)');
  if (format === o.format && alpha === o.alpha) return shot;
  const transfer = format === 'exr' ? 'linear' : o.transfer;
  const ext2 = format === 'exr' ? '.exr' : '.png';
  // the shot's own output path follows the new format when --out does not replace it
  const template = opts.out ? o.template : o.template.replace(/\.[^./\\]+$/, ext2);
  return { ...shot, output: { ...o, format, alpha, transfer, template } };
}

/** A small sRGB PNG of a rendered frame, as a data URI (nearest-pixel reduction to 320 wide). */
function thumbnail(file: string): string {
  const f = readFrameLinear(file);
  const w = Math.min(320, f.width);
  const h = Math.max(1, Math.round((f.height * w) / f.width));
  const img = new FloatImage(w, h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const sx = Math.floor(((x + 0.5) * f.width) / w);
      const sy = Math.floor(((y + 0.5) * f.height) / h);
      const i = (sy * f.width + sx) * 3;
      img.data.set([f.rgb[i], f.rgb[i + 1], f.rgb[i + 2], 0], (y * w + x) * 4);
    }
  }
  return `data:image/png;base64,${encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }).toString('base64')}`;
}

/** Screen sequences summed frame by frame (separate passes, as they will be seen together). */
function screenSequences(templates: string[], range: FrameRange, shot: ResolvedShot): FlashAnalyser {
  const a = new FlashAnalyser(shot.frame.widthPx, shot.frame.heightPx, shot.frame.rate);
  const src = { templates, frames: frameList(range), rate: shot.frame.rate, pixelAspect: shot.frame.pixelAspect };
  for (const f of src.frames) a.addFrame(f, readSource(src, f).rgb, 3);
  return a;
}

function frameList(range: FrameRange): number[] {
  const out: number[] = [];
  for (let f = range.first; f <= range.last; f++) out.push(f);
  return out;
}

/** Where a render writes a sequence: the --out template (per pass when passes are separate), or the shot's own. */
function writtenTemplate(seq: { name: string; shot: ResolvedShot }, template: string | undefined): string {
  if (!template) return seq.shot.output.template;
  return seq.name === 'combined' ? template : passTemplate(template, seq.name as never);
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
      const n = e instanceof InputError || e.exitCode !== ExitCode.badInput ? '' : '';
      io.stderr(`${e.message}\n${n}`);
      if (e.exitCode === ExitCode.badInput && 'diagnostics' in e) {
        const count = (e as { diagnostics: unknown[] }).diagnostics.length;
        io.stderr(`straylight: ${count} problem${count === 1 ? '' : 's'} found; nothing was rendered\n`);
      }
      return e.exitCode;
    }
    io.stderr(`straylight: internal error (please report it):\n${(e as Error).stack ?? String(e)}\n`);
    return ExitCode.internal;
  }
}
