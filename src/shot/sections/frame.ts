// The shot's `frame` section (size, pixel aspect, rate, range, timecode, optical centre) and its
// `shutter` (motion blur).

import { parseFrameRate, type FrameRate } from '../../timeline/frame-rate.js';
import type { Vec2 } from '../../timeline/path.js';
import { canDropFrame, timecodeToFrames } from '../../timeline/timecode.js';
import type { Field } from '../source.js';
import type { ResolvedFrame, ShutterSettings } from '../types.js';
import { MAX_COORD_PX, MAX_FRAMES, MAX_SIDE_PX, type ResolveContext } from './context.js';

export function resolveFrame(ctx: ResolveContext, f: Field): ResolvedFrame | undefined {
  const m = f.map();
  if (!m) return undefined;
  const width = m.require('width', 'frame width in pixels')?.number({ integer: true, min: 1, max: MAX_SIDE_PX });
  const height = m.require('height', 'frame height in pixels')?.number({ integer: true, min: 1, max: MAX_SIDE_PX });
  const pa = m.get('pixel_aspect');
  const pixelAspect = pa ? pa.number({ min: 0.1, max: 10 }) : 1;
  const rateField = m.require('rate', 'frames per second');
  let rate: FrameRate | undefined;
  if (rateField) {
    const r = parseFrameRate(rateField.scalar);
    if (typeof r === 'string') rateField.expected(r);
    else rate = r;
  }
  const firstField = m.require('first', 'number of the first frame');
  const first = firstField?.number({ integer: true, min: -1e9, max: 1e9 });
  const lastField = m.require('last', 'number of the last frame');
  const last = lastField?.number({ integer: true, min: -1e9, max: 1e9 });
  if (first !== undefined && last !== undefined) {
    if (last < first) lastField!.error(`expected a last frame at or after the first (${first}), found ${last}`);
    else if (last - first + 1 > MAX_FRAMES) lastField!.error(`the range holds ${last - first + 1} frames; at most ${MAX_FRAMES}`);
  }
  const centreField = m.get('optical_centre');
  const centre = centreField ? (centreField.numbers(2, { min: -MAX_COORD_PX, max: MAX_COORD_PX }) as Vec2 | undefined) : undefined;
  let dropFrame = rate ? canDropFrame(rate) : false;
  const dfField = m.get('drop_frame');
  if (dfField) {
    if (typeof dfField.scalar !== 'boolean') dfField.expected('true or false');
    else if (dfField.scalar && rate && !canDropFrame(rate)) dfField.error(`drop-frame timecode exists only at 30000/1001 and 60000/1001 fps`);
    else dropFrame = dfField.scalar;
  }
  let timecodeStart = first;
  const tcField = m.get('timecode');
  if (tcField && rate) {
    const s = tcField.string('a timecode HH:MM:SS:FF');
    if (s !== undefined) {
      const n = timecodeToFrames(s, rate, dropFrame);
      if (typeof n === 'string') tcField.error(n);
      else timecodeStart = n;
    }
  }
  m.finish();
  if (width === undefined || height === undefined || pixelAspect === undefined || !rate || first === undefined || last === undefined || timecodeStart === undefined) return undefined;
  if (centreField && !centre) return undefined;
  return {
    widthPx: width,
    heightPx: height,
    pixelAspect,
    rate,
    first,
    last,
    opticalCentre: centre ?? [width / 2, height / 2],
    timecodeStartFrames: timecodeStart,
    dropFrame,
  };
}

export function resolveShutter(ctx: ResolveContext, f: Field): ShutterSettings | undefined {
  const m = f.map('{angle, samples, phase, method}');
  if (!m) return undefined;
  const a = m.get('angle');
  const angleDeg = a ? a.number({ min: 0, max: 360 }) : 180;
  const sm = m.get('samples');
  const samples = sm ? sm.number({ integer: true, min: 1, max: 256 }) : 8;
  const ph = m.get('phase');
  const phaseDeg = ph ? ph.number({ min: -360, max: 360 }) : angleDeg === undefined ? 0 : -angleDeg / 2;
  const me = m.get('method');
  const method = me ? me.oneOf(['smear', 'exact'] as const) : 'smear';
  m.finish();
  if (angleDeg === undefined || samples === undefined || phaseDeg === undefined || method === undefined) return undefined;
  return { angleDeg, samples, phaseDeg, method };
}
