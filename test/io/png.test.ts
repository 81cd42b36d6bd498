// PNG output, decoded by an independent decoder (fast-png) and checked against the PNG
// specification's chunk layout (W3C PNG 3rd ed.) and the sRGB formula (IEC 61966-2-1).

import { crc32 } from 'node:zlib';
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { encodePng } from '../../src/io/png.js';
import { FloatImage } from '../../src/raster/image.js';

/** IEC 61966-2-1 encoding, written out here rather than imported. */
const iecEncode = (v: number) => (v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055);

/** Chunks in file order, each CRC checked (PNG spec section 5.3). */
function chunks(png: Buffer): { type: string; body: Buffer }[] {
  expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
  const out: { type: string; body: Buffer }[] = [];
  for (let off = 8; off < png.length; ) {
    const len = png.readUInt32BE(off);
    const type = png.toString('latin1', off + 4, off + 8);
    const body = png.subarray(off + 8, off + 8 + len);
    expect(png.readUInt32BE(off + 8 + len)).toBe(crc32(png.subarray(off + 4, off + 8 + len)));
    out.push({ type, body });
    off += 12 + len;
  }
  return out;
}

const values = [0, 0.0005, 0.18, 0.5, 0.999, 1, 4, -0.5];

function ramp(): FloatImage {
  const img = new FloatImage(values.length, 2);
  values.forEach((v, x) => {
    img.data.set([v, v / 2, v / 4, 0], x * 4);
    img.data.set([0.02, 0.01, 0.3, 0], (values.length + x) * 4);
  });
  return img;
}

const clip = (v: number) => Math.min(1, Math.max(0, v));

describe('PNG writer', () => {
  it('writes 16-bit sRGB samples that decode to the IEC 61966-2-1 values', () => {
    const png = decode(encodePng(ramp(), { bitDepth: 16, transfer: 'srgb', alpha: 'none' }));
    expect(png.depth).toBe(16);
    expect(png.channels).toBe(3);
    expect([png.width, png.height]).toEqual([values.length, 2]);
    values.forEach((v, x) => {
      for (let c = 0; c < 3; c++) {
        const f = Math.fround(v / [1, 2, 4][c]);
        expect(png.data[x * 3 + c]).toBe(Math.round(iecEncode(clip(f)) * 65535));
      }
    });
  });

  it('writes 8-bit linear samples without a transfer curve', () => {
    const png = decode(encodePng(ramp(), { bitDepth: 8, transfer: 'linear', alpha: 'none' }));
    expect(png.depth).toBe(8);
    values.forEach((v, x) => expect(png.data[x * 3]).toBe(Math.round(clip(v) * 255)));
  });

  it('labels sRGB data with sRGB, gAMA 45455 and cHRM before IDAT (PNG spec 11.3.2)', () => {
    const list = chunks(encodePng(ramp(), { bitDepth: 16, transfer: 'srgb', alpha: 'none' }));
    const types = list.map((c) => c.type);
    expect(types.slice(0, 4)).toEqual(['IHDR', 'sRGB', 'gAMA', 'cHRM']);
    expect(types.at(-1)).toBe('IEND');
    expect(list[1].body[0]).toBe(0); // perceptual rendering intent
    expect(list[2].body.readUInt32BE(0)).toBe(45455);
    // sRGB primaries and D65 white x 100000 (PNG spec, sRGB chunk recommendations)
    expect([...Array(8)].map((_, i) => list[3].body.readUInt32BE(i * 4))).toEqual([31270, 32900, 64000, 33000, 30000, 60000, 15000, 6000]);
  });

  it('labels linear data with gAMA 1.0 (100000) and no sRGB chunk', () => {
    const types = chunks(encodePng(ramp(), { bitDepth: 8, transfer: 'linear', alpha: 'none' }));
    expect(types.map((c) => c.type).slice(0, 3)).toEqual(['IHDR', 'gAMA', 'cHRM']);
    expect(types[1].body.readUInt32BE(0)).toBe(100000);
    expect(types.some((c) => c.type === 'sRGB')).toBe(false);
  });

  it('stores the premultiplied pass as straight alpha that re-premultiplies to the pass', () => {
    const img = new FloatImage(3, 1);
    img.data.set([0.4, 0.2, 0.1, 0, 0, 0, 0, 0, 3, 1.5, 0.5, 0]);
    const png = decode(encodePng(img, { bitDepth: 16, transfer: 'linear', alpha: 'premultiplied' }));
    expect(png.channels).toBe(4);
    const px = (i: number) => [...png.data.slice(i * 4, i * 4 + 4)].map((v) => v / 65535);
    // alpha is the pass's largest channel, clipped to 1; colour x alpha gives the pass back
    const [r, g, b, a] = px(0);
    expect(a).toBeCloseTo(0.4, 4);
    expect([r * a, g * a, b * a]).toEqual([expect.closeTo(0.4, 4), expect.closeTo(0.2, 4), expect.closeTo(0.1, 4)]);
    expect(px(1)).toEqual([0, 0, 0, 0]);
    expect(px(2)[3]).toBe(1);
  });

  it('writes the same bytes every time', () => {
    const a = encodePng(ramp(), { bitDepth: 16, transfer: 'srgb', alpha: 'premultiplied' });
    const b = encodePng(ramp(), { bitDepth: 16, transfer: 'srgb', alpha: 'premultiplied' });
    expect(a.equals(b)).toBe(true);
  });
});
