// Bright light sources in a plate frame: pixels at or above a luminance threshold, grouped into
// 8-connected blobs (the connectivity OpenCV's connectedComponents uses by default), each with its
// area, peak, flux, an intensity-weighted sub-pixel centroid and an apparent radius.
// Coordinates follow straylight's convention: a pixel's centre is at (x + 0.5, y + 0.5).

/** Rec.709 / sRGB luminance weights (ITU-R BT.709). */
const WR = 0.2126;
const WG = 0.7152;
const WB = 0.0722;

export interface PlateFrame {
  width: number;
  height: number;
  /** linear RGB, 3 floats a pixel */
  rgb: Float32Array;
}

export interface Blob {
  /** intensity-weighted centroid, pixels (centre convention +0.5) */
  x: number;
  y: number;
  /** pixels at or above the threshold */
  area: number;
  /** brightest luminance */
  peak: number;
  /** sum of luminance over the blob */
  flux: number;
  /** sqrt(area / pi): the radius of a disk of the same area */
  radius: number;
  /** linear RGB of the light (scale free): its unclipped pixels and its halo (outside its rim,
   * within 4 radii + 8 px, between 1/16 and 1/2 of the threshold, less the background just
   * beyond), or all its pixels when everything there is clipped */
  rgb: [number, number, number];
}

export interface DetectOptions {
  /** absolute threshold in linear luminance; or relative, times the frame's robust maximum */
  threshold: { absolute: number } | { relative: number };
  /** blobs smaller than this many pixels are ignored */
  minArea: number;
  /** at most this many blobs, the brightest (by flux) first */
  maxCount: number;
  /** a channel at or above this is clipped (a display-referred plate's white): it says nothing of the colour */
  clip: number;
}

/** How many of the brightest pixels the robust maximum skips (hot pixels, specular glints). */
export const ROBUST_SKIP = 24;

export function luminance(frame: PlateFrame): Float32Array {
  const n = frame.width * frame.height;
  const y = new Float32Array(n);
  const c = frame.rgb;
  for (let i = 0; i < n; i++) y[i] = WR * c[i * 3] + WG * c[i * 3 + 1] + WB * c[i * 3 + 2];
  return y;
}

/** The frame's robust maximum: the luminance of its (ROBUST_SKIP + 1)-th brightest pixel. */
export function robustMax(y: Float32Array): number {
  // the ROBUST_SKIP + 1 brightest values so far, ascending: a new one displaces the smallest
  const k = ROBUST_SKIP + 1;
  const top = new Float64Array(k).fill(-Infinity);
  for (let i = 0; i < y.length; i++) {
    const v = y[i];
    if (!(v > top[0])) continue;
    let j = 0;
    while (j + 1 < k && top[j + 1] < v) {
      top[j] = top[j + 1];
      j++;
    }
    top[j] = v;
  }
  return Number.isFinite(top[0]) ? top[0] : 0;
}

export function thresholdOf(y: Float32Array, opts: DetectOptions['threshold']): number {
  return 'absolute' in opts ? opts.absolute : opts.relative * robustMax(y);
}

/** The blobs of one frame, brightest (by flux) first, after the area and count limits. */
export function detectBlobs(frame: PlateFrame, opts: DetectOptions, y: Float32Array = luminance(frame)): Blob[] {
  const { width: w, height: h } = frame;
  const t = thresholdOf(y, opts.threshold);
  if (!(t > 0)) return [];
  // 1 once a pixel is taken into a blob; the scan tests the luminance first (most pixels are dark)
  const taken = new Uint8Array(w * h);
  const stack: number[] = [];
  const blobs: Blob[] = [];
  const n = w * h;
  for (let start = 0; start < n; start++) {
    if (!(y[start] >= t) || taken[start]) continue;
    taken[start] = 1;
    stack.push(start);
    let area = 0;
    let flux = 0;
    let sx = 0;
    let sy = 0;
    let peak = 0;
    const rgb = [0, 0, 0];
    const rgbAll = [0, 0, 0];
    let unclipped = 0;
    while (stack.length) {
      const p = stack.pop()!;
      const px = p % w;
      const py = (p - px) / w;
      const v = y[p];
      area++;
      flux += v;
      sx += v * (px + 0.5);
      sy += v * (py + 0.5);
      if (v > peak) peak = v;
      const r = frame.rgb[p * 3];
      const g = frame.rgb[p * 3 + 1];
      const b = frame.rgb[p * 3 + 2];
      rgbAll[0] += r;
      rgbAll[1] += g;
      rgbAll[2] += b;
      // a clipped channel says nothing of the light's colour
      if (Math.max(r, g, b) < opts.clip) {
        rgb[0] += r;
        rgb[1] += g;
        rgb[2] += b;
        unclipped++;
      }
      for (let dy = -1; dy <= 1; dy++) {
        const qy = py + dy;
        if (qy < 0 || qy >= h) continue;
        for (let dx = -1; dx <= 1; dx++) {
          const qx = px + dx;
          if (qx < 0 || qx >= w || (dx === 0 && dy === 0)) continue;
          const q = qy * w + qx;
          if (y[q] >= t && !taken[q]) {
            taken[q] = 1;
            stack.push(q);
          }
        }
      }
    }
    // the halo: unclipped pixels around it, clear of its anti-aliased rim (where a clipped core
    // blends to white) and bright enough to be its light, less the background just beyond it
    const cx = sx / flux;
    const cy = sy / flux;
    const rim = Math.sqrt(area / Math.PI) + 1.5;
    const reach = 4 * Math.sqrt(area / Math.PI) + 8;
    const halo = [0, 0, 0];
    const bg = [0, 0, 0];
    let nHalo = 0;
    let nBg = 0;
    const rim2 = rim * rim;
    const reach2 = reach * reach;
    const outer2 = (reach + 4) * (reach + 4);
    const rgbIn = frame.rgb;
    for (let qy = Math.max(0, Math.floor(cy - reach - 4)); qy < Math.min(h, Math.ceil(cy + reach + 4)); qy++) {
      const dy2 = (qy + 0.5 - cy) ** 2;
      for (let qx = Math.max(0, Math.floor(cx - reach - 4)); qx < Math.min(w, Math.ceil(cx + reach + 4)); qx++) {
        const r2 = (qx + 0.5 - cx) ** 2 + dy2;
        if (r2 < rim2 || r2 > outer2) continue;
        const q = qy * w + qx;
        const cr = rgbIn[q * 3];
        const cg = rgbIn[q * 3 + 1];
        const cb = rgbIn[q * 3 + 2];
        if (r2 > reach2) {
          bg[0] += cr;
          bg[1] += cg;
          bg[2] += cb;
          nBg++;
        } else if (y[q] < 0.5 * t && y[q] >= t / 16 && Math.max(cr, cg, cb) < opts.clip) {
          halo[0] += cr;
          halo[1] += cg;
          halo[2] += cb;
          nHalo++;
        }
      }
    }
    if (nHalo > 0) {
      for (let k = 0; k < 3; k++) rgb[k] += Math.max(0, halo[k] - (nBg ? (bg[k] / nBg) * nHalo : 0));
      unclipped += nHalo;
    }
    const src = unclipped > 0 ? rgb : rgbAll;
    const k = unclipped > 0 ? unclipped : area;
    blobs.push({ x: cx, y: cy, area, peak, flux, radius: Math.sqrt(area / Math.PI), rgb: [src[0] / k, src[1] / k, src[2] / k] });
  }
  return blobs
    .filter((b) => b.area >= opts.minArea)
    .sort((a, b) => b.flux - a.flux || a.y - b.y || a.x - b.x)
    .slice(0, opts.maxCount);
}
