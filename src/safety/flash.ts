// Flash-safety screening of a frame sequence (photosensitive seizure risk), after WCAG 2.x success
// criterion 2.3.1 and ITU-R BT.1702 (thresholds: OPTICS.md section 9). A screening aid, not a
// certificate: final compliance rests with the broadcaster's QC and the rules that apply locally.
//
// Method. Frames arrive in order as display-referred linear RGB (a pass over black, or added over a
// plate, clipped to [0, 1]). Each is box-averaged onto an analysis grid about ANALYSIS_WIDTH cells
// wide. Every cell runs two state machines:
//   general: a transition is a move of at least 0.10 in relative luminance (BT.709) away from the
//            last extreme, where the darker of the two states is below 0.80;
//   red:     a transition is a move of more than 0.2 in CIE 1976 u'v' away from the last reference
//            state where one of the two is saturated red, R / (R + G + B) >= 0.8 (computed on
//            sRGB-encoded components, as WCAG's notes compute from sRGB values; our reading).
// A flash is a pair of opposing transitions, so a cell flashes "more than three times" in a second
// when the last second of frames holds at least 7 of its transitions. Windows a third of the frame
// wide and high (the 10-degree field: 341 x 256 px at 1024 x 768) slide in quarter-window steps;
// a window is flagged when flashing cells cover 25% or more of its area.

import { srgbEncode } from '../colour/srgb.js';
import { frameRateValue, type FrameRate } from '../timeline/frame-rate.js';

export const GENERAL_CHANGE = 0.1;
export const DARK_LIMIT = 0.8;
export const RED_SATURATION = 0.8;
export const RED_UV_CHANGE = 0.2;
export const AREA_FRACTION = 0.25;
/** A flash is two transitions; "more than three flashes" means at least this many transitions. */
export const MIN_TRANSITIONS = 7;
const ANALYSIS_WIDTH = 320;

export type FlashKind = 'general' | 'red';

export interface FlaggedSpan {
  kind: FlashKind;
  firstFrame: number;
  lastFrame: number;
  /** most flashes (transitions / 2) a cell showed within one second in this span */
  flashesPerSecond: number;
  /** the window with the largest flashing share, in frame pixels */
  worst: { x: number; y: number; width: number; height: number; areaFraction: number; frame: number };
}

/** One frame as the screening saw it, for charts: the frame's luminance and how hard it flashes. */
export interface FlashTraceFrame {
  frame: number;
  /** mean and largest relative luminance (BT.709, clipped to 1) over the analysis cells */
  meanLum: number;
  peakLum: number;
  /** per kind: flashes a second in the busiest cell over the trailing second, and the largest share
   * of a 10-degree window whose cells flash too often */
  general: { perSecond: number; area: number };
  red: { perSecond: number; area: number };
}

export interface FlashReport {
  frames: number;
  firstFrame: number;
  lastFrame: number;
  spans: FlaggedSpan[];
}

/**
 * u'v' of linear RGB (IEC 61966-2-1 matrix to XYZ), written to u[i] and v[i]; black takes the D65
 * white's chromaticity. (Written into arrays rather than returned as a pair: a pair per analysis
 * cell is 57,600 short-lived arrays a 1080p frame.)
 */
export function uvPrimeInto(r: number, g: number, b: number, u: Float32Array | Float64Array, v: Float32Array | Float64Array, i: number): void {
  const x = 0.4124 * r + 0.3576 * g + 0.1805 * b;
  const y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  const z = 0.0193 * r + 0.1192 * g + 0.9505 * b;
  const d = x + 15 * y + 3 * z;
  if (d <= 1e-9) {
    u[i] = 0.1978;
    v[i] = 0.4683;
  } else {
    u[i] = (4 * x) / d;
    v[i] = (9 * y) / d;
  }
}

/** u'v' of linear RGB as a pair (see uvPrimeInto). */
export function uvPrime(r: number, g: number, b: number): [number, number] {
  const u = new Float64Array(1);
  const v = new Float64Array(1);
  uvPrimeInto(r, g, b, u, v, 0);
  return [u[0], v[0]];
}

/** A frame reduced to the analysis grid: what the state machines need, small enough to send. */
export interface FlashCells {
  lum: Float32Array;
  u: Float32Array;
  v: Float32Array;
  red: Uint8Array;
}

/** Cell size of the analysis grid for a frame width. */
export function cellSize(widthPx: number): number {
  return Math.max(1, Math.ceil(widthPx / ANALYSIS_WIDTH));
}

/**
 * Add one row of the frame to its row of cells: each cell's run of the row is summed in locals (a
 * third less time than a cell lookup per pixel). A function per row, not a frame-long loop, so V8
 * optimises it by call count in a thread's first frame and keeps it.
 */
function sumRow(rgb: ArrayLike<number>, i: number, widthPx: number, channels: number, step: number, cellsX: number, row: number, sr: Float64Array, sg: Float64Array, sb: Float64Array, cnt: Float64Array): void {
  for (let cx = 0, x0 = 0; cx < cellsX; cx++, x0 += step) {
    const x1 = Math.min(widthPx, x0 + step);
    let r = 0;
    let g = 0;
    let b = 0;
    for (let x = x0; x < x1; x++, i += channels) {
      r += clip(rgb[i]);
      g += clip(rgb[i + 1]);
      b += clip(rgb[i + 2]);
    }
    const c = row + cx;
    sr[c] += r;
    sg[c] += g;
    sb[c] += b;
    cnt[c] += x1 - x0;
  }
}

/** A cell's luminance, chromaticity and red-saturation flag from its mean linear RGB. */
function finishCell(out: FlashCells, c: number, r: number, g: number, b: number): void {
  out.lum[c] = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  uvPrimeInto(r, g, b, out.u, out.v, c);
  const er = srgbEncode(r);
  const sum = er + srgbEncode(g) + srgbEncode(b);
  out.red[c] = sum > 0 && er / sum >= RED_SATURATION ? 1 : 0;
}

/** Box-average a frame onto the analysis grid (clipped to display white). */
export function reduceFrame(widthPx: number, heightPx: number, rgb: ArrayLike<number>, channels: 3 | 4): FlashCells {
  const step = cellSize(widthPx);
  const cellsX = Math.ceil(widthPx / step);
  const cellsY = Math.ceil(heightPx / step);
  const n = cellsX * cellsY;
  const sr = new Float64Array(n);
  const sg = new Float64Array(n);
  const sb = new Float64Array(n);
  const cnt = new Float64Array(n);
  for (let y = 0; y < heightPx; y++) sumRow(rgb, y * widthPx * channels, widthPx, channels, step, cellsX, Math.floor(y / step) * cellsX, sr, sg, sb, cnt);
  const out: FlashCells = { lum: new Float32Array(n), u: new Float32Array(n), v: new Float32Array(n), red: new Uint8Array(n) };
  for (let c = 0; c < n; c++) finishCell(out, c, sr[c] / cnt[c], sg[c] / cnt[c], sb[c] / cnt[c]);
  return out;
}

export class FlashAnalyser {
  readonly cellsX: number;
  readonly cellsY: number;
  private readonly cellW: number;
  private readonly cellH: number;
  private readonly span: number;
  // per-cell state
  private readonly extreme: Float64Array;
  private readonly dir: Int8Array;
  private readonly refU: Float64Array;
  private readonly refV: Float64Array;
  private readonly refRed: Uint8Array;
  private started = false;
  // per-cell transition history over the last second (ring of frames) and running counts
  private readonly ringGeneral: Uint8Array;
  private readonly ringRed: Uint8Array;
  private readonly countGeneral: Uint16Array;
  private readonly countRed: Uint16Array;
  private frameIndex = 0;
  private firstFrame: number | undefined;
  private lastFrame = 0;
  private readonly open: Partial<Record<FlashKind, FlaggedSpan>> = {};
  private readonly spans: FlaggedSpan[] = [];
  // scratch
  private readonly lum: Float64Array;
  private readonly u: Float64Array;
  private readonly v: Float64Array;
  private readonly red: Uint8Array;

  constructor(
    readonly widthPx: number,
    readonly heightPx: number,
    readonly rate: FrameRate,
  ) {
    const step = cellSize(widthPx);
    this.cellW = step;
    this.cellH = step;
    this.cellsX = Math.ceil(widthPx / step);
    this.cellsY = Math.ceil(heightPx / step);
    const n = this.cellsX * this.cellsY;
    this.span = Math.max(1, Math.round(frameRateValue(rate)));
    this.extreme = new Float64Array(n);
    this.dir = new Int8Array(n);
    this.refU = new Float64Array(n);
    this.refV = new Float64Array(n);
    this.refRed = new Uint8Array(n);
    this.ringGeneral = new Uint8Array(n * this.span);
    this.ringRed = new Uint8Array(n * this.span);
    this.countGeneral = new Uint16Array(n);
    this.countRed = new Uint16Array(n);
    this.lum = new Float64Array(n);
    this.u = new Float64Array(n);
    this.v = new Float64Array(n);
    this.red = new Uint8Array(n);
  }

  /**
   * Add the next frame: `rgb` holds display-referred linear values, `channels` per pixel (3 or 4,
   * RGB first). Values are clipped to [0, 1] (a display shows no more than white).
   */
  addFrame(frame: number, rgb: ArrayLike<number>, channels: 3 | 4): void {
    this.addCells(frame, reduceFrame(this.widthPx, this.heightPx, rgb, channels));
  }

  /** Add the next frame as cells already reduced by reduceFrame (e.g. in a worker thread). */
  addCells(frame: number, cells: FlashCells): void {
    this.lum.set(cells.lum);
    this.u.set(cells.u);
    this.v.set(cells.v);
    this.red.set(cells.red);
    this.step(frame);
  }

  private step(frame: number): void {
    const n = this.cellsX * this.cellsY;
    const slot = this.frameIndex % this.span;
    if (this.firstFrame === undefined) this.firstFrame = frame;
    this.lastFrame = frame;
    for (let c = 0; c < n; c++) {
      // drop the transitions that leave the one-second window
      const ri = c * this.span + slot;
      this.countGeneral[c] -= this.ringGeneral[ri];
      this.countRed[c] -= this.ringRed[ri];
      let general = 0;
      let red = 0;
      const L = this.lum[c];
      if (!this.started) {
        this.extreme[c] = L;
        this.dir[c] = 0;
        this.refU[c] = this.u[c];
        this.refV[c] = this.v[c];
        this.refRed[c] = this.red[c];
      } else {
        // general flash: hysteresis on luminance extremes
        const e = this.extreme[c];
        const d = this.dir[c];
        if (d >= 0 && L <= e - GENERAL_CHANGE) {
          if (L < DARK_LIMIT) general = 1;
          this.dir[c] = -1;
          this.extreme[c] = L;
        } else if (d <= 0 && L >= e + GENERAL_CHANGE) {
          if (e < DARK_LIMIT) general = 1;
          this.dir[c] = 1;
          this.extreme[c] = L;
        } else if ((d >= 0 && L > e) || (d < 0 && L < e)) {
          this.extreme[c] = L;
        }
        // red flash: a jump in chromaticity to or from saturated red
        const du = this.u[c] - this.refU[c];
        const dv = this.v[c] - this.refV[c];
        if (Math.sqrt(du * du + dv * dv) > RED_UV_CHANGE) {
          if (this.red[c] || this.refRed[c]) red = 1;
          this.refU[c] = this.u[c];
          this.refV[c] = this.v[c];
          this.refRed[c] = this.red[c];
        }
      }
      this.ringGeneral[ri] = general;
      this.ringRed[ri] = red;
      this.countGeneral[c] += general;
      this.countRed[c] += red;
    }
    this.started = true;
    this.frameIndex++;
    let sum = 0;
    let peak = 0;
    for (let c = 0; c < n; c++) {
      sum += this.lum[c];
      if (this.lum[c] > peak) peak = this.lum[c];
    }
    const general = this.judge(frame, 'general', this.countGeneral);
    const red = this.judge(frame, 'red', this.countRed);
    this.trace.push({ frame, meanLum: sum / n, peakLum: peak, general, red });
  }

  /** Slide the windows over the cells that flash too often; open, extend or close a span. */
  private judge(frame: number, kind: FlashKind, counts: Uint16Array): { perSecond: number; area: number } {
    const { cellsX, cellsY } = this;
    // summed-area table of flashing cells
    const sat = new Uint32Array((cellsX + 1) * (cellsY + 1));
    let maxCount = 0;
    for (let y = 0; y < cellsY; y++) {
      let rowSum = 0;
      for (let x = 0; x < cellsX; x++) {
        const k = counts[y * cellsX + x];
        if (k > maxCount) maxCount = k;
        rowSum += k >= MIN_TRANSITIONS ? 1 : 0;
        sat[(y + 1) * (cellsX + 1) + x + 1] = sat[y * (cellsX + 1) + x + 1] + rowSum;
      }
    }
    let best = 0;
    let bx = 0;
    let by = 0;
    const ww = Math.max(1, Math.round(cellsX / 3));
    const wh = Math.max(1, Math.round(cellsY / 3));
    const stepX = Math.max(1, Math.floor(ww / 4));
    const stepY = Math.max(1, Math.floor(wh / 4));
    if (maxCount >= MIN_TRANSITIONS) {
      for (let y0 = 0; y0 + wh <= cellsY; y0 += stepY) {
        for (let x0 = 0; x0 + ww <= cellsX; x0 += stepX) {
          const s = sat[(y0 + wh) * (cellsX + 1) + x0 + ww] - sat[y0 * (cellsX + 1) + x0 + ww] - sat[(y0 + wh) * (cellsX + 1) + x0] + sat[y0 * (cellsX + 1) + x0];
          const f = s / (ww * wh);
          if (f > best) [best, bx, by] = [f, x0, y0];
        }
      }
    }
    const flagged = best >= AREA_FRACTION;
    const span = this.open[kind];
    if (flagged) {
      const worst = { x: bx * this.cellW, y: by * this.cellH, width: ww * this.cellW, height: wh * this.cellH, areaFraction: best, frame };
      const perSecond = maxCount / 2;
      if (span) {
        span.lastFrame = frame;
        span.flashesPerSecond = Math.max(span.flashesPerSecond, perSecond);
        if (best > span.worst.areaFraction) span.worst = worst;
      } else {
        // the span starts where the offending second began
        const start = Math.max(this.firstFrame!, frame - this.span + 1);
        this.open[kind] = { kind, firstFrame: start, lastFrame: frame, flashesPerSecond: perSecond, worst };
      }
    } else if (span) {
      this.spans.push(span);
      delete this.open[kind];
    }
    return { perSecond: maxCount / 2, area: best };
  }

  /** every frame screened so far, in order (what `flashes --plot` draws) */
  readonly trace: FlashTraceFrame[] = [];

  report(): FlashReport {
    const spans = [...this.spans, ...(Object.values(this.open) as FlaggedSpan[])].sort((a, b) => a.firstFrame - b.firstFrame || (a.kind < b.kind ? -1 : 1));
    return { frames: this.frameIndex, firstFrame: this.firstFrame ?? 0, lastFrame: this.lastFrame, spans };
  }
}

function clip(v: number): number {
  return v > 0 ? (v < 1 ? v : 1) : 0;
}

/** The caution every report carries. */
export const FLASH_CAUTION =
  'This is a screening aid following WCAG 2.x success criterion 2.3.1 and ITU-R BT.1702 (general and red flash ' +
  'thresholds). It does not certify compliance: have the finished shot checked by the broadcaster\'s QC against the ' +
  'rules that apply where it will be shown.';
