// Frame-path templates: `####` (hash padding, width = number of hashes) or printf `%04d` / `%d`.

const PLACEHOLDER = /#+|%0?(\d*)d/g;

export interface FrameTemplate {
  prefix: string;
  suffix: string;
  width: number;
}

/** Parse a template; a message string when it has no single frame placeholder. */
export function parseFrameTemplate(template: string): FrameTemplate | string {
  const found = [...template.matchAll(PLACEHOLDER)];
  if (found.length === 0) return 'the path needs a frame-number placeholder: #### or %04d';
  if (found.length > 1) return `the path has ${found.length} frame-number placeholders; use one`;
  const m = found[0];
  const width = m[0].startsWith('#') ? m[0].length : Number(m[1] || '1');
  if (width > 10) return 'frame-number padding wider than 10 digits';
  return {
    prefix: template.slice(0, m.index),
    suffix: template.slice(m.index! + m[0].length),
    width,
  };
}

export function framePath(t: FrameTemplate, frame: number): string {
  const digits = String(Math.abs(frame)).padStart(t.width, '0');
  return `${t.prefix}${frame < 0 ? '-' : ''}${digits}${t.suffix}`;
}

/** Shorthand for a template known to be valid. */
export function expandFramePath(template: string, frame: number): string {
  const t = parseFrameTemplate(template);
  if (typeof t === 'string') throw new Error(`invalid frame template ${template}: ${t}`);
  return framePath(t, frame);
}
