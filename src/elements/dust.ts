// Lens dust: a seeded procedural texture of specks and smudges on the front element, lit by the
// light in proportion to its flux and its nearness (a broad Gaussian reach around it). The same
// seed gives the same dirt on every frame and every machine.

import type { FloatImage } from '../raster/image.js';

/** mulberry32: a small seeded generator (deterministic, no Math.random). */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** The dirt texture, values 0..1, for a frame size: specks (small soft discs) and smudges. */
export function dustTexture(width: number, height: number, seed: number, density: number): Float32Array {
  const rnd = seeded(seed);
  const t = new Float32Array(width * height);
  const stamp = (cx: number, cy: number, r: number, v: number) => {
    for (let y = Math.max(0, Math.floor(cy - r)); y <= Math.min(height - 1, Math.ceil(cy + r)); y++) {
      for (let x = Math.max(0, Math.floor(cx - r)); x <= Math.min(width - 1, Math.ceil(cx + r)); x++) {
        const q = Math.hypot(x + 0.5 - cx, y + 0.5 - cy) / r;
        if (q < 1) t[y * width + x] = Math.min(1, t[y * width + x] + v * (1 - q * q) ** 2);
      }
    }
  };
  const specks = Math.round(density * width * height * 1e-4);
  for (let i = 0; i < specks; i++) stamp(rnd() * width, rnd() * height, 1.5 + rnd() ** 3 * 14, 0.3 + 0.7 * rnd());
  const smudges = Math.round(density * 6);
  for (let i = 0; i < smudges; i++) stamp(rnd() * width, rnd() * height, height * (0.05 + 0.15 * rnd()), 0.08 + 0.12 * rnd());
  return t;
}

export function addDust(img: FloatImage, texture: Float32Array, light: { xPx: number; yPx: number; flux: readonly [number, number, number] }, fraction: number, reachPx: number): void {
  const inv = 1 / (2 * reachPx * reachPx);
  // the light's flux spread over the reach, times the dirt
  const norm = fraction / (2 * Math.PI * reachPx * reachPx);
  const d = img.data;
  for (let y = 0; y < img.height; y++) {
    const dy = y + 0.5 - light.yPx;
    for (let x = 0; x < img.width; x++) {
      const v = texture[y * img.width + x];
      if (v <= 0) continue;
      const dx = x + 0.5 - light.xPx;
      const w = v * norm * Math.exp(-(dx * dx + dy * dy) * inv);
      const i = (y * img.width + x) * 4;
      d[i] += light.flux[0] * w;
      d[i + 1] += light.flux[1] * w;
      d[i + 2] += light.flux[2] * w;
    }
  }
}
