// Helpers shared by `render` and `batch`: where each output sequence of a render lands, and flash
// screening of sequences already on disk, summed frame by frame as the viewer will see them.

import type { FrameRange } from '../render/sequence.js';
import { passTemplate } from '../render/passes.js';
import { readSource } from '../review/source.js';
import { FlashAnalyser } from '../safety/flash.js';
import type { ResolvedShot } from '../shot/types.js';
import { frameList } from './options.js';

/** Screen sequences summed frame by frame (separate passes, as they will be seen together). */
export function screenSequences(templates: string[], range: FrameRange, shot: ResolvedShot): FlashAnalyser {
  const a = new FlashAnalyser(shot.frame.widthPx, shot.frame.heightPx, shot.frame.rate);
  const src = { templates, frames: frameList(range), rate: shot.frame.rate, pixelAspect: shot.frame.pixelAspect };
  for (const f of src.frames) a.addFrame(f, readSource(src, f).rgb, 3);
  return a;
}

/** Where a render writes a sequence: the --out template (per pass when passes are separate), or the shot's own. */
export function writtenTemplate(seq: { name: string; shot: ResolvedShot }, template: string | undefined): string {
  if (!template) return seq.shot.output.template;
  return seq.name === 'combined' ? template : passTemplate(template, seq.name as never);
}
