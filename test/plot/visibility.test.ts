// The visibility chart: valid SVG (resvg parses and draws it), its y axis maps 0 and 1 where its
// ticks say, its x ticks carry the shot's frame numbers with their timecodes, every light is in
// the legend, off-frame spans are shaded, and the PNG is the chart drawn with the shipped font.

import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { decode } from 'fast-png';
import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { cli, tempDir } from '../helpers.js';

const SHOT = `version: 1
frame: { width: 200, height: 100, rate: 25, first: 1001, last: 1050, timecode: "10:00:00:00" }
lights:
  - name: sweep
    path: linear
    position: [{ frame: 1001, x: -40, y: 50 }, { frame: 1050, x: 240, y: 50 }]
    intensity: 3
  - { name: fixed lamp, position: [100, 20], intensity: 1 }
output: { path: out/f.####.png }
`;

describe('visibility --plot', () => {
  it('draws a valid chart whose axes say what they map, with a legend and the off-frame spans', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    const svgFile = path.join(dir, 'vis.svg');
    const r = await cli(['visibility', path.join(dir, 'shot.yaml'), '--plot', svgFile, '--csv', path.join(dir, 'v.csv')]);
    expect(r.code).toBe(0);
    const svg = readFileSync(svgFile, 'utf8');
    // resvg is a strict parser: it refuses malformed XML and unknown structure
    expect(() => new Resvg(svg).render()).not.toThrow();
    // y ticks: 0 at the bottom, 1 at the top; the lamp (never covered, always in frame) runs at 1
    const yOf = (v: number) => Number(new RegExp(`class="tick y" data-value="${v}" transform="translate\\(0,([\\d.]+)\\)"`).exec(svg)![1]);
    expect(yOf(0)).toBeGreaterThan(yOf(1));
    const lamp = /class="curve" data-light="fixed lamp" d="M([\d.]+),([\d.]+)/.exec(svg)!;
    expect(Number(lamp[2])).toBeCloseTo(yOf(1), 1);
    // x ticks are the shot's frame numbers, each with its timecode (25 fps, from 10:00:00:00)
    const xTicks = [...svg.matchAll(/class="tick x" data-value="(\d+)"/g)].map((m) => Number(m[1]));
    expect(xTicks.length).toBeGreaterThan(3);
    for (const t of xTicks) expect(t).toBeGreaterThanOrEqual(1001);
    expect(svg).toContain('>1010</text>');
    expect(svg).toContain('>10:00:00:09</text>');
    // a legend entry per light, by name
    for (const name of ['sweep', 'fixed lamp']) expect(svg).toContain(`class="legend" data-light="${name}"`);
    // the sweep starts and ends off frame: two shaded spans, the lamp none
    expect([...svg.matchAll(/class="off-frame" data-light="sweep"/g)]).toHaveLength(2);
    expect(svg).not.toContain('class="off-frame" data-light="fixed lamp"');
    // the same chart as PNG
    const pngFile = path.join(dir, 'vis.png');
    expect((await cli(['visibility', path.join(dir, 'shot.yaml'), '--plot', pngFile, '--csv', path.join(dir, 'v.csv')])).code).toBe(0);
    const png = decode(readFileSync(pngFile));
    expect([png.width, png.height]).toEqual([1200, 520]);
    // text was drawn: dark pixels in the title's row band (the font is the package's own)
    let dark = 0;
    for (let y = 15; y < 40; y++) for (let x = 80; x < 600; x++) if (png.data[(y * png.width + x) * png.channels] < 100) dark++;
    expect(dark).toBeGreaterThan(200);
  });

  it('refuses other extensions', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    const r = await cli(['visibility', path.join(dir, 'shot.yaml'), '--plot', path.join(dir, 'v.jpg')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`--plot: the file must end in .svg or .png, found "${path.join(dir, 'v.jpg')}"\n`);
  });
});
