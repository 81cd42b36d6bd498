// A rendered sequence to look at: given as a shot file (its output, separate passes summed as they
// will be seen) or as a frame template of files on disk; read frame by frame as linear light, with
// an optional background plate added ("plus", Porter & Duff 1984) for review.

import { existsSync } from 'node:fs';
import path from 'node:path';
import { InputError, UsageError } from '../errors.js';
import { expandFramePath, parseFrameTemplate } from '../format/frame-path.js';
import { loadShot } from '../io/load-shot.js';
import { framesOnDisk, readFrameLinear, type LinearFrame } from '../io/read-frame.js';
import type { GhostQuality } from '../optics/ghost-system.js';
import { scaleShot, withGhostQuality } from '../render/overrides.js';
import { outputSequences } from '../render/passes.js';
import { renderFrame } from '../render/render-frame.js';
import type { ResolvedShot } from '../shot/types.js';
import { parseFrameRate, type FrameRate } from '../timeline/frame-rate.js';

export interface TimecodeInfo {
  rate: FrameRate;
  dropFrame: boolean;
  /** timecode of the first frame, as a frame count */
  startFrames: number;
  first: number;
}

export interface SequenceSource {
  /** the templates whose frames are summed (one unless the shot writes separate passes) */
  templates: string[];
  frames: number[];
  rate: FrameRate;
  /** the shot's timecode; undefined for a bare template (frame numbers only) */
  timecode?: TimecodeInfo;
  /** the frame's pixel aspect ratio (1 for a bare template) */
  pixelAspect: number;
  /** frames drawn in memory instead of read from the templates (a quick look at a shot) */
  draw?: (frame: number) => LinearFrame;
}

export function timecodeOf(shot: ResolvedShot): TimecodeInfo {
  return { rate: shot.frame.rate, dropFrame: shot.frame.dropFrame, startFrames: shot.frame.timecodeStartFrames, first: shot.frame.first };
}

/** Parse a --rate option: 24, 29.97 or 30000/1001 (default 24). */
export function rateOption(value: string | undefined): FrameRate {
  const r = parseFrameRate(value === undefined ? 24 : value.includes('/') ? value : Number(value));
  if (typeof r === 'string') throw new UsageError(`--rate: ${r}, found "${value}"`);
  return r;
}

/** A shot file (every frame of its range must be rendered) or a frame template (the frames on disk). */
export async function openSource(arg: string, rate?: string): Promise<SequenceSource> {
  if (/\.ya?ml$/i.test(arg)) {
    const shot = await loadShot(arg);
    const templates = outputSequences(shot).map((q) => q.shot.output.template);
    const frames: number[] = [];
    for (let f = shot.frame.first; f <= shot.frame.last; f++) frames.push(f);
    const missing = frames.filter((f) => templates.some((t) => !existsSync(expandFramePath(t, f))));
    if (missing.length > 0) {
      throw new InputError(`${arg}: ${missing.length} of ${frames.length} frames are not rendered yet (first missing: ${expandFramePath(templates[0], missing[0])}); render the shot first`);
    }
    return { templates, frames, rate: shot.frame.rate, timecode: timecodeOf(shot), pixelAspect: shot.frame.pixelAspect };
  }
  const problem = parseFrameTemplate(arg);
  if (typeof problem === 'string') throw new UsageError(`${arg}: ${problem}`);
  const template = path.resolve(arg);
  const frames = framesOnDisk(template);
  if (frames.length === 0) throw new InputError(`${arg}: no frames on disk match this template`);
  const r = rateOption(rate);
  return { templates: [template], frames, rate: r, pixelAspect: 1 };
}

/**
 * A shot's frames drawn in memory with look-dev overrides (`--quality`, `--scale`) instead of read
 * from its render, which need not exist: every pass summed, as the combined frame.
 */
export async function drawnSource(arg: string, overrides: { quality?: GhostQuality; scale?: number }): Promise<{ src: SequenceSource; shot: ResolvedShot }> {
  if (!/\.ya?ml$/i.test(arg)) throw new UsageError(`--quality and --scale draw a shot's frames: give a shot file, not ${arg}`);
  const full = await loadShot(arg);
  const q = overrides.quality ? withGhostQuality(full, overrides.quality) : full;
  const shot = overrides.scale !== undefined ? scaleShot(q, overrides.scale) : q;
  const frames: number[] = [];
  for (let f = shot.frame.first; f <= shot.frame.last; f++) frames.push(f);
  const draw = (frame: number): LinearFrame => {
    const img = renderFrame(shot, frame);
    const rgb = new Float32Array(img.width * img.height * 3);
    for (let p = 0, i = 0; i < img.data.length; i += 4, p += 3) {
      rgb[p] = img.data[i];
      rgb[p + 1] = img.data[i + 1];
      rgb[p + 2] = img.data[i + 2];
    }
    return { width: img.width, height: img.height, rgb };
  };
  return { src: { templates: [], frames, rate: shot.frame.rate, timecode: timecodeOf(shot), pixelAspect: shot.frame.pixelAspect, draw }, shot };
}

/** One frame of the source, passes summed, as linear RGB. */
export function readSource(src: SequenceSource, frame: number): LinearFrame {
  if (src.draw) return src.draw(frame);
  const out = readFrameLinear(expandFramePath(src.templates[0], frame));
  for (const t of src.templates.slice(1)) {
    const p = readFrameLinear(expandFramePath(t, frame));
    for (let i = 0; i < out.rgb.length; i++) out.rgb[i] += p.rgb[i];
  }
  return out;
}

/** A frame at another size, each new pixel the mean of the area it covers (exact overlaps), in linear light. */
export function resampleArea(f: LinearFrame, w: number, h: number): LinearFrame {
  const out = new Float32Array(w * h * 3);
  const sx = f.width / w;
  const sy = f.height / h;
  for (let ty = 0; ty < h; ty++) {
    const ya = ty * sy;
    const yb = ya + sy;
    for (let tx = 0; tx < w; tx++) {
      const xa = tx * sx;
      const xb = xa + sx;
      let r = 0;
      let g = 0;
      let b = 0;
      let wsum = 0;
      for (let y = Math.floor(ya); y < Math.min(f.height, Math.ceil(yb)); y++) {
        const wy = Math.min(yb, y + 1) - Math.max(ya, y);
        for (let x = Math.floor(xa); x < Math.min(f.width, Math.ceil(xb)); x++) {
          const wt = wy * (Math.min(xb, x + 1) - Math.max(xa, x));
          const i = (y * f.width + x) * 3;
          r += wt * f.rgb[i];
          g += wt * f.rgb[i + 1];
          b += wt * f.rgb[i + 2];
          wsum += wt;
        }
      }
      const o = (ty * w + tx) * 3;
      out[o] = r / wsum;
      out[o + 1] = g / wsum;
      out[o + 2] = b / wsum;
    }
  }
  return { width: w, height: h, rgb: out };
}

/** The plate's frame, which must exist and match the pass's size. */
export function readPlate(plateTemplate: string, frame: number, width: number, height: number, option = '--over'): LinearFrame {
  const file = expandFramePath(path.resolve(plateTemplate), frame);
  if (!existsSync(file)) throw new InputError(`${option}: no plate frame ${file}`);
  const plate = readFrameLinear(file);
  if (plate.width !== width || plate.height !== height) throw new InputError(`${option}: ${file} is ${plate.width}x${plate.height}, the pass is ${width}x${height}`);
  return plate;
}

/** Check a plate template early (before any work): a valid template. */
export function checkPlateTemplate(t: string | undefined, option = '--over'): void {
  if (t === undefined) return;
  const problem = parseFrameTemplate(t);
  if (typeof problem === 'string') throw new UsageError(`${option}: ${t}: ${problem}`);
}

/** pass + plate in linear light (Porter & Duff "plus"), in place into the pass. */
export function addPlate(pass: LinearFrame, plate: LinearFrame): LinearFrame {
  for (let i = 0; i < pass.rgb.length; i++) pass.rgb[i] += plate.rgb[i];
  return pass;
}

/** Where review composites of a sequence go: beside it, named NAME.over.####.png. */
export function compositeTemplate(template: string): string {
  const t = parseFrameTemplate(template);
  if (typeof t === 'string') throw new Error(t);
  const hashes = template.slice(t.prefix.length, template.length - t.suffix.length);
  return `${t.prefix}over.${hashes}.png`;
}
