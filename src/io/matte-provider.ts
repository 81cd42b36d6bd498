// Matte frames for a shot, read from disk on demand: the frame offset, the hold/clear policy
// outside the matte sequence, depth decoding, and a small cache (motion-blur samples of a frame
// share matte frames).

import { InputError } from '../errors.js';
import type { MatteImage } from '../occlusion/matte.js';
import { decodeMatte, MatteFileError, matteFrameSize } from './matte-read.js';
import { matteFramesRead } from '../timeline/shutter.js';
import path from 'node:path';
import type { ResolvedMatte, ResolvedShot } from '../shot/types.js';
import { expandFramePath } from '../format/frame-path.js';
import { framesOnDisk } from './read-frame.js';

/** Matte frames kept decoded per provider: enough for a frame's shutter samples, within a byte budget. */
const CACHE_FRAMES = 8;
export const MATTE_CACHE_BYTES = 256 * 1024 * 1024;

export class MatteProvider {
  private readonly onDisk = new Map<string, number[]>();
  private readonly cache = new Map<string, MatteImage>();

  frames(matte: ResolvedMatte): number[] {
    let f = this.onDisk.get(matte.name);
    if (!f) {
      f = framesOnDisk(matte.template);
      this.onDisk.set(matte.name, f);
    }
    return f;
  }

  /** The matte for a shot frame: values are coverage (alpha) or scene depth; undefined = nothing covers. */
  image(matte: ResolvedMatte, shotFrame: number): MatteImage | undefined {
    const frames = this.frames(matte);
    if (frames.length === 0) throw new InputError(`matte "${matte.name}": no frames on disk for ${matte.template}`);
    let f = shotFrame + matte.offset;
    if (f < frames[0]) {
      if (matte.before === 'clear') return undefined;
      f = frames[0];
    } else if (f > frames[frames.length - 1]) {
      if (matte.after === 'clear') return undefined;
      f = frames[frames.length - 1];
    }
    const key = `${matte.name}#${f}`;
    const hit = this.cache.get(key);
    if (hit) return hit;
    const file = expandFramePath(matte.template, f);
    let img: MatteImage;
    try {
      img = decodeMatte(file, matte.channel, matte.kind);
    } catch (e) {
      throw new InputError(`matte "${matte.name}": ${file}: ${e instanceof MatteFileError ? e.message : 'cannot be read'}`);
    }
    if (matte.depth) {
      const { encoding, near, far, scale } = matte.depth;
      const v = img.values;
      for (let i = 0; i < v.length; i++) {
        v[i] = encoding === 'normalised' ? near + v[i] * (far - near) : encoding === 'inverted' ? far - v[i] * (far - near) : v[i] * scale;
      }
    }
    const keep = Math.max(2, Math.min(CACHE_FRAMES, Math.floor(MATTE_CACHE_BYTES / (img.values.byteLength || 1))));
    while (this.cache.size >= keep) this.cache.delete(this.cache.keys().next().value!);
    this.cache.set(key, img);
    return img;
  }
}

/** How many missing or unreadable frames a message names before it counts the rest. */
const NAMED = 5;

/**
 * Problems with a shot's mattes found on disk, before the first frame: no frames there; gaps in
 * the frames the render will read (the shot's range through the shutter, with the matte's offset,
 * inside the sequence's first and last frame: outside it `before`/`after` decide); any of those
 * frames whose header cannot be read; a frame of another size than the shot's (unless
 * `resize: stretch`). Headers only: a long sequence is checked without decoding it.
 */
export function checkMattes(shot: ResolvedShot): { loc: ResolvedMatte['at']; path: string; message: string }[] {
  const problems: { loc: ResolvedMatte['at']; path: string; message: string }[] = [];
  const provider = new MatteProvider();
  const read = matteFramesRead(shot.shutter, shot.frame.first, shot.frame.last, shot.seed);
  const list = (names: string[]) => (names.length > NAMED ? `${names.slice(0, NAMED).join(', ')} and ${names.length - NAMED} more` : names.join(', '));
  for (const m of shot.mattes) {
    const frames = provider.frames(m);
    const problem = (message: string) => problems.push({ loc: m.at, path: m.atPath, message });
    if (frames.length === 0) {
      problem(`no matte frames found for ${m.template}`);
      continue;
    }
    const from = Math.max(read.first + m.offset, frames[0]);
    const to = Math.min(read.last + m.offset, frames[frames.length - 1]);
    const onDisk = new Set(frames);
    const missing: string[] = [];
    for (let f = from; f <= to; f++) if (!onDisk.has(f)) missing.push(path.basename(expandFramePath(m.template, f)));
    if (missing.length) problem(`${list(missing)} missing (the shot reads matte frames ${from}-${to} of this sequence)`);
    const { widthPx, heightPx } = shot.frame;
    const unreadable: string[] = [];
    const sizes = new Map<string, string[]>();
    for (let f = from; f <= to; f++) {
      if (!onDisk.has(f)) continue;
      const file = expandFramePath(m.template, f);
      try {
        const { width, height } = matteFrameSize(file, m.channel, m.kind);
        if ((width !== widthPx || height !== heightPx) && m.resize === 'error') {
          const key = `${width}x${height}`;
          sizes.set(key, [...(sizes.get(key) ?? []), path.basename(file)]);
        }
      } catch (e) {
        unreadable.push(`${path.basename(file)}: ${(e as Error).message}`);
      }
    }
    if (unreadable.length) problem(`cannot read ${list(unreadable)}`);
    for (const [size, names] of sizes) {
      const which = names.length === to - from + 1 - missing.length - unreadable.length ? 'the matte is' : `${list(names)} ${names.length === 1 ? 'is' : 'are'}`;
      problem(`${which} ${size} px, the frame ${widthPx}x${heightPx}; give resize: stretch to stretch it over the frame`);
    }
  }
  return problems;
}
