// How flash-screening results read on a terminal.

import type { FlashReport } from '../safety/flash.js';
import { FLASH_CAUTION } from '../safety/flash.js';
import type { TimecodeInfo } from '../review/source.js';
import { formatFrameRate } from '../timeline/frame-rate.js';
import { framesToTimecode } from '../timeline/timecode.js';

export function formatFlashReport(r: FlashReport, tc: TimecodeInfo, over: string): string {
  const label = (frame: number) => framesToTimecode(tc.startFrames + frame - tc.first, tc.rate, tc.dropFrame);
  const lines = [`flash screening: ${r.frames} frames, ${r.firstFrame}-${r.lastFrame} at ${formatFrameRate(tc.rate)} fps, ${over}`];
  if (r.spans.length === 0) {
    lines.push('nothing found above the general or red flash thresholds');
  } else {
    for (const s of r.spans) {
      const w = s.worst;
      lines.push(
        `FLAGGED ${s.kind} flashing: frames ${s.firstFrame}-${s.lastFrame} (${label(s.firstFrame)} - ${label(s.lastFrame)}), ` +
          `up to ${s.flashesPerSecond.toFixed(1)} flashes a second; worst on frame ${w.frame}: ${Math.round(w.areaFraction * 100)}% of the ` +
          `${w.width}x${w.height} px window at (${w.x}, ${w.y})`,
      );
    }
  }
  lines.push(FLASH_CAUTION);
  return lines.join('\n') + '\n';
}
