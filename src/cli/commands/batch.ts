// `straylight batch`: many shots rendered one after another, going on past failures, with a JSON
// report and an HTML page (thumbnails, flash warnings).

import path from 'node:path';
import { availableParallelism } from 'node:os';
import { existsSync, statSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { visibilitySvg } from '../../plot/visibility.js';
import { visibilityChart, visibilityRows } from '../../render/visibility-curves.js';
import { framesToTimecode } from '../../timeline/timecode.js';
import { Option, type Command } from 'commander';
import { ExitCode, StraylightError, UsageError } from '../../errors.js';
import { checkWritableFolder, writeOutputFile } from '../../io/output-file.js';
import { loadShot } from '../../io/load-shot.js';
import { encodePng } from '../../io/png.js';
import { readFrameLinear } from '../../io/read-frame.js';
import { expandFramePath } from '../../format/frame-path.js';
import { FloatImage } from '../../raster/image.js';
import { renderSequence } from '../../render/sequence.js';
import { outputSequences } from '../../render/passes.js';
import { batchHtml, type BatchReport, type BatchShot } from '../../render/batch-report.js';
import { VERSION } from '../../version.js';
import type { CommandContext } from '../context.js';
import { memorySize, positiveInt } from '../options.js';
import { availableBytes, planWorkers } from '../../render/memory.js';
import { screenSequences } from '../sequences.js';

export function registerBatch(program: Command, { io, setExit }: CommandContext): void {
  program
    .command('batch')
    .description('render many shots, going on past failures, and write a report (JSON and an HTML page)')
    .argument('<shots...>', 'shot files')
    .option('--report <file.json|folder>', 'where to write the report: a .json file (the HTML page goes beside it), or a folder (report.json and index.html in it)', 'straylight-report.json')
    .addOption(new Option('--jobs <n>', 'worker threads per shot (default: the available parallelism)').argParser(positiveInt('--jobs')))
    .option('--force', 'render every frame, even those already there')
    .option('--quiet', 'print nothing but errors and safety warnings')
    .addOption(new Option('--max-memory <size>', 'memory each shot\'s render may use, e.g. 8G (default: 80% of what is free)').argParser(memorySize('--max-memory')))
    .action(async (shots: string[], opts: { report: string; jobs?: number; force?: boolean; quiet?: boolean; maxMemory?: number }) => {
      const asFolder = opts.report.endsWith('/') || (existsSync(opts.report) && statSync(opts.report).isDirectory());
      if (!asFolder && !opts.report.endsWith('.json')) throw new UsageError(`--report: give a .json file or a folder, found "${opts.report}"`);
      const json = asFolder ? path.resolve(opts.report, 'report.json') : path.resolve(opts.report);
      const html = asFolder ? path.resolve(opts.report, 'index.html') : json.replace(/\.json$/, '.html');
      // the report is the morning's answer: its folder must take it before any shot renders
      checkWritableFolder(path.dirname(json), "the report's folder");
      const report: BatchReport = { tool: `straylight ${VERSION}`, started: new Date().toISOString(), finished: '', shots: [] };
      for (const file of shots) {
        if (io.signal?.aborted) break;
        const started = performance.now();
        const entry: BatchShot = { shot: file, status: 'ok', frames: 0, written: 0, skipped: 0, failed: [], seconds: 0, flashes: [], warnings: [] };
        report.shots.push(entry);
        try {
          const shot = await loadShot(file);
          entry.output = shot.output.template;
          entry.frames = shot.frame.last - shot.frame.first + 1;
          const tc = (n: number) => framesToTimecode(shot.frame.timecodeStartFrames + n - shot.frame.first, shot.frame.rate, shot.frame.dropFrame);
          entry.range = { first: shot.frame.first, last: shot.frame.last, timecode: `${tc(shot.frame.first)} - ${tc(shot.frame.last)}` };
          const fn = shot.lens?.fNumber.map((k) => k.value) ?? [];
          entry.lens = shot.lens ? `${shot.lens.source}, f/${Math.min(...fn)}${fn.length > 1 ? `..f/${Math.max(...fn)}` : ''}` : 'none';
          const sequences = outputSequences(shot);
          entry.frames *= sequences.length;
          let interrupted = false;
          const workers = planWorkers(shot, opts.jobs ?? availableParallelism(), opts.maxMemory ?? availableBytes());
          if (workers.note) entry.warnings.push(workers.note);
          for (const seq of sequences) {
            const result = await renderSequence(seq.shot, { jobs: workers.jobs, force: opts.force, signal: io.signal });
            entry.written += result.written.length;
            entry.skipped += result.skipped.length;
            entry.failed.push(...result.failed);
            interrupted ||= result.interrupted;
          }
          entry.status = interrupted ? 'interrupted' : entry.failed.some((f) => f.badInput) ? 'bad-input' : entry.failed.length ? 'frames-failed' : 'ok';
          // screen the whole sequence as it is on disk now (kept frames included), passes summed
          if (entry.status === 'ok') {
            entry.flashes = screenSequences(sequences.map((q) => q.shot.output.template), { first: shot.frame.first, last: shot.frame.last }, shot).report().spans;
          }
          const mid = Math.round((shot.frame.first + shot.frame.last) / 2);
          const thumbFile = expandFramePath(shot.output.template, mid);
          if (existsSync(thumbFile)) {
            entry.thumbnail = thumbnail(thumbFile);
            entry.thumbnailFrame = mid;
          }
          entry.frameUrl = pathToFileURL(shot.output.template).href;
          entry.visibility = visibilitySvg(visibilityChart(shot, visibilityRows(shot), `Visibility: ${path.basename(file)}`));
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
      writeOutputFile(json, Buffer.from(`${JSON.stringify(report, null, 2)}\n`));
      writeOutputFile(html, Buffer.from(batchHtml(report)));
      const bad = report.shots.filter((s) => s.status !== 'ok').length;
      if (!opts.quiet) io.stderr(`batch: ${report.shots.length - bad} of ${report.shots.length} shots rendered; report in ${json} and ${html}\n`);
      if (io.signal?.aborted) setExit(ExitCode.interrupted);
      else if (bad) setExit(ExitCode.framesFailed);
    });
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
