// `straylight render`: a shot (or some of its frames, or one shard) to its numbered frame sequence,
// with progress, flash screening of what it rendered, and the optional review movie and composites.

import path from 'node:path';
import { availableParallelism } from 'node:os';
import { Option, type Command } from 'commander';
import { ExitCode, UsageError } from '../../errors.js';
import { loadShot } from '../../io/load-shot.js';
import { checkOutputTemplate } from '../../shot/resolve.js';
import type { AlphaMode, OutputFormat, ResolvedShot } from '../../shot/types.js';
import { planSequence, refuseForeign, renderSequence, shardFrames } from '../../render/sequence.js';
import { checkWritableFolder } from '../../io/output-file.js';
import { availableBytes, planWorkers } from '../../render/memory.js';
import { outputSequences } from '../../render/passes.js';
import { FlashAnalyser } from '../../safety/flash.js';
import { findFfmpeg, movieKind, writeMovie } from '../../review/movie.js';
import { checkPlateTemplate, compositeTemplate, timecodeOf } from '../../review/source.js';
import { writeComposites } from '../../review/composite.js';
import { VERSION } from '../../version.js';
import { framesToTimecode } from '../../timeline/timecode.js';
import type { CommandContext } from '../context.js';
import { formatFlashReport } from '../flash-report.js';
import { fraction, frameList, memorySize, parseFrameRange, parseShard, positiveInt, QUALITIES } from '../options.js';
import { scaleShot, withGhostQuality } from '../../render/overrides.js';
import type { GhostQuality } from '../../optics/ghost-system.js';
import { Progress, renderRate } from '../progress.js';
import { screenSequences, writtenTemplate } from '../sequences.js';

export function registerRender(program: Command, { io, setExit }: CommandContext): void {
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
    .addOption(new Option('--max-memory <size>', 'memory the render may use, e.g. 8G (default: 80% of what the system has free); fewer workers are used if they would not fit').argParser(memorySize('--max-memory')))
    .option('--fail-on-flash', 'exit 5 when flash screening flags the rendered frames')
    .addOption(new Option('--format <format>', "output format, instead of the shot's (an --out ending in .exr also picks exr)").choices(['png16', 'png8', 'exr']))
    .addOption(new Option('--alpha <mode>', "alpha, instead of the shot's: none (add), premultiplied, or emission (exr: over adds)").choices(['none', 'premultiplied', 'emission']))
    .addOption(new Option('--quality <q>', "ghost quality, instead of the shot's, for a quick look (needs --out away from the shot's output)").choices([...QUALITIES]))
    .addOption(new Option('--scale <s>', "render at this fraction of the frame size (e.g. 0.5), positions and sizes scaled (needs --out away from the shot's output)").argParser(fraction('--scale')))
    .option('--movie <file>', 'then encode a review movie with ffmpeg: .mov (ProRes 4444 with alpha) or .mp4 (H.264)')
    .option('--burn-in', 'print the shot, frame, timecode, lens and version along the bottom of the --movie and --over review frames (never the pass)')
    .option('--over <plate>', 'then write review frames of the pass added over this background plate sequence (linear light; NAME.over.####.png), and make any --movie from them')
    .action(async (shotFile: string, opts: { frames?: string; out?: string; jobs?: number; shard?: string; force?: boolean; progress?: 'line' | 'json'; quiet?: boolean; maxMemory?: number; failOnFlash?: boolean; quality?: GhostQuality; scale?: number; movie?: string; over?: string; burnIn?: boolean; format?: OutputFormat; alpha?: AlphaMode }) => {
      // review options are checked before any work, so an overnight render does not fail at the end
      if (opts.movie) movieKind(opts.movie);
      const ffmpeg = opts.movie ? findFfmpeg() : undefined;
      checkPlateTemplate(opts.over);
      if (opts.burnIn && !opts.movie && !opts.over) throw new UsageError('--burn-in marks review frames: give --movie or --over too (the pass itself is never marked)');
      if ((opts.movie || opts.over) && opts.shard) throw new UsageError(`${opts.movie ? '--movie' : '--over'} needs the whole sequence: make it after the shards, with a render of the whole shot (finished frames are kept)`);
      const loaded = withOutputOptions(await loadShot(shotFile), opts);
      // look-dev overrides never write into the full render's folder (nor touch its manifest)
      const overridden = opts.quality !== undefined || opts.scale !== undefined;
      if (overridden) {
        const flags = [opts.quality !== undefined ? '--quality' : '', opts.scale !== undefined ? '--scale' : ''].filter(Boolean).join(' and ');
        const verb = opts.quality !== undefined && opts.scale !== undefined ? 'make' : 'makes';
        if (!opts.out) throw new UsageError(`${flags} ${verb} a quick look, not the shot's frames: give --out a template in another folder`);
        if (path.dirname(path.resolve(opts.out)) === path.dirname(loaded.output.template)) throw new UsageError(`${flags}: --out is the shot's own output folder (${path.dirname(loaded.output.template)}); give a template in another folder so the full render's frames stay as they are`);
      }
      const shot = scaleShot(opts.quality ? withGhostQuality(loaded, opts.quality) : loaded, opts.scale ?? 1);
      const frames = opts.frames ? parseFrameRange(opts.frames, shot) : { first: shot.frame.first, last: shot.frame.last };
      let template: string | undefined;
      if (opts.out) {
        const problem = checkOutputTemplate(opts.out, shot.output.format);
        if (problem) throw new UsageError(`--out: ${problem}`);
        template = path.resolve(opts.out);
      }
      const shard = opts.shard ? parseShard(opts.shard) : undefined;
      // as many workers as asked (or cores), as long as their frames fit in memory
      const workers = planWorkers(shot, opts.jobs ?? availableParallelism(), opts.maxMemory ?? availableBytes());
      if (workers.note && !opts.quiet) io.stderr(`render: ${workers.note}\n`);
      const jobs = workers.jobs;
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
      // before any work: no file straylight did not write would be replaced, and every folder the
      // render writes to takes files
      const plans = sequences.map((seq) => planSequence(seq.shot, { frames, template: template ? writtenTemplate(seq, template) : undefined, shard, force: opts.force }));
      refuseForeign(plans.flatMap((p) => p.foreign));
      for (const folder of new Set(plans.map((p) => path.dirname(p.template)))) checkWritableFolder(folder);
      if (opts.over) checkWritableFolder(path.dirname(compositeTemplate(template ?? shot.output.template)), 'the review frames\' folder');
      total *= sequences.length;
      if (progress) {
        progress.total = total;
        progress.passes = sequences.length;
      }
      const result = { written: [] as number[], skipped: [] as number[], failed: [] as { frame: number; error: string; badInput: boolean }[], interrupted: false, manifest: '' };
      for (const [qi, seq] of sequences.entries()) {
        if (result.interrupted) break;
        const r = await renderSequence(seq.shot, {
          plan: plans[qi],
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
        if (!opts.quiet) for (const w of r.warnings) io.stderr(`warning: ${w}\n`);
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
        // a frame lost to the shot's own input (a damaged matte frame) is bad input: fix the file
        setExit(result.failed.some((f) => f.badInput) ? ExitCode.badInput : ExitCode.framesFailed);
      } else if (progress) {
        const keptNote = result.skipped.length ? ` (${result.skipped.length} already there, kept)` : '';
        const where = sequences.length > 1 ? `${sequences.length} passes (${sequences.map((q) => q.name).join(', ')}) beside ${dest}` : dest;
        const n = result.written.length;
        io.stderr(`rendered ${n} frame${n === 1 ? '' : 's'} to ${where}${keptNote} in ${seconds.toFixed(1)} s\n`);
      }
      if (!result.interrupted && sharded) {
        if (!opts.quiet) io.stderr(`flash screening needs every frame in order: run straylight flashes ${shotFile} when all shards are done\n`);
      } else if (!result.interrupted && result.failed.length === 0) {
        // the whole requested range is judged, frames kept from an earlier render too (read back),
        // and separate passes together, as the viewer will see them
        const streamed = sequences.length === 1 && result.skipped.length === 0;
        const report = streamed ? analyser.report() : screenSequences(sequences.map((q) => writtenTemplate(q, template)), frames, shot).report();
        if (report.spans.length > 0) {
          io.stderr(`WARNING: this pass may flash dangerously for viewers with photosensitive epilepsy.\n${formatFlashReport(report, timecodeOf(shot), 'over black')}`);
          if (opts.failOnFlash) setExit(ExitCode.flashes);
        }
      }
      if ((opts.movie || opts.over) && !result.interrupted && result.failed.length === 0) {
        const templates = sequences.map((q) => writtenTemplate(q, template));
        const src = { templates, frames: frameList(frames), rate: shot.frame.rate, timecode: timecodeOf(shot), pixelAspect: shot.frame.pixelAspect };
        const fn = shot.lens?.fNumber.map((k) => k.value) ?? [];
        const burnIn = opts.burnIn
          ? {
              shot: path.basename(shotFile),
              ...(shot.lens ? { lens: `${shot.lens.source} f/${Math.min(...fn)}${fn.length > 1 ? `-${Math.max(...fn)}` : ''}` } : {}),
              version: `straylight ${VERSION}`,
              timecode: (n: number) => framesToTimecode(shot.frame.timecodeStartFrames + n - shot.frame.first, shot.frame.rate, shot.frame.dropFrame),
            }
          : undefined;
        // composites and movie in one pass over the frames
        const review = opts.over ? compositeTemplate(template ?? shot.output.template) : undefined;
        if (opts.movie) {
          const movie = await writeMovie(src, opts.movie, { over: opts.over, composites: review, ffmpeg, signal: io.signal, burnIn });
          if (!opts.quiet) io.stderr(`movie: ${movie.file} (${movie.frames} frames, ${movie.kind === 'h264' ? 'H.264' : 'ProRes 4444 with alpha'}${opts.over ? ', over the plate' : ''})\n`);
        } else if (opts.over) writeComposites(src, opts.over, review!, io.signal, burnIn);
        if (review && !opts.quiet) io.stderr(`review frames: ${review} (${src.frames.length} frames over the plate)\n`);
      }
    });
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
  if (format !== 'exr' && o.passes === 'layers') throw new UsageError('the shot writes layered OpenEXR frames; PNG has no layers: keep the exr format (or write passes: separate)');
  if (format !== 'exr' && o.colourSpace !== 'rec709') throw new UsageError(`the shot writes ${o.colourSpace}; PNG frames are display-referred sRGB (Rec.709 primaries): keep the exr format`);
  if (format === o.format && alpha === o.alpha) return shot;
  const transfer = format === 'exr' ? 'linear' : o.transfer;
  const ext2 = format === 'exr' ? '.exr' : '.png';
  // the shot's own output path follows the new format when --out does not replace it
  const template = opts.out ? o.template : o.template.replace(/\.[^./\\]+$/, ext2);
  return { ...shot, output: { ...o, format, alpha, transfer, template } };
}
