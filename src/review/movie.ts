// Review movies through ffmpeg (a system tool: we pipe raw frames to it, it encodes). .mov: Apple
// ProRes 4444 with alpha (10-bit 4:4:4 plus alpha; over a plate the alpha is 1); .mp4: H.264 at
// visually lossless quality (CRF 18), 4:2:0, for review links. Frames go in as sRGB-encoded RGB(A)
// from the linear passes (separate passes summed, the plate added in linear light first), are
// converted to Y'CbCr with the Rec.709 matrix, and are tagged Rec.709 primaries with the sRGB
// transfer. The ProRes alpha is straight (colour divided by alpha), the convention of QuickTime
// alpha (from memory); the movie carries the shot's rate and start timecode. Written to a temporary name and
// renamed, so a failed encode never leaves a half movie under the asked name.

import { spawn, spawnSync } from 'node:child_process';
import { renameSync, rmSync } from 'node:fs';
import path from 'node:path';
import { OutputError, ToolMissingError, UsageError } from '../errors.js';
import { passAlpha } from '../io/png.js';
import { quantiser } from '../io/quantise.js';
import { framesToTimecode } from '../timeline/timecode.js';
import { expandFramePath } from '../format/frame-path.js';
import { burnInto, type BurnIn } from './burn-in.js';
import { writeCompositeFrame } from './composite.js';
import { addPlate, readPlate, readSource, type SequenceSource } from './source.js';

export type MovieKind = 'prores4444' | 'h264';

/** The movie kind a file name asks for, or a usage error. */
export function movieKind(file: string): MovieKind {
  const ext = path.extname(file).toLowerCase();
  if (ext === '.mov') return 'prores4444';
  if (ext === '.mp4') return 'h264';
  throw new UsageError(`--movie: the file must end in .mov (ProRes 4444 with alpha) or .mp4 (H.264 review), found "${file}"`);
}

/** The ffmpeg to run (STRAYLIGHT_FFMPEG or ffmpeg on PATH), or a clear error where there is none. */
export function findFfmpeg(): string {
  const cmd = process.env.STRAYLIGHT_FFMPEG || 'ffmpeg';
  const r = spawnSync(cmd, ['-hide_banner', '-version'], { encoding: 'utf8' });
  if (r.error || r.status !== 0) {
    throw new ToolMissingError(`--movie needs ffmpeg, and "${cmd}" was not found or does not run; install it (Debian/Ubuntu: apt-get install ffmpeg) or leave out --movie`);
  }
  return cmd;
}

export function ffmpegArgs(kind: MovieKind, width: number, height: number, src: SequenceSource, out: string): string[] {
  const { num, den } = src.rate;
  const tc = src.timecode ? framesToTimecode(src.timecode.startFrames + (src.frames[0] - src.timecode.first), src.rate, src.timecode.dropFrame) : undefined;
  const input = ['-f', 'rawvideo', '-pix_fmt', kind === 'prores4444' ? 'rgba64le' : 'rgb24', '-s', `${width}x${height}`, '-framerate', `${num}/${den}`, '-i', '-'];
  // convert with the Rec.709 matrix, and say so in the stream (setparams: the encoders take tags from the frames)
  // and mark the pixel aspect (anamorphic frames are stored squeezed; players desqueeze them)
  const yuv = `scale=out_color_matrix=bt709:out_range=tv,setparams=color_primaries=bt709:color_trc=iec61966-2-1:colorspace=bt709:range=tv,setsar=${src.pixelAspect}`;
  if (kind === 'prores4444') {
    return ['-hide_banner', '-loglevel', 'error', '-y', ...input, '-vf', yuv, '-c:v', 'prores_ks', '-profile:v', '4444', '-pix_fmt', 'yuva444p10le', '-alpha_bits', '16', '-vendor', 'apl0', ...(tc ? ['-timecode', tc] : []), '-f', 'mov', out];
  }
  return [
    '-hide_banner', '-loglevel', 'error', '-y', ...input,
    // 4:2:0 needs even sizes: pad odd ones by a black pixel
    '-vf', `pad=ceil(iw/2)*2:ceil(ih/2)*2,${yuv}`,
    '-c:v', 'libx264', '-preset', 'medium', '-crf', '18', '-pix_fmt', 'yuv420p', ...(tc ? ['-timecode', tc] : []), '-movflags', '+faststart', '-f', 'mp4', out,
  ];
}

/** Frame bytes for ffmpeg: sRGB-encoded, 16-bit RGBA (straight alpha) or 8-bit RGB. */
export function movieFrame(kind: MovieKind, rgb: Float32Array, opaque: boolean): Buffer {
  const n = rgb.length / 3;
  if (kind === 'h264') {
    const q = quantiser('srgb', 255);
    const out = Buffer.alloc(n * 3);
    for (let i = 0; i < n * 3; i++) out[i] = q.code(rgb[i]);
    return out;
  }
  const q = quantiser('srgb', 65535);
  const out = Buffer.alloc(n * 8);
  for (let p = 0; p < n; p++) {
    let r = rgb[p * 3];
    let g = rgb[p * 3 + 1];
    let b = rgb[p * 3 + 2];
    const a = opaque ? 1 : passAlpha(r, g, b);
    if (!opaque && a > 0) {
      r /= a;
      g /= a;
      b /= a;
    }
    out.writeUInt16LE(q.code(r), p * 8);
    out.writeUInt16LE(q.code(g), p * 8 + 2);
    out.writeUInt16LE(q.code(b), p * 8 + 4);
    out.writeUInt16LE(Math.round(a * 65535), p * 8 + 6);
  }
  return out;
}

export interface MovieResult {
  file: string;
  frames: number;
  kind: MovieKind;
}

/**
 * Encode the source (plus a plate) to `file` through ffmpeg. With a plate and `composites`, each
 * composited frame is also written there as a review PNG, in the same pass.
 */
export async function writeMovie(src: SequenceSource, file: string, opts: { over?: string; composites?: string; ffmpeg?: string; signal?: AbortSignal; burnIn?: BurnIn }): Promise<MovieResult> {
  const kind = movieKind(file);
  const ffmpeg = opts.ffmpeg ?? findFfmpeg();
  const target = path.resolve(file);
  const tmp = path.join(path.dirname(target), `.${path.basename(target)}.${process.pid}.tmp`);
  const first = readSource(src, src.frames[0]);
  const child = spawn(ffmpeg, ffmpegArgs(kind, first.width, first.height, src, tmp), { stdio: ['pipe', 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr.on('data', (d) => (stderr += d));
  const exited = new Promise<number | null>((resolve, reject) => {
    child.on('error', reject);
    child.on('close', (code) => resolve(code));
  });
  // a broken pipe shows up as ffmpeg's exit status; keep the write error from being unhandled
  child.stdin.on('error', () => {});
  const write = (b: Buffer) => new Promise<void>((resolve) => (child.stdin.write(b) ? resolve() : child.stdin.once('drain', resolve)));
  try {
    for (const f of src.frames) {
      if (opts.signal?.aborted) throw new OutputError(`${file}: interrupted; no movie written`);
      const frame = f === src.frames[0] ? first : readSource(src, f);
      if (opts.over) addPlate(frame, readPlate(opts.over, f, frame.width, frame.height));
      if (opts.burnIn) burnInto(frame, opts.burnIn, f);
      if (opts.over && opts.composites) writeCompositeFrame(frame, expandFramePath(opts.composites, f));
      if (child.exitCode !== null) break;
      await write(movieFrame(kind, frame.rgb, opts.over !== undefined));
    }
    child.stdin.end();
    const code = await exited;
    if (code !== 0) throw new OutputError(`${file}: ffmpeg failed (exit ${code}): ${stderr.trim().split('\n').slice(-3).join(' / ') || 'no message'}`);
    renameSync(tmp, target);
  } catch (e) {
    child.kill('SIGKILL');
    rmSync(tmp, { force: true });
    throw e;
  }
  return { file: target, frames: src.frames.length, kind };
}
