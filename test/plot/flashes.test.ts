// The flash-screening chart: valid SVG (resvg parses and draws it), the WCAG 2.x SC 2.3.1 limits
// (three flashes in any second; a darker state below 0.80) drawn where the axes say, flagged spans
// shaded exactly over the frames the report flags, frame numbers on x.

import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { cli, tempDir } from '../helpers.js';

describe('flashes --plot', () => {
  it('draws the limits where the axes put them and shades the flagged frames', async () => {
    const dir = tempDir();
    // full-frame light switched on and off every 2 frames at 24 fps: 6 flashes a second, then steady
    const on = Array.from({ length: 24 }, (_, i) => `{ frame: ${i + 1}, value: ${i % 4 < 2 ? 1 : 0}, ease: hold }`);
    const steady = Array.from({ length: 24 }, (_, i) => `{ frame: ${i + 25}, value: 0.5, ease: hold }`);
    writeFileSync(path.join(dir, 'shot.yaml'), `version: 1
frame: { width: 96, height: 54, rate: 24, first: 1, last: 48 }
lights:
  - { name: strobe, position: [48, 27], radius: 60, intensity_unit: linear, intensity: [${[...on, ...steady].join(', ')}] }
flare: { glow: { enabled: false } }
output: { path: out/f.####.png }
`);
    expect((await cli(['render', path.join(dir, 'shot.yaml'), '--quiet', '--jobs', '1'])).code).toBe(0);
    const svgFile = path.join(dir, 'f.svg');
    const r = await cli(['flashes', path.join(dir, 'shot.yaml'), '--plot', svgFile, '--json']);
    expect(r.code).toBe(5);
    const report = JSON.parse(r.stdout).overBlack as { spans: { kind: string; firstFrame: number; lastFrame: number }[] };
    const svg = readFileSync(svgFile, 'utf8');
    expect(() => new Resvg(svg).render()).not.toThrow();
    // each limit line sits at the y its panel's ticks give that value
    const tickY = (v: number) => [...svg.matchAll(new RegExp(`class="tick y" data-value="${v}" transform="translate\\(0,([\\d.]+)\\)"`, 'g'))].map((m) => Number(m[1]));
    const limitY = (v: number) => Number(new RegExp(`class="limit" data-value="${v}" x1="[\\d.]+" x2="[\\d.]+" y1="([\\d.]+)"`).exec(svg)![1]);
    expect(tickY(0.8)).toContain(limitY(0.8));
    expect(tickY(3)).toContain(limitY(3));
    // the shaded spans are the report's spans, in both panels
    expect(report.spans.length).toBeGreaterThan(0);
    for (const s of report.spans) expect([...svg.matchAll(new RegExp(`class="flagged" data-kind="${s.kind}" data-first="${s.firstFrame}" data-last="${s.lastFrame}"`, 'g'))]).toHaveLength(2);
    expect([...svg.matchAll(/class="tick x" data-value="(\d+)"/g)].map((m) => Number(m[1]))).toContain(10);
    expect(svg).toContain('>00:00:00:10</text>');
  });
});
