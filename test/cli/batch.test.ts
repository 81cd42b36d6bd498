// batch: goes on past a failing shot; the morning report as JSON, and as an HTML page that loads in
// headless Chromium (Debian chromium, driven by playwright-core) with no console errors and every
// shot shown.

import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { ExitCode } from '../../src/errors.js';
import { cli, tempDir } from '../helpers.js';


const good = (name: string) => `version: 1
frame: { width: 96, height: 54, rate: 24, first: 1, last: 6 }
lights: [{ name: a, position: [48, 27], intensity: 3 }]
output: { path: "${name}/f.####.png" }
`;

describe('straylight batch', () => {
  it('renders every good shot, goes on past a broken one, and writes the report', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'one.yaml'), good('one'));
    writeFileSync(path.join(dir, 'broken.yaml'), 'version: 1\nframe: {}\n');
    writeFileSync(path.join(dir, 'two.yaml'), good('two'));
    const report = path.join(dir, 'morning.json');
    const shots = ['one.yaml', 'broken.yaml', 'two.yaml'].map((f) => path.join(dir, f));
    const r = await cli(['batch', ...shots, '--report', report, '--quiet', '--jobs', '1']);
    expect(r.code).toBe(ExitCode.framesFailed);
    const json = JSON.parse(readFileSync(report, 'utf8'));
    expect(json.shots.map((s: { status: string }) => s.status)).toEqual(['ok', 'bad-input', 'ok']);
    expect(json.shots[0].written).toBe(6);
    expect(json.shots[1].error).toMatch(/broken\.yaml:2:8: frame: missing key "width"/);
    expect(json.shots[2].thumbnail).toMatch(/^data:image\/png;base64,/);

    const browser = await chromium.launch({
      executablePath: '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    try {
      const page = await browser.newPage();
      const problems: string[] = [];
      page.on('console', (m) => {
        if (m.type() === 'error') problems.push(m.text());
      });
      page.on('pageerror', (e) => problems.push(e.message));
      await page.goto(pathToFileURL(report.replace(/\.json$/, '.html')).href);
      expect(await page.title()).toBe('straylight batch: 2 of 3 shots rendered');
      const headings = await page.locator('section.shot h2').allTextContents();
      expect(headings).toEqual(shots);
      // thumbnails decode in the browser
      const loaded = await page.locator('section.shot img').evaluateAll((imgs) => imgs.map((i) => (i as HTMLImageElement).naturalWidth));
      expect(loaded).toEqual([96, 96]);
      // the summary table says what the JSON says
      const cell = (k: string) => page.locator(`table.summary td[data-key="${k}"]`).textContent();
      const done = json.shots.reduce((n: number, s: { written: number; skipped: number }) => n + s.written + s.skipped, 0);
      const total = json.shots.reduce((n: number, s: { frames: number }) => n + s.frames, 0);
      expect(await cell('shots')).toBe(`2 of 3`);
      expect(await cell('frames')).toBe(`${done} of ${total}`);
      expect(await cell('failures')).toBe('1');
      // each rendered shot: its range with timecodes, a thumbnail named by its frame, a visibility chart
      expect(await page.locator('section.shot figcaption').allTextContents()).toEqual(['frame 4', 'frame 4']);
      expect(await page.locator('section.shot .chart svg').count()).toBe(2);
      expect(await page.locator('section.shot').first().textContent()).toContain('frames 1-6 (00:00:00:01 - 00:00:00:06); lens none');
      await page.screenshot({ path: path.join(dir, 'report.png'), fullPage: true });
      expect(problems).toEqual([]);
    } finally {
      await browser.close();
    }
  }, 60_000);

  it('--report FOLDER writes report.json and index.html in it', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'one.yaml'), good('one'));
    const r = await cli(['batch', path.join(dir, 'one.yaml'), '--report', `${path.join(dir, 'morning')}/`, '--quiet', '--jobs', '1']);
    expect(r.code).toBe(0);
    expect(JSON.parse(readFileSync(path.join(dir, 'morning', 'report.json'), 'utf8')).shots).toHaveLength(1);
    expect(readFileSync(path.join(dir, 'morning', 'index.html'), 'utf8')).toContain('<table class="summary">');
  });
});
