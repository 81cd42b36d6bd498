// Position (and optional intensity) keys from a 2-D tracker's generic CSV export:
// `frame,x,y[,intensity]` rows, an optional header row, blank lines and `#` comments ignored.

import type { Diagnostic } from '../errors.js';

export interface TrackRow {
  frame: number;
  x: number;
  y: number;
  intensity?: number;
}

export interface TrackCsv {
  rows: TrackRow[];
  hasIntensity: boolean;
}

export const MAX_TRACK_ROWS = 1_000_000;

const HEADER = ['frame', 'x', 'y', 'intensity'];

export function parseTrackCsv(text: string, file: string, diagnostics: Diagnostic[]): TrackCsv | undefined {
  const before = diagnostics.length;
  const rows: TrackRow[] = [];
  let columns = 0;
  const lines = text.split(/\r?\n/);
  let sawData = false;
  for (let li = 0; li < lines.length; li++) {
    const line = lines[li];
    if (line.trim() === '' || line.trimStart().startsWith('#')) continue;
    const cells: { text: string; col: number }[] = [];
    let col = 1;
    for (const raw of line.split(',')) {
      const lead = raw.length - raw.trimStart().length;
      cells.push({ text: raw.trim(), col: col + lead });
      col += raw.length + 1;
    }
    const err = (c: number, message: string) => diagnostics.push({ loc: { file, line: li + 1, col: c }, path: '', message });
    if (!sawData && columns === 0 && !Number.isFinite(Number(cells[0].text))) {
      // header row: names must be the known columns, in order
      const names = cells.map((c) => c.text.toLowerCase());
      if (names.length < 3 || names.length > 4 || names.some((n, i) => n !== HEADER[i])) {
        err(1, `expected the header "frame,x,y" or "frame,x,y,intensity", found "${line.trim()}"`);
        return undefined;
      }
      columns = names.length;
      continue;
    }
    sawData = true;
    if (columns === 0) columns = cells.length;
    if (cells.length !== columns || columns < 3 || columns > 4) {
      err(1, `expected ${columns >= 3 && columns <= 4 ? columns : '3 or 4'} comma-separated values (frame,x,y[,intensity]), found ${cells.length}`);
      continue;
    }
    const nums = cells.map((c) => (c.text === '' ? NaN : Number(c.text)));
    const names = ['frame', 'x', 'y', 'intensity'];
    let ok = true;
    nums.forEach((v, i) => {
      if (!Number.isFinite(v)) {
        err(cells[i].col, `${names[i]}: expected a number, found "${cells[i].text}"`);
        ok = false;
      }
    });
    if (!ok) continue;
    const prev = rows[rows.length - 1];
    if (prev && nums[0] <= prev.frame) {
      err(cells[0].col, `frame: expected frames in increasing order, found ${nums[0]} after ${prev.frame}`);
      continue;
    }
    rows.push({ frame: nums[0], x: nums[1], y: nums[2], ...(columns === 4 ? { intensity: nums[3] } : {}) });
    if (rows.length > MAX_TRACK_ROWS) {
      err(1, `more than ${MAX_TRACK_ROWS} rows; refusing the file`);
      return undefined;
    }
  }
  if (diagnostics.length > before) return undefined;
  if (rows.length === 0) {
    diagnostics.push({ loc: { file, line: 1, col: 1 }, path: '', message: 'the track has no rows' });
    return undefined;
  }
  return { rows, hasIntensity: columns === 4 };
}
