// OpenEXR input: files written by OpenImageIO's oiiotool (Debian openimageio-tools, installed by
// scripts/install-test-tools.sh) in every compression we claim, half and float, read back by our
// reader to the values oiiotool was given. The values go in as a PFM (Portable Float Map: a
// "PF"/"Pf" line, "width height", a negative scale for little-endian, float rows bottom to top).

import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { decodeExr, HALF_TO_FLOAT } from '../../src/format/exr-read.js';
import { tempDir } from '../helpers.js';

function oiiotool(args: string[]): void {
  const r = spawnSync('oiiotool', args, { encoding: 'utf8' });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`oiiotool ${args.join(' ')}: ${r.stderr}`);
}

/** An RGB float image (row-major from the top) written as a PFM. */
function writePfm(file: string, w: number, h: number, rgb: Float32Array): void {
  const head = Buffer.from(`PF\n${w} ${h}\n-1.0\n`, 'latin1');
  const body = Buffer.alloc(w * h * 12);
  for (let y = 0; y < h; y++) {
    const row = h - 1 - y; // PFM stores the bottom row first
    for (let i = 0; i < w * 3; i++) body.writeFloatLE(rgb[y * w * 3 + i], (row * w * 3 + i) * 4);
  }
  writeFileSync(file, Buffer.concat([head, body]));
}

/** Seeded values: a smooth ramp, flat runs (Huffman run codes) and noise over a wide range. */
function pattern(w: number, h: number, seed: number): Float32Array {
  let s = seed >>> 0;
  const rnd = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const v = new Float32Array(w * h * 3);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = (y * w + x) * 3;
      v[i] = x < w / 3 ? x / 8 : x < (2 * w) / 3 ? 0.25 : (rnd() - 0.3) * 2000; // Z-like: ramp, flat, noise
      v[i + 1] = y / (h - 1); // alpha-like ramp
      v[i + 2] = rnd() < 0.5 ? 0 : rnd() * 3; // sparse
    }
  }
  return v;
}

/** The nearest half to v, ties to the even bit pattern (IEEE 754 round to nearest even). */
function asHalf(v: number): number {
  // binary search the monotonic positive half range, then mirror the sign
  const a = Math.abs(v);
  let lo = 0;
  let hi = 0x7bff;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (HALF_TO_FLOAT[mid] <= a) lo = mid;
    else hi = mid;
  }
  const dl = a - HALF_TO_FLOAT[lo];
  const dh = HALF_TO_FLOAT[hi] - a;
  const best = dl < dh || (dl === dh && lo % 2 === 0) ? HALF_TO_FLOAT[lo] : HALF_TO_FLOAT[hi];
  return Math.sign(v) * best;
}

describe('half decoding table (IEEE 754 binary16)', () => {
  it('knows the standard values', () => {
    expect(HALF_TO_FLOAT[0x3c00]).toBe(1);
    expect(HALF_TO_FLOAT[0xc000]).toBe(-2);
    expect(HALF_TO_FLOAT[0x7bff]).toBe(65504);
    expect(HALF_TO_FLOAT[0x0001]).toBe(2 ** -24);
    expect(HALF_TO_FLOAT[0x7c00]).toBe(Infinity);
    expect(HALF_TO_FLOAT[0x7e00]).toBeNaN();
  });
});

describe('reading OpenEXR files written by oiiotool', () => {
  const W = 67; // odd sizes: the wavelet's odd column and line, a short last chunk
  const H = 45;
  for (const compression of ['none', 'rle', 'zips', 'zip', 'piz']) {
    for (const type of ['half', 'float'] as const) {
      it(`${compression}, ${type}: Z, A and Y channels hold the values given`, () => {
        const dir = tempDir();
        const values = pattern(W, H, 7);
        writePfm(path.join(dir, 'in.pfm'), W, H, values);
        const exr = path.join(dir, 'm.exr');
        oiiotool([path.join(dir, 'in.pfm'), '--ch', 'Z=R,A=G,Y=B', '-d', type, '--compression', compression, '-o', exr]);
        const img = decodeExr(readFileSync(exr));
        expect(img.compression).toBe(compression);
        expect([img.width, img.height]).toEqual([W, H]);
        expect([...img.types]).toEqual([['A', type], ['Y', type], ['Z', type]]);
        let worst = 0;
        for (const [name, c] of [['Z', 0], ['A', 1], ['Y', 2]] as const) {
          const got = img.channels.get(name)!;
          for (let p = 0; p < W * H; p++) {
            const want = type === 'half' ? asHalf(values[p * 3 + c]) : values[p * 3 + c];
            if (got[p] !== want) worst++;
          }
        }
        expect(worst).toBe(0);
      });
    }
  }

  it('PIZ over a larger image with long runs and a float Z beside half channels (mixed types)', () => {
    const dir = tempDir();
    const W2 = 301;
    const H2 = 97;
    const values = pattern(W2, H2, 99);
    for (let i = 0; i < values.length; i += 3) if ((i / 3) % W2 > 250) values[i + 2] = 1e6; // far background in Z
    writePfm(path.join(dir, 'in.pfm'), W2, H2, values);
    const exr = path.join(dir, 'm.exr');
    oiiotool([path.join(dir, 'in.pfm'), '--ch', 'R,G,Z=B', '-d', 'half', '-d', 'Z=float', '--compression', 'piz', '-o', exr]);
    const img = decodeExr(readFileSync(exr));
    expect([...img.types]).toEqual([['G', 'half'], ['R', 'half'], ['Z', 'float']]);
    const z = img.channels.get('Z')!;
    const r = img.channels.get('R')!;
    let bad = 0;
    for (let p = 0; p < W2 * H2; p++) {
      if (z[p] !== values[p * 3 + 2]) bad++;
      if (r[p] !== asHalf(values[p * 3])) bad++;
    }
    expect(bad).toBe(0);
  });

  it('PIZ of a smooth matte: few distinct values take the 14-bit wavelet', () => {
    const dir = tempDir();
    const W3 = 130;
    const H3 = 70;
    const values = new Float32Array(W3 * H3 * 3);
    for (let y = 0; y < H3; y++) for (let x = 0; x < W3; x++) values.set([x < 60 ? 0 : 1, Math.round(y / 7) / 10, 0.5], (y * W3 + x) * 3);
    writePfm(path.join(dir, 'in.pfm'), W3, H3, values);
    const exr = path.join(dir, 'm.exr');
    oiiotool([path.join(dir, 'in.pfm'), '-d', 'half', '--compression', 'piz', '-o', exr]);
    const img = decodeExr(readFileSync(exr));
    let bad = 0;
    for (const [name, c] of [['R', 0], ['G', 1], ['B', 2]] as const) {
      const got = img.channels.get(name)!;
      for (let p = 0; p < W3 * H3; p++) if (got[p] !== asHalf(values[p * 3 + c])) bad++;
    }
    expect(bad).toBe(0);
  });

  /** A 20x10 Z image written by oiiotool with its data window moved and its display window set. */
  const windowed = (origin: string, fullsize: string, compression: string) => {
    const dir = tempDir();
    const values = pattern(20, 10, 3);
    writePfm(path.join(dir, 'in.pfm'), 20, 10, values);
    const exr = path.join(dir, 'm.exr');
    oiiotool([path.join(dir, 'in.pfm'), '--ch', 'Z=R', '-d', 'float', '--origin', origin, '--fullsize', fullsize, '--compression', compression, '-o', exr]);
    const img = decodeExr(readFileSync(exr));
    return { img, z: img.channels.get('Z')!, values };
  };

  it('places a data window inside a larger display window; outside it reads 0', () => {
    const { img, z, values } = windowed('+5+3', '40x30+0+0', 'zip');
    expect([img.width, img.height]).toEqual([40, 30]);
    expect(img.dataWindow).toEqual([5, 3, 24, 12]);
    expect(z[0]).toBe(0);
    expect(z[3 * 40 + 5]).toBe(values[0]);
    expect(z[12 * 40 + 24]).toBe(values[(9 * 20 + 19) * 3]);
    expect(z[13 * 40 + 24]).toBe(0);
  });

  it('crops a data window that reaches past the display window (overscan)', () => {
    const { img, z, values } = windowed('-4-2', '10x6+0+0', 'zips');
    expect([img.width, img.height]).toEqual([10, 6]);
    // display (0, 0) is data pixel (4, 2); display (9, 5) is data pixel (13, 7)
    expect(z[0]).toBe(values[(2 * 20 + 4) * 3]);
    expect(z[5 * 10 + 9]).toBe(values[(7 * 20 + 13) * 3]);
  });

  it('refuses tiled files and lossy compressions with a message that says what to do', () => {
    const dir = tempDir();
    writePfm(path.join(dir, 'in.pfm'), 8, 8, pattern(8, 8, 1));
    oiiotool([path.join(dir, 'in.pfm'), '--tile', '4', '4', '-o', path.join(dir, 't.exr')]);
    expect(() => decodeExr(readFileSync(path.join(dir, 't.exr')))).toThrow(/tiled.*--scanline/);
    oiiotool([path.join(dir, 'in.pfm'), '-d', 'half', '--compression', 'b44', '-o', path.join(dir, 'b.exr')]);
    expect(() => decodeExr(readFileSync(path.join(dir, 'b.exr')))).toThrow(/B44 compression is not supported/);
  });

  it('reports a truncated file instead of returning garbage', () => {
    const dir = tempDir();
    writePfm(path.join(dir, 'in.pfm'), 64, 64, pattern(64, 64, 5));
    const exr = path.join(dir, 'm.exr');
    oiiotool([path.join(dir, 'in.pfm'), '-d', 'half', '--compression', 'piz', '-o', exr]);
    const bytes = readFileSync(exr);
    expect(() => decodeExr(bytes.subarray(0, bytes.length - 100))).toThrow(/truncated|damaged/);
    expect(() => decodeExr(Buffer.from('not an exr at all'))).toThrow(/not an OpenEXR file/);
  });
});
