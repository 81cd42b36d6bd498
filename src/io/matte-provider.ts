// Matte frames for a shot, read from disk on demand: the frame offset, the hold/clear policy
// outside the matte sequence, depth decoding, and a small cache (motion-blur samples of a frame
// share matte frames).

import { InputError } from '../errors.js';
import type { MatteImage } from '../occlusion/matte.js';
import { decodeMatte } from './matte-read.js';
import type { ResolvedMatte, ResolvedShot } from '../shot/types.js';
import { expandFramePath } from '../format/frame-path.js';
import { framesOnDisk } from './read-frame.js';

const CACHE = 8;

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
      throw new InputError(`matte "${matte.name}": cannot read ${file}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    }
    if (matte.depth) {
      const { encoding, near, far, scale } = matte.depth;
      const v = img.values;
      for (let i = 0; i < v.length; i++) {
        v[i] = encoding === 'normalised' ? near + v[i] * (far - near) : encoding === 'inverted' ? far - v[i] * (far - near) : v[i] * scale;
      }
    }
    if (this.cache.size >= CACHE) this.cache.delete(this.cache.keys().next().value!);
    this.cache.set(key, img);
    return img;
  }
}

/** Problems with a shot's mattes found on disk: none there, or the wrong size (located). */
export function checkMattes(shot: ResolvedShot): { loc: ResolvedMatte['at']; path: string; message: string }[] {
  const problems: { loc: ResolvedMatte['at']; path: string; message: string }[] = [];
  const provider = new MatteProvider();
  for (const m of shot.mattes) {
    const frames = provider.frames(m);
    if (frames.length === 0) {
      problems.push({ loc: m.at, path: m.atPath, message: `no matte frames found for ${m.template}` });
      continue;
    }
    let img: MatteImage | undefined;
    try {
      img = decodeMatte(expandFramePath(m.template, frames[0]), m.channel, m.kind);
    } catch (e) {
      problems.push({ loc: m.at, path: m.atPath, message: `cannot read ${expandFramePath(m.template, frames[0])}: ${(e as Error).message}` });
      continue;
    }
    const { widthPx, heightPx } = shot.frame;
    if ((img.width !== widthPx || img.height !== heightPx) && m.resize === 'error') {
      problems.push({
        loc: m.at,
        path: m.atPath,
        message: `the matte is ${img.width}x${img.height} px, the frame ${widthPx}x${heightPx}; give resize: stretch to stretch it over the frame`,
      });
    }
  }
  return problems;
}
