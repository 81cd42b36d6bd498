// The accumulation layers ghosts are drawn into: the full frame and RGB buffers at 1/2, 1/4 and
// 1/8 resolution (kept per thread and cleared after use), the box each layer was written in, and
// the cascade that adds each coarse layer into the next finer one by 2x bilinear upsampling, so
// the full frame is walked once however many layers were used.

/** RGB accumulation buffer at 1/scale resolution. */
export interface Layer {
  scale: number;
  w: number;
  h: number;
  data: Float32Array;
  used: boolean;
  /** the layer pixels written since the last upsample (inclusive bounds) */
  bx0: number;
  by0: number;
  bx1: number;
  by1: number;
}

/**
 * A pixel bound from Math.floor/ceil as a small integer: clamped far outside any frame, and -0 made
 * 0, so arithmetic on it stays in V8's integer representation (a -0 arriving there after the code
 * was optimised sends it back to the interpreter, once per thread).
 */
export function pixelBound(v: number): number {
  return v < -1e9 ? -1e9 : v > 1e9 ? 1e9 : v | 0;
}

/** Grow the layer's written box to take in x0..x1, y0..y1. */
export function touch(layer: Layer, x0: number, y0: number, x1: number, y1: number): void {
  // every store happens on every call: a store first made late (the box growing right after the
  // code was optimised) would find no feedback and send the callers back to the interpreter
  layer.bx0 = x0 < layer.bx0 ? x0 : layer.bx0;
  layer.by0 = y0 < layer.by0 ? y0 : layer.by0;
  layer.bx1 = x1 > layer.bx1 ? x1 : layer.bx1;
  layer.by1 = y1 > layer.by1 ? y1 : layer.by1;
}

function resetBox(layer: Layer): void {
  layer.bx0 = layer.by0 = Infinity;
  layer.bx1 = layer.by1 = -Infinity;
}

function makeLayers(width: number, height: number): Layer[] {
  return [1, 2, 4, 8].map((scale) => {
    const w = Math.ceil(width / scale);
    const h = Math.ceil(height / scale);
    return { scale, w, h, data: scale === 1 ? new Float32Array(0) : new Float32Array(w * h * 3), used: false, bx0: Infinity, by0: Infinity, bx1: -Infinity, by1: -Infinity };
  });
}

// low-resolution layers, kept per thread and cleared after use (no fresh memory each call)
let layerCache: { w: number; h: number; layers: Layer[] } | undefined;
export function layersFor(width: number, height: number): Layer[] {
  if (!layerCache || layerCache.w !== width || layerCache.h !== height) layerCache = { w: width, h: height, layers: makeLayers(width, height) };
  return layerCache.layers;
}

// a second set, for a ghost drawn alone before it is smeared over the open shutter
let scratchCache: { w: number; h: number; layers: Layer[] } | undefined;
export function scratchLayersFor(width: number, height: number): Layer[] {
  if (!scratchCache || scratchCache.w !== width || scratchCache.h !== height) scratchCache = { w: width, h: height, layers: makeLayers(width, height) };
  return scratchCache.layers;
}

/** Zero a layer's written box (RGB at stride 3, or the frame at stride 4) and forget the box. */
export function clearWritten(layer: Layer, data: Float32Array, w: number, h: number, stride: number): void {
  const x0 = Math.max(0, layer.bx0);
  const x1 = Math.min(w - 1, layer.bx1);
  for (let y = Math.max(0, layer.by0); y <= Math.min(h - 1, layer.by1); y++) if (x1 >= x0) data.fill(0, (y * w + x0) * stride, (y * w + x1 + 1) * stride);
  layer.used = false;
  resetBox(layer);
}

/** Add every used coarse layer into the frame (through the finer layers) and reset them. */
export function cascadeLayers(layers: Layer[], out: Float32Array, width: number, height: number): void {
  for (let l = layers.length - 1; l >= 1; l--) {
    const layer = layers[l];
    if (layer.used && layer.bx1 >= layer.bx0) {
      if (l === 1) upsample2x(layer, out, width, height, 4, undefined);
      else upsample2x(layer, layers[l - 1].data, layers[l - 1].w, layers[l - 1].h, 3, layers[l - 1]);
    }
    layer.used = false;
    resetBox(layer);
  }
}

/**
 * Add a layer to the next finer buffer (twice its resolution) by bilinear interpolation, over the
 * part written since the last call, and clear that part. Values are densities per full-resolution
 * pixel, so interpolating keeps the energy. `into`, when the target is itself a layer, has its
 * written box and use mark extended.
 */
function upsample2x(layer: Layer, out: Float32Array, ow: number, oh: number, stride: number, into: Layer | undefined): void {
  const { w, h, data } = layer;
  // target pixels whose bilinear footprint reaches a written layer pixel
  const xa = Math.max(0, 2 * layer.bx0 - 1);
  const xb = Math.min(ow - 1, 2 * layer.bx1 + 2);
  const ya = Math.max(0, 2 * layer.by0 - 1);
  const yb = Math.min(oh - 1, 2 * layer.by1 + 2);
  if (into) {
    touch(into, xa, ya, xb, yb);
    into.used = true;
  }
  const row = new Float32Array(w * 3);
  // the horizontal taps and weights repeat on every row: work them out once
  const span = xb - xa + 1;
  const i0s = new Int32Array(span);
  const i1s = new Int32Array(span);
  const txs = new Float32Array(span);
  for (let x = xa; x <= xb; x++) {
    const fx = Math.min(w - 1, Math.max(0, (x + 0.5) / 2 - 0.5));
    const x0 = Math.floor(fx);
    i0s[x - xa] = x0 * 3;
    i1s[x - xa] = Math.min(w - 1, x0 + 1) * 3;
    txs[x - xa] = fx - x0;
  }
  for (let y = ya; y <= yb; y++) upsampleRow(data, w, h, y, row, xa, xb, i0s, i1s, txs, out, ow, stride);
  const by0 = Math.max(0, layer.by0);
  const by1 = Math.min(h - 1, layer.by1);
  const bx0 = Math.max(0, layer.bx0);
  const bx1 = Math.min(w - 1, layer.bx1);
  for (let y = by0; y <= by1; y++) data.fill(0, (y * w + bx0) * 3, (y * w + bx1 + 1) * 3);
}

/**
 * Target row y of upsample2x (its own function so V8 optimises it by call count in a thread's
 * first frame instead of compiling the whole layer walk on stack replacement).
 */
function upsampleRow(data: Float32Array, w: number, h: number, y: number, row: Float32Array, xa: number, xb: number, i0s: Int32Array, i1s: Int32Array, txs: Float32Array, out: Float32Array, ow: number, stride: number): void {
  const fy = Math.min(h - 1, Math.max(0, (y + 0.5) / 2 - 0.5));
  const y0 = Math.floor(fy);
  const y1 = Math.min(h - 1, y0 + 1);
  const ty = fy - y0;
  // the layer row interpolated at this height, over the columns the span needs
  const ca = Math.max(0, (xa >> 1) - 1);
  const cb = Math.min(w - 1, (xb >> 1) + 1);
  for (let i = ca * 3; i < (cb + 1) * 3; i++) row[i] = data[y0 * w * 3 + i] + (data[y1 * w * 3 + i] - data[y0 * w * 3 + i]) * ty;
  const base = y * ow;
  // away from the layer's first and last columns the taps are fixed: target column 2k takes
  // 3/4 of layer column k and 1/4 of k - 1, column 2k + 1 3/4 of k and 1/4 of k + 1; walked in
  // pairs with the three columns in registers. The edges take the general taps.
  let fast0 = Math.max(xa, 2);
  if (fast0 & 1) fast0++;
  const fast1 = Math.min(xb, 2 * w - 3);
  for (let x = xa; x <= xb; x++) {
    if (x === fast0 && fast0 + 1 <= fast1) {
      let k3 = (x >> 1) * 3;
      let o = (base + x) * stride;
      for (; x + 1 <= fast1; x += 2, k3 += 3, o += 2 * stride) {
        const a0 = row[k3 - 3];
        const a1 = row[k3 - 2];
        const a2 = row[k3 - 1];
        const b0 = row[k3];
        const b1 = row[k3 + 1];
        const b2 = row[k3 + 2];
        const c0 = row[k3 + 3];
        const c1 = row[k3 + 4];
        const c2 = row[k3 + 5];
        out[o] += a0 + (b0 - a0) * 0.75;
        out[o + 1] += a1 + (b1 - a1) * 0.75;
        out[o + 2] += a2 + (b2 - a2) * 0.75;
        out[o + stride] += b0 + (c0 - b0) * 0.25;
        out[o + stride + 1] += b1 + (c1 - b1) * 0.25;
        out[o + stride + 2] += b2 + (c2 - b2) * 0.25;
      }
      if (x > xb) return;
    }
    const k = x - xa;
    const i0 = i0s[k];
    const i1 = i1s[k];
    const tx = txs[k];
    const o = (base + x) * stride;
    out[o] += row[i0] + (row[i1] - row[i0]) * tx;
    out[o + 1] += row[i0 + 1] + (row[i1 + 1] - row[i0 + 1]) * tx;
    out[o + 2] += row[i0 + 2] + (row[i1 + 2] - row[i0 + 2]) * tx;
  }
}
