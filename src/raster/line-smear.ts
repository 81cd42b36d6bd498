// Motion smear of an image region along a straight line: the time integral of a layer drawn once,
// carried along a displacement s * (vx, vy) with a piecewise-constant density in s. Used by the
// shutter's smear method (render/shutter-smear.ts): a light's glow, starburst and streak, and each
// ghost, are drawn once per span of the open shutter and smeared here, instead of being drawn at
// every shutter sample.
//
// How: the region is resampled onto lines parallel to the motion (a shear: each line's rows are
// interpolated linearly, so every source pixel's value is shared between the two nearest lines
// and nothing is lost), each line's running sums are formed, and a piece [a, b] of density rho adds
// rho * (P(x - a) - P(x - b)) for the line's prefix integral P; the destination pixel takes the
// average of that over its own width, in closed form from the second running sum, so a sub-pixel
// displacement moves the picture by linear interpolation and a long one has exact box ends. The
// lines are then spread back onto the two nearest rows (the transpose of the first step). Motion
// along a row or column needs no resampling across it. Energy is kept exactly but for what is
// carried outside the destination.
//
// Written by hand: no image library on the npm registry smears along an arbitrary direction with
// a non-uniform density in O(pixels), and the shutter needs this one shape of it.

/** A float image or layer: `stride` floats per pixel, the first three RGB. */
export interface Plane {
  data: Float32Array;
  width: number;
  height: number;
  stride: number;
}

/** Inclusive pixel bounds. */
export interface Region {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

/** The smear: pieces [a_j, b_j] of s carrying mass_j each, displaced s * (vx, vy) pixels. */
export interface SmearKernel {
  vx: number;
  vy: number;
  a: readonly number[];
  b: readonly number[];
  mass: readonly number[];
}

/** Displacements below this (pixels) are drawn where they are. */
const STILL_PX = 1e-3;
/** Lines a pixel across for a steep motion (its steps across are then a quarter pixel). */
const MAX_LINES = 4;
/** A motion that leaves its row (or column) by at most this (px) is smeared along the rows. */
const ROW_ACROSS_PX = 2;
/** ... in parts that each move at most this far across. */
const SUB_ACROSS_PX = 0.25;
/** Pieces shorter than this (px) are this long: a point moves the picture by linear interpolation. */
const MIN_PIECE_PX = 1e-3;
/** Nodes closer than this (pixels) are one. */
const POINT_PX = 1e-6;

// per-line work buffers, grown as needed (one set per thread)
let S = new Float64Array(0);
let P = new Float64Array(0);
let V = new Float64Array(0);

function grow(n: number, outN: number): void {
  if (S.length < 3 * (n + 2)) S = new Float64Array(3 * (n + 2));
  if (P.length < 3 * (n + 2)) P = new Float64Array(3 * (n + 2));
  if (V.length < 3 * outN) V = new Float64Array(3 * outN);
}

/** The kernel's total mass. */
export function kernelMass(k: SmearKernel): number {
  let m = 0;
  for (const v of k.mass) m += v;
  return m;
}

/**
 * Add the smear of `src` over `region` into `dst`, whose pixel (x, y) is the source's pixel
 * (x + offset[0], y + offset[1]) (a source drawn with a margin around the frame it smears into);
 * returns the region of `dst` written (undefined when nothing was). `src` is left as it was.
 */
export function smearInto(src: Plane, region: Region, dst: Plane, k: SmearKernel, offset: readonly [number, number] = [0, 0], shearLines?: number): Region | undefined {
  const W = src.width;
  const H = src.height;
  const x0 = Math.max(0, region.x0);
  const y0 = Math.max(0, region.y0);
  const x1 = Math.min(W - 1, region.x1);
  const y1 = Math.min(H - 1, region.y1);
  if (x1 < x0 || y1 < y0) return undefined;
  let sMin = Infinity;
  let sMax = -Infinity;
  for (let j = 0; j < k.mass.length; j++) {
    if (k.mass[j] === 0) continue;
    sMin = Math.min(sMin, k.a[j], k.b[j]);
    sMax = Math.max(sMax, k.a[j], k.b[j]);
  }
  if (sMin > sMax) return undefined;
  const reach = Math.max(Math.abs(sMin), Math.abs(sMax)) * Math.hypot(k.vx, k.vy);
  if (reach < STILL_PX) return addScaled(src, { x0, y0, x1, y1 }, dst, kernelMass(k), offset);
  // the major axis runs along the motion's larger component: one step along it moves m across
  const alongX = Math.abs(k.vx) >= Math.abs(k.vy);
  const vMajor = alongX ? k.vx : k.vy;
  const m = (alongX ? k.vy : k.vx) / vMajor;
  // the destination in source coordinates: along the major axis from oa for A pixels, across from ob for B
  const oa = alongX ? offset[0] : offset[1];
  const ob = alongX ? offset[1] : offset[0];
  const A = alongX ? dst.width : dst.height;
  const B = alongX ? dst.height : dst.width;
  const a0 = alongX ? x0 : y0;
  const a1 = alongX ? x1 : y1;
  const b0 = alongX ? y0 : x0;
  const b1 = alongX ? y1 : x1;
  // pixel (a, b) sits at offset (a * sa + b * sb) * stride
  const sa = alongX ? 1 : W;
  const sb = alongX ? W : 1;
  const dsa = alongX ? 1 : dst.width;
  const dsb = alongX ? dst.width : 1;
  // the pieces along the major axis, short ones widened
  const pu0: number[] = [];
  const pu1: number[] = [];
  const pm: number[] = [];
  let uMin = Infinity;
  let uMax = -Infinity;
  for (let j = 0; j < k.mass.length; j++) {
    if (k.mass[j] === 0) continue;
    let ua = k.a[j] * vMajor;
    let ub = k.b[j] * vMajor;
    if (ub < ua) [ua, ub] = [ub, ua];
    if (ub - ua < MIN_PIECE_PX) {
      const c = 0.5 * (ua + ub);
      ua = c - 0.5 * MIN_PIECE_PX;
      ub = c + 0.5 * MIN_PIECE_PX;
    }
    uMin = Math.min(uMin, ua);
    uMax = Math.max(uMax, ub);
    pu0.push(ua);
    pu1.push(ub);
    pm.push(k.mass[j]);
  }
  // Two ways across the motion. Near a row's direction (the path leaves its row by at most
  // ROW_ACROSS_PX): the lines are the rows, and the kernel is cut into parts that each move at
  // most SUB_ACROSS_PX across, each part laid onto the rows at its own offset by linear
  // interpolation. Steeper: lines b = L / Z + m a, Z to a pixel across, each reading and writing
  // its nearest row, so a still picture comes back unchanged and the steps are 1/Z pixel.
  const across = Math.abs(m) * (uMax - uMin);
  const rows = across <= ROW_ACROSS_PX;
  const mLine = rows ? 0 : m;
  const Z = rows ? 1 : Math.min(MAX_LINES, shearLines ?? MAX_LINES);
  // each group: nodes (a piece [u, u'] of density rho adds +rho at u and -rho at u') and its offset across
  const groups: { u: number[]; c: number[]; d: number }[] = [];
  if (rows) {
    for (let j = 0; j < pm.length; j++) {
      const parts = Math.max(1, Math.ceil((Math.abs(m) * (pu1[j] - pu0[j])) / SUB_ACROSS_PX));
      const len = (pu1[j] - pu0[j]) / parts;
      const rho = pm[j] / (pu1[j] - pu0[j]);
      for (let q = 0; q < parts; q++) {
        const ua = pu0[j] + q * len;
        const d = m * (ua + 0.5 * len);
        let g = groups.find((x) => Math.abs(x.d - d) < 1e-9);
        if (!g) groups.push((g = { u: [], c: [], d }));
        addNode(g.u, g.c, ua, rho);
        addNode(g.u, g.c, ua + len, -rho);
      }
    }
  } else {
    const g = { u: [] as number[], c: [] as number[], d: 0 };
    for (let j = 0; j < pm.length; j++) {
      const rho = pm[j] / (pu1[j] - pu0[j]);
      addNode(g.u, g.c, pu0[j], rho);
      addNode(g.u, g.c, pu1[j], -rho);
    }
    groups.push(g);
  }
  const n = a1 - a0 + 1;
  // destination pixels along the major axis that the smear reaches
  const oa0 = Math.max(oa, a0 + Math.floor(uMin) - 1);
  const oa1 = Math.min(oa + A - 1, a1 + Math.ceil(uMax) + 1);
  const outN = oa1 - oa0 + 1;
  if (outN <= 0) return undefined;
  grow(n, outN);
  const share = 1 / Z;
  const lA = b0 - mLine * a0;
  const lB = b0 - mLine * a1;
  const lC = b1 - mLine * a0;
  const lD = b1 - mLine * a1;
  const L0 = Math.floor(Z * Math.min(lA, lB, lC, lD)) - Z;
  const L1 = Math.ceil(Z * Math.max(lA, lB, lC, lD)) + Z;
  const sd = src.data;
  const ss = src.stride;
  const dd = dst.data;
  const ds = dst.stride;
  let wb0 = Infinity;
  let wb1 = -Infinity;
  for (let L = L0; L <= L1; L++) {
    const lb = L * share;
    // 1. the line's samples, its share of the nearest row (outside the region counts as nothing)
    let any = false;
    for (let i = 0; i < n; i++) {
      const a = a0 + i;
      const r = Math.floor(lb + mLine * a + 0.5);
      if (r >= b0 && r <= b1) {
        const o = (a * sa + r * sb) * ss;
        const v0 = sd[o] * share;
        const v1 = sd[o + 1] * share;
        const v2 = sd[o + 2] * share;
        S[3 * i + 3] = v0;
        S[3 * i + 4] = v1;
        S[3 * i + 5] = v2;
        if (v0 !== 0 || v1 !== 0 || v2 !== 0) any = true;
      } else {
        S[3 * i + 3] = S[3 * i + 4] = S[3 * i + 5] = 0;
      }
    }
    if (!any) continue;
    // 2. running sums of the line read as linear between its samples (zero a pixel beyond its
    // ends): P[j] = its integral up to sample j - 1 (S is held one sample in, S[0] = S[n+1] = 0)
    S[0] = S[1] = S[2] = 0;
    S[3 * (n + 1)] = S[3 * (n + 1) + 1] = S[3 * (n + 1) + 2] = 0;
    P[0] = P[1] = P[2] = 0;
    for (let j = 0; j <= n; j++) {
      P[3 * (j + 1)] = P[3 * j] + 0.5 * (S[3 * j] + S[3 * j + 3]);
      P[3 * (j + 1) + 1] = P[3 * j + 1] + 0.5 * (S[3 * j + 1] + S[3 * j + 4]);
      P[3 * (j + 1) + 2] = P[3 * j + 2] + 0.5 * (S[3 * j + 2] + S[3 * j + 5]);
    }
    for (const g of groups) {
      // 3. the smeared line at each destination pixel's centre: sum of c * P(x - u) over the nodes
      V.fill(0, 0, 3 * outN);
      for (let q = 0; q < g.u.length; q++) {
        // t = x - u - a0 in samples: its whole part moves with x, its fraction stays
        const t0 = oa0 - a0 - g.u[q];
        const kk = Math.floor(t0);
        addPrefix(g.c[q], kk, t0 - kk, n, outN);
      }
      // 4. back onto the rows: the nearest (the transpose of step 1), moved by the group's offset
      const dw = Math.floor(g.d);
      const f = g.d - dw;
      for (let i = 0; i < outN; i++) {
        const v0 = V[3 * i];
        const v1 = V[3 * i + 1];
        const v2 = V[3 * i + 2];
        if (v0 === 0 && v1 === 0 && v2 === 0) continue;
        const a = oa0 + i;
        const r = Math.floor(lb + mLine * a + 0.5) - ob + dw;
        const da = (a - oa) * dsa;
        if (r >= 0 && r < B && f < 1) {
          const o = (da + r * dsb) * ds;
          const w = 1 - f;
          dd[o] += v0 * w;
          dd[o + 1] += v1 * w;
          dd[o + 2] += v2 * w;
          if (r < wb0) wb0 = r;
          if (r > wb1) wb1 = r;
        }
        if (f > 0 && r + 1 >= 0 && r + 1 < B) {
          const o = (da + (r + 1) * dsb) * ds;
          dd[o] += v0 * f;
          dd[o + 1] += v1 * f;
          dd[o + 2] += v2 * f;
          if (r + 1 < wb0) wb0 = r + 1;
          if (r + 1 > wb1) wb1 = r + 1;
        }
      }
    }
  }
  if (wb1 < wb0) return undefined;
  return alongX ? { x0: oa0 - oa, y0: wb0, x1: oa1 - oa, y1: wb1 } : { x0: wb0, y0: oa0 - oa, x1: wb1, y1: oa1 - oa };
}

/** Merge a node into the list (pieces that meet share their node). */
function addNode(us: number[], cs: number[], u: number, c: number): void {
  for (let i = 0; i < us.length; i++) {
    if (Math.abs(us[i] - u) < POINT_PX) {
      cs[i] += c;
      return;
    }
  }
  us.push(u);
  cs.push(c);
}

/**
 * V[i] += c * P(k + i + f): the prefix integral of the line (linear between samples) at sample
 * position t = k + i + f, in closed form (quadratic between samples).
 */
function addPrefix(c: number, k: number, f: number, n: number, outN: number): void {
  if (c === 0) return;
  // t < -1: nothing yet; t >= n: the whole line; between, j = floor(t) + 1 indexes the padded arrays
  const iStart = Math.max(0, -1 - k);
  const iEnd = Math.max(iStart, Math.min(outN, n - k));
  const o = 3 * (n + 1);
  for (let i = iEnd; i < outN; i++) {
    V[3 * i] += c * P[o];
    V[3 * i + 1] += c * P[o + 1];
    V[3 * i + 2] += c * P[o + 2];
  }
  const h = 0.5 * f * f;
  for (let i = iStart; i < iEnd; i++) {
    const j = 3 * (k + i + 1);
    V[3 * i] += c * (P[j] + S[j] * f + (S[j + 3] - S[j]) * h);
    V[3 * i + 1] += c * (P[j + 1] + S[j + 1] * f + (S[j + 4] - S[j + 1]) * h);
    V[3 * i + 2] += c * (P[j + 2] + S[j + 2] * f + (S[j + 5] - S[j + 2]) * h);
  }
}

/** dst += scale * src over a region of src (dst's pixel (x, y) is src's (x + offset)); returns what dst got. */
export function addScaled(src: Plane, r: Region, dst: Plane, scale: number, offset: readonly [number, number] = [0, 0]): Region | undefined {
  const [ox, oy] = offset;
  const x0 = Math.max(r.x0, ox);
  const x1 = Math.min(r.x1, ox + dst.width - 1);
  const y0 = Math.max(r.y0, oy);
  const y1 = Math.min(r.y1, oy + dst.height - 1);
  if (x1 < x0 || y1 < y0) return undefined;
  const sd = src.data;
  const dd = dst.data;
  for (let y = y0; y <= y1; y++) {
    let i = (y * src.width + x0) * src.stride;
    let o = ((y - oy) * dst.width + x0 - ox) * dst.stride;
    for (let x = x0; x <= x1; x++, i += src.stride, o += dst.stride) {
      dd[o] += sd[i] * scale;
      dd[o + 1] += sd[i + 1] * scale;
      dd[o + 2] += sd[i + 2] * scale;
    }
  }
  return { x0: x0 - ox, y0: y0 - oy, x1: x1 - ox, y1: y1 - oy };
}
