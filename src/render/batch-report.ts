// The morning report of a batch: JSON for machines, and one self-contained HTML page for people
// (thumbnails inlined), with every shot, its frames, timings, warnings and failures.

import type { FlaggedSpan } from '../safety/flash.js';

export interface BatchShot {
  shot: string;
  status: 'ok' | 'frames-failed' | 'bad-input' | 'interrupted';
  frames: number;
  written: number;
  skipped: number;
  failed: { frame: number; error: string; badInput?: boolean }[];
  seconds: number;
  /** flash-screening spans (photosensitivity warnings) */
  flashes: FlaggedSpan[];
  warnings: string[];
  error?: string;
  output?: string;
  /** a PNG of one frame, small, as a data URI */
  thumbnail?: string;
}

export interface BatchReport {
  tool: string;
  started: string;
  finished: string;
  shots: BatchShot[];
}

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function batchHtml(r: BatchReport): string {
  const ok = r.shots.filter((s) => s.status === 'ok').length;
  const cards = r.shots
    .map((s) => {
      const status = s.status === 'ok' ? (s.flashes.length ? 'warn' : 'ok') : 'bad';
      const lines: string[] = [];
      lines.push(`<p>${s.frames} frames: ${s.written} rendered, ${s.skipped} kept, ${s.failed.length} failed; ${s.seconds.toFixed(1)} s</p>`);
      if (s.output) lines.push(`<p class="path">${esc(s.output)}</p>`);
      for (const f of s.flashes) {
        lines.push(`<p class="warning">Flashing (${f.kind}) frames ${f.firstFrame}-${f.lastFrame}, up to ${f.flashesPerSecond.toFixed(1)} a second: photosensitive seizure risk.</p>`);
      }
      for (const w of s.warnings) lines.push(`<p class="warning">${esc(w)}</p>`);
      if (s.error) lines.push(`<pre class="error">${esc(s.error)}</pre>`);
      for (const f of s.failed.slice(0, 10)) lines.push(`<p class="error">frame ${f.frame}: ${esc(f.error)}</p>`);
      const thumb = s.thumbnail ? `<img src="${s.thumbnail}" alt="${esc(s.shot)}">` : '<div class="nothumb">no frame</div>';
      return `<section class="shot ${status}"><h2>${esc(s.shot)}</h2>${thumb}<div>${lines.join('')}</div></section>`;
    })
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>straylight batch: ${ok} of ${r.shots.length} shots rendered</title>
<style>
body { font: 14px/1.4 system-ui, sans-serif; background: #111; color: #ddd; margin: 2em; }
h1 { font-weight: 500; } .shot { display: grid; grid-template-columns: 320px 1fr; gap: 0 1.5em; border-left: 6px solid #555; padding: 0.5em 1em; margin: 1em 0; background: #1b1b1b; }
.shot h2 { grid-column: 1 / 3; font-size: 16px; margin: 0.2em 0 0.6em; } .ok { border-color: #3a7; } .warn { border-color: #da3; } .bad { border-color: #d44; }
img, .nothumb { width: 320px; background: #000; } .nothumb { height: 180px; display: grid; place-items: center; color: #666; }
.warning { color: #fc6; } .error { color: #f88; white-space: pre-wrap; } .path { color: #888; font-family: monospace; }
</style></head>
<body><h1>straylight batch: ${ok} of ${r.shots.length} shots rendered</h1>
<p>${esc(r.started)} to ${esc(r.finished)}. Flash screening is a screening aid (WCAG 2.x SC 2.3.1, ITU-R BT.1702); broadcaster QC decides.</p>
${cards}
</body></html>
`;
}
