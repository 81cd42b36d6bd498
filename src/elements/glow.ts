// Energy-based glow around a light: a Moffat profile (Moffat, "A theoretical investigation of
// focal stellar images in the photographic emulsion", A&A 3, 1969), the usual model of a star's
// scattered-light halo. With core scale s and exponent b:
//   K(d) = (b - 1) / (pi s^2) * (1 + d^2/s^2)^-b,   integral over the plane = 1,
// and a power-law tail K ~ d^(-2b). The user sets the tail exponent falloff = 2b (> 2 for finite
// energy). The glow adds fraction x flux in all; what falls outside the frame is simply lost (an
// off-frame light is not renormalised).

import type { FloatImage } from '../raster/image.js';

export interface GlowSource {
  xPx: number;
  yPx: number;
  /** RGB energy of the glow in all (fraction x the light's flux), pixel-height units squared */
  energy: readonly [number, number, number];
  sizePx: number;
  /** tail exponent: the profile falls as distance^-falloff */
  falloff: number;
}

/** Normalised radial profile K(d) (per unit area). */
export function moffat(d2: number, sizePx: number, falloff: number): number {
  const b = falloff / 2;
  const s2 = sizePx * sizePx;
  return ((b - 1) / (Math.PI * s2)) * Math.pow(1 + d2 / s2, -b);
}

/** Fraction of the glow's energy within distance R of its centre (closed form). */
export function moffatEnclosed(radius: number, sizePx: number, falloff: number): number {
  const b = falloff / 2;
  return 1 - Math.pow(1 + (radius * radius) / (sizePx * sizePx), 1 - b);
}

/** Sub-samples per pixel side where the profile curves fast (near its centre). */
const NEAR_SAMPLES = 4;

/**
 * Add the glow to the image; with `overwrite`, the colour channels are set instead (and alpha
 * cleared): a frame whose first full-frame pass is the glow is then not cleared beforehand, one
 * trip through the frame's memory fewer.
 */
export function addGlow(img: FloatImage, g: GlowSource, pixelAspect: number, overwrite = false): void {
  const { xPx, yPx, sizePx, falloff, energy } = g;
  if (energy[0] === 0 && energy[1] === 0 && energy[2] === 0) {
    if (overwrite) img.data.fill(0);
    return;
  }
  const b = falloff / 2;
  const s2 = sizePx * sizePx;
  const norm = ((b - 1) / (Math.PI * s2)) * pixelAspect; // x pixel area in display units
  const er = energy[0] * norm;
  const eg = energy[1] * norm;
  const eb = energy[2] * norm;
  // midpoint sampling is exact enough once the profile's curvature is small over a pixel
  const nearR = 2 + 1.5 * Math.hypot(pixelAspect, 1);
  const near2 = Math.max(nearR * nearR, 0);
  const smallCore = sizePx < 3 * Math.hypot(pixelAspect, 1);
  const invS2 = 1 / s2;
  for (let y = 0; y < img.height; y++) glowRow(img.data, y * img.width * 4, img.width, y, yPx, xPx, pixelAspect, b, invS2, smallCore ? near2 + 4 * s2 : -1, er, eg, eb, overwrite);
}

/**
 * Row y of the glow. Pixels nearer than `nearD2` (squared distance) average NEAR_SAMPLES^2
 * sub-samples. A function per row, not a frame-long loop, so V8 optimises it by call count in a
 * thread's first frame and keeps it.
 */
function glowRow(d: Float32Array, i: number, w: number, y: number, yPx: number, xPx: number, pixelAspect: number, b: number, invS2: number, nearD2: number, er: number, eg: number, eb: number, overwrite: boolean): void {
  const dy = y + 0.5 - yPx;
  const dy2 = dy * dy;
  for (let x = 0; x < w; x++, i += 4) {
    const dx = (x + 0.5 - xPx) * pixelAspect;
    const d2 = dx * dx + dy2;
    // exp(-b log(.)) runs about twice as fast as Math.pow in V8 here
    const k = d2 < nearD2 ? nearGlow(x, y, xPx, yPx, pixelAspect, b, invS2) : Math.exp(-b * Math.log(1 + d2 * invS2));
    if (overwrite) {
      d[i] = er * k;
      d[i + 1] = eg * k;
      d[i + 2] = eb * k;
      d[i + 3] = 0;
    } else {
      d[i] += er * k;
      d[i + 1] += eg * k;
      d[i + 2] += eb * k;
    }
  }
}

/** The profile averaged over NEAR_SAMPLES^2 points of pixel (x, y), for pixels near the centre. */
function nearGlow(x: number, y: number, xPx: number, yPx: number, pixelAspect: number, b: number, invS2: number): number {
  let k = 0;
  for (let sy = 0; sy < NEAR_SAMPLES; sy++) {
    const py = y + (sy + 0.5) / NEAR_SAMPLES - yPx;
    for (let sx = 0; sx < NEAR_SAMPLES; sx++) {
      const px = (x + (sx + 0.5) / NEAR_SAMPLES - xPx) * pixelAspect;
      k += Math.exp(-b * Math.log(1 + (px * px + py * py) * invS2));
    }
  }
  return k * (1 / (NEAR_SAMPLES * NEAR_SAMPLES));
}

/**
 * Add the part of the glow within a smooth window around its centre: all of it within `inner`
 * (display px), falling as a raised cosine to nothing at `outer`, over the pixels that reach.
 * With the rest drawn where it is, the part near the light is what a motion smear needs to move
 * (the tail barely changes over a few pixels of motion). Returns the pixels written.
 */
export function addGlowNear(img: FloatImage, g: GlowSource, pixelAspect: number, inner: number, outer: number, sign = 1): { x0: number; y0: number; x1: number; y1: number } {
  const { xPx, yPx, sizePx, falloff, energy } = g;
  const b = falloff / 2;
  const s2 = sizePx * sizePx;
  const norm = ((b - 1) / (Math.PI * s2)) * pixelAspect * sign;
  const invS2 = 1 / s2;
  const x0 = Math.max(0, Math.floor(xPx - outer / pixelAspect));
  const x1 = Math.min(img.width - 1, Math.ceil(xPx + outer / pixelAspect));
  const y0 = Math.max(0, Math.floor(yPx - outer));
  const y1 = Math.min(img.height - 1, Math.ceil(yPx + outer));
  const nearR = 2 + 1.5 * Math.hypot(pixelAspect, 1);
  const near2 = sizePx < 3 * Math.hypot(pixelAspect, 1) ? nearR * nearR + 4 * s2 : -1;
  const d = img.data;
  for (let y = y0; y <= y1; y++) {
    const dy = y + 0.5 - yPx;
    for (let x = x0; x <= x1; x++) {
      const dx = (x + 0.5 - xPx) * pixelAspect;
      const d2 = dx * dx + dy * dy;
      if (d2 >= outer * outer) continue;
      const r = Math.sqrt(d2);
      const w = r <= inner ? 1 : 0.5 + 0.5 * Math.cos((Math.PI * (r - inner)) / (outer - inner));
      const k = (d2 < near2 ? nearGlow(x, y, xPx, yPx, pixelAspect, b, invS2) : Math.exp(-b * Math.log(1 + d2 * invS2))) * w * norm;
      const i = (y * img.width + x) * 4;
      d[i] += energy[0] * k;
      d[i + 1] += energy[1] * k;
      d[i + 2] += energy[2] * k;
    }
  }
  return { x0, y0, x1, y1 };
}
