// SMPTE timecode (SMPTE ST 12-1) of frame counts: non-drop at the nominal rate, and drop-frame for
// 30000/1001 and 60000/1001, where frame labels 0 and 1 (0-3 at 59.94) are skipped at the start of
// every minute except minutes divisible by ten.

import type { FrameRate } from './frame-rate.js';

/** The integer rate that labels count at (24 for 24000/1001, 30 for 30000/1001). */
export function nominalRate(r: FrameRate): number {
  return Math.round(r.num / r.den);
}

/** Drop-frame applies only to the 1000/1001 rates whose nominal rate is a multiple of 30. */
export function canDropFrame(r: FrameRate): boolean {
  return r.den === 1001 && nominalRate(r) % 30 === 0;
}

function dropCount(r: FrameRate): number {
  return (nominalRate(r) / 30) * 2;
}

const pad2 = (n: number) => String(n).padStart(2, '0');

/** Timecode label of the n-th frame counted from 00:00:00:00 (wraps at 24 h). */
export function framesToTimecode(n: number, rate: FrameRate, dropFrame: boolean): string {
  const fps = nominalRate(rate);
  let count = Math.trunc(n);
  const sign = count < 0 ? '-' : '';
  count = Math.abs(count);
  if (dropFrame) {
    const drop = dropCount(rate);
    const per10 = fps * 600 - drop * 9;
    const perMin = fps * 60 - drop;
    const tens = Math.floor(count / per10);
    const rest = count % per10;
    count += drop * 9 * tens + (rest > drop ? drop * Math.floor((rest - drop) / perMin) : 0);
  }
  const ff = count % fps;
  const totalSeconds = Math.floor(count / fps);
  const ss = totalSeconds % 60;
  const mm = Math.floor(totalSeconds / 60) % 60;
  const hh = Math.floor(totalSeconds / 3600) % 24;
  return `${sign}${pad2(hh)}:${pad2(mm)}:${pad2(ss)}${dropFrame ? ';' : ':'}${pad2(ff)}`;
}

/** Frame count of a timecode label; a message string when the label is not valid at this rate. */
export function timecodeToFrames(label: string, rate: FrameRate, dropFrame: boolean): number | string {
  const m = /^(\d{2}):(\d{2}):(\d{2})[:;.,](\d{2})$/.exec(label.trim());
  if (!m) return 'expected a timecode HH:MM:SS:FF';
  const [hh, mm, ss, ff] = m.slice(1).map(Number);
  const fps = nominalRate(rate);
  if (hh > 23 || mm > 59 || ss > 59 || ff >= fps) return `timecode out of range at ${fps} fps`;
  let n = ((hh * 60 + mm) * 60 + ss) * fps + ff;
  if (dropFrame) {
    const drop = dropCount(rate);
    if (ss === 0 && mm % 10 !== 0 && ff < drop) return `${label} does not exist in drop-frame timecode`;
    const minutes = hh * 60 + mm;
    n -= drop * (minutes - Math.floor(minutes / 10));
  }
  return n;
}
