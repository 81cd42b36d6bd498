// Colour: sRGB transfer (IEC 61966-2-1), the CIE 1931 fit (Wyman, Sloan & Shirley, JCGT 2013), and
// blackbody colours (Planck's law; chromaticity tables).

import { describe, expect, it } from 'vitest';
import { blackbodyChromaticity, blackbodyRgb } from '../../src/colour/blackbody.js';
import { xBar, yBar, zBar } from '../../src/colour/cie.js';
import { luminance, srgbDecode, srgbEncode, xyzToLinearSrgb } from '../../src/colour/srgb.js';

describe('sRGB transfer (IEC 61966-2-1)', () => {
  it('encodes 0.18 and 0.5 to the computed values', () => {
    // computed from the IEC 61966-2-1 formula (OPTICS.md section 5)
    expect(srgbEncode(0.18)).toBeCloseTo(0.46136, 5);
    expect(srgbEncode(0.5)).toBeCloseTo(0.73536, 5);
  });
  it('decodes 0.5 to 0.21404 (computed)', () => {
    expect(srgbDecode(0.5)).toBeCloseTo(0.21404, 5);
  });
  it('uses the linear segment below the thresholds (0.0031308 / 0.04045)', () => {
    expect(srgbEncode(0.003)).toBeCloseTo(0.003 * 12.92, 12);
    expect(srgbDecode(0.04)).toBeCloseTo(0.04 / 12.92, 12);
  });
  it('round-trips', () => {
    for (let i = 0; i <= 100; i++) expect(srgbDecode(srgbEncode(i / 100))).toBeCloseTo(i / 100, 9);
  });
  it('maps the D65 white point (0.3127, 0.3290) to equal RGB (IEC 61966-2-1 matrix)', () => {
    const [r, g, b] = xyzToLinearSrgb(0.3127 / 0.329, 1, (1 - 0.3127 - 0.329) / 0.329);
    expect(r).toBeCloseTo(1, 3);
    expect(g).toBeCloseTo(1, 3);
    expect(b).toBeCloseTo(1, 3);
  });
  it('weights luminance by ITU-R BT.709', () => {
    expect(luminance(1, 1, 1)).toBeCloseTo(1, 12);
    expect(luminance(1, 0, 0)).toBe(0.2126);
  });
});

describe('CIE 1931 fit (Wyman, Sloan & Shirley 2013)', () => {
  it('gives the fit values of OPTICS.md section 5 (computed)', () => {
    expect(yBar(555)).toBeCloseTo(0.99793, 4);
    expect(xBar(600)).toBeCloseTo(1.05593, 4);
    expect(zBar(450)).toBeCloseTo(1.78139, 4);
  });
});

describe('blackbody colour', () => {
  it('3000 K and 6500 K chromaticities are within 0.002 of the tables', () => {
    // tabulated Planckian-locus values, from memory: 3000 K (0.4369, 0.4041), 6500 K (0.3135, 0.3236)
    const [x3, y3] = blackbodyChromaticity(3000);
    expect(Math.abs(x3 - 0.4369)).toBeLessThan(0.002);
    expect(Math.abs(y3 - 0.4041)).toBeLessThan(0.002);
    const [x6, y6] = blackbodyChromaticity(6500);
    expect(Math.abs(x6 - 0.3135)).toBeLessThan(0.002);
    expect(Math.abs(y6 - 0.3236)).toBeLessThan(0.002);
  });
  it('3000 K in linear sRGB is (1, 0.4850, 0.1545) with its largest channel at 1 (computed, OPTICS.md)', () => {
    const [r, g, b] = blackbodyRgb(3000);
    expect(g / r).toBeCloseTo(0.485, 3);
    expect(b / r).toBeCloseTo(0.1545, 3);
  });
  it('has unit luminance, and 6500 K is near neutral', () => {
    const c = blackbodyRgb(6500);
    expect(luminance(...c)).toBeCloseTo(1, 12);
    expect(Math.max(...c) / Math.min(...c)).toBeLessThan(1.06);
  });
});
