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
  /** a PNG of one frame, small, as a data URI, and which frame it is */
  thumbnail?: string;
  thumbnailFrame?: number;
  /** the shot's frame range and its timecodes */
  range?: { first: number; last: number; timecode: string };
  /** the lens and its f-number (range) */
  lens?: string;
  /** the output template as a file URL (#### left in), for links to frames */
  frameUrl?: string;
  /** the visibility chart, SVG */
  visibility?: string;
}

export interface BatchReport {
  tool: string;
  started: string;
  finished: string;
  shots: BatchShot[];
}

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** An ISO time as local time with its zone, e.g. "2 Dec 2026, 03:14:07 UTC". */
export function localTime(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toLocaleString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit', timeZoneName: 'short' });
}

function duration(seconds: number): string {
  const s = Math.round(seconds);
  return s >= 3600 ? `${Math.floor(s / 3600)} h ${Math.floor((s % 3600) / 60)} min` : s >= 60 ? `${Math.floor(s / 60)} min ${s % 60} s` : `${seconds.toFixed(1)} s`;
}

/** The link to one frame of a shot's output (the template's #### filled in). */
function frameLink(s: BatchShot, frame: number): string {
  if (!s.frameUrl) return String(frame);
  const url = s.frameUrl.replace(/(%23)+|#+/, (m) => String(frame).padStart(m.startsWith('%') ? m.length / 3 : m.length, '0'));
  return `<a href="${esc(url)}">${frame}</a>`;
}

export function batchHtml(r: BatchReport): string {
  const ok = r.shots.filter((s) => s.status === 'ok').length;
  const done = r.shots.reduce((n, s) => n + s.written + s.skipped, 0);
  const total = r.shots.reduce((n, s) => n + s.frames, 0);
  const failures = r.shots.reduce((n, s) => n + s.failed.length + (s.status === 'bad-input' && s.failed.length === 0 ? 1 : 0), 0);
  const warnings = r.shots.reduce((n, s) => n + s.flashes.length + s.warnings.length, 0);
  const wall = (new Date(r.finished).getTime() - new Date(r.started).getTime()) / 1000;
  const summary = `<table class="summary"><tbody>
<tr><th>shots rendered</th><td data-key="shots">${ok} of ${r.shots.length}</td></tr>
<tr><th>frames done</th><td data-key="frames">${done} of ${total}</td></tr>
<tr><th>failures</th><td data-key="failures">${failures}</td></tr>
<tr><th>warnings</th><td data-key="warnings">${warnings}</td></tr>
<tr><th>wall time</th><td data-key="wall">${Number.isFinite(wall) ? duration(wall) : ''}</td></tr>
</tbody></table>`;
  const cards = r.shots
    .map((s) => {
      const status = s.status === 'ok' ? (s.flashes.length ? 'warn' : 'ok') : 'bad';
      const lines: string[] = [];
      if (s.range) lines.push(`<p>frames ${s.range.first}-${s.range.last} (${esc(s.range.timecode)})${s.lens ? `; lens ${esc(s.lens)}` : ''}</p>`);
      lines.push(`<p>${s.frames} frames: ${s.written} rendered, ${s.skipped} kept, ${s.failed.length} failed; ${duration(s.seconds)}</p>`);
      if (s.output) lines.push(`<p class="path">${esc(s.output)}</p>`);
      for (const f of s.flashes) {
        lines.push(`<p class="warning">Flashing (${f.kind}) frames ${frameLink(s, f.firstFrame)}-${frameLink(s, f.lastFrame)}, up to ${f.flashesPerSecond.toFixed(1)} a second, worst at ${frameLink(s, f.worst.frame)}: photosensitive seizure risk.</p>`);
      }
      for (const w of s.warnings) lines.push(`<p class="warning">${esc(w)}</p>`);
      if (s.error) lines.push(`<pre class="error">${esc(s.error)}</pre>`);
      for (const f of s.failed.slice(0, 10)) lines.push(`<p class="error">frame ${f.frame}: ${esc(f.error)}</p>`);
      const thumb = s.thumbnail ? `<figure><img src="${s.thumbnail}" alt="frame ${s.thumbnailFrame} of ${esc(s.shot)}"><figcaption>frame ${s.thumbnailFrame}</figcaption></figure>` : '<div class="nothumb">no frame</div>';
      const chart = s.visibility ? `<div class="chart">${s.visibility.replace(/^<\?xml[^>]*>\s*/, '')}</div>` : '';
      return `<section class="shot ${status}"><h2>${esc(s.shot)}</h2>${thumb}<div>${lines.join('')}</div>${chart}</section>`;
    })
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>straylight batch: ${ok} of ${r.shots.length} shots rendered</title>
<style>
body { font: 14px/1.4 system-ui, sans-serif; background: #111; color: #ddd; margin: 2em; }
h1 { font-weight: 500; } .shot { display: grid; grid-template-columns: 320px 1fr; gap: 0 1.5em; border-left: 6px solid #555; padding: 0.5em 1em; margin: 1em 0; background: #1b1b1b; }
.shot h2 { grid-column: 1 / 3; font-size: 16px; margin: 0.2em 0 0.6em; } .ok { border-color: #3a7; } .warn { border-color: #da3; } .bad { border-color: #d44; }
figure { margin: 0; } figcaption { color: #999; font-size: 12px; }
img, .nothumb { width: 320px; background: #000; } .nothumb { height: 180px; display: grid; place-items: center; color: #666; }
.chart { grid-column: 1 / 3; margin-top: 0.8em; } .chart svg { width: 100%; height: auto; max-width: 900px; }
table.summary { border-collapse: collapse; margin: 1em 0; } table.summary th { text-align: left; font-weight: 500; color: #aaa; padding: 0.2em 1.5em 0.2em 0; }
.warning { color: #fc6; } .error { color: #f88; white-space: pre-wrap; } .path { color: #888; font-family: monospace; } a { color: #9cf; }
</style></head>
<body><h1>straylight batch: ${ok} of ${r.shots.length} shots rendered</h1>
${summary}
<p>Started ${esc(localTime(r.started))}, finished ${esc(localTime(r.finished))}; ${esc(r.tool)}. Flash screening is a screening aid (WCAG 2.x SC 2.3.1, ITU-R BT.1702); broadcaster QC decides.</p>
${cards}
</body></html>
`;
}
