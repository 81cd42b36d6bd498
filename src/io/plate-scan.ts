// Reading a plate sequence for `straylight lights`: every frame checked first (no gap in the
// numbering, one size throughout, each header readable), then read one at a time, its blobs
// found, the frame let go.

import path from 'node:path';
import { InputError } from '../errors.js';
import { expandFramePath } from '../format/frame-path.js';
import { detectBlobs, luminance, thresholdOf, type Blob, type DetectOptions } from '../plate/detect.js';
import { matteFrameSize } from './matte-read.js';
import { framesOnDisk, readFrameLinear, type LinearFrame } from './read-frame.js';

export interface PlateScan {
  width: number;
  height: number;
  frames: { frame: number; blobs: Blob[]; threshold: number }[];
  /** display-referred (PNG): its white is a clip level */
  displayReferred: boolean;
}

export function scanPlate(template: string, shownTemplate: string, opts: Omit<DetectOptions, 'clip'>): PlateScan {
  // a frame's file as the user named the plate (its folder as given)
  const shownFrame = (f: number) => path.join(path.dirname(shownTemplate), path.basename(expandFramePath(template, f)));
  const frames = framesOnDisk(template);
  if (frames.length === 0) throw new InputError(`${shownTemplate}: no plate frames on disk match this template; nothing was written`);
  const missing: number[] = [];
  for (let f = frames[0], i = 0; f <= frames[frames.length - 1]; f++) {
    if (frames[i] === f) i++;
    else missing.push(f);
  }
  if (missing.length) {
    throw new InputError(`${shownTemplate}: frame${missing.length > 1 ? 's' : ''} ${missing.slice(0, 5).join(', ')}${missing.length > 5 ? ` and ${missing.length - 5} more` : ''} missing between ${frames[0]} and ${frames[frames.length - 1]}; a track needs every frame; nothing was written`);
  }
  let size: { width: number; height: number } | undefined;
  for (const f of frames) {
    const file = expandFramePath(template, f);
    let s;
    try {
      s = matteFrameSize(file, undefined, 'plate');
    } catch (e) {
      throw new InputError(`${shownFrame(f)}: ${(e as Error).message}; nothing was written`);
    }
    if (!size) size = s;
    else if (s.width !== size.width || s.height !== size.height) {
      throw new InputError(`${shownFrame(f)} is ${s.width}x${s.height} px, the plate's first frame ${size.width}x${size.height}: a plate has one size; nothing was written`);
    }
  }
  const displayReferred = path.extname(template).toLowerCase() === '.png';
  const detect: DetectOptions = { ...opts, clip: displayReferred ? 0.99 : Infinity };
  const out: PlateScan['frames'] = [];
  for (const f of frames) {
    const file = expandFramePath(template, f);
    let img: LinearFrame;
    try {
      img = readFrameLinear(file);
    } catch (e) {
      throw new InputError(`${shownFrame(f)}: ${e instanceof InputError ? e.message.replace(`${file}: `, '') : 'cannot be read (damaged or truncated)'}; nothing was written`);
    }
    const y = luminance(img);
    const blobs = detectBlobs(img, detect, y);
    out.push({ frame: f, blobs, threshold: thresholdOf(y, opts.threshold) });
  }
  return { width: size!.width, height: size!.height, frames: out, displayReferred };
}
