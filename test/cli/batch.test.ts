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
      await page.screenshot({ path: path.join(dir, 'report.png'), fullPage: true });
      expect(problems).toEqual([]);
    } finally {
      await browser.close();
    }
  }, 60_000);
});
