// straylight preview: the page served on a free loopback port, driven in headless Chromium (Debian
// chromium, through playwright-core): it loads without console errors, the slider draws another
// frame, an element switch changes the picture, a saved shot file is redrawn and said so, a broken
// shot shows check's located error while the server keeps running, and no path outside the
// server's own routes is ever answered with a file. Writing back keeps every comment of the shot.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { request } from 'node:http';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPreview, type PreviewServer } from '../../src/preview/server.js';
import { writeBack } from '../../src/preview/write-back.js';
import { drawLayers, jobShots, splitLayers } from '../../src/preview/layer-jobs.js';
import { ExitCode } from '../../src/errors.js';
import { cli } from '../helpers.js';
import { loadShot } from '../../src/io/load-shot.js';

// An invented look-dev shot: a lamp drifting across a small frame through the double Gauss preset,
// every element that is cheap at this size, with comments that a write-back must keep.
const SHOT = `# look-dev test shot: a lamp drifting right
version: 1
frame:
  width: 320   # small, so each frame draws in milliseconds
  height: 180
  rate: 24
  first: 1
  last: 6
lights:
  - name: lamp
    # moves 30 px a frame, so every frame differs
    position: [{ frame: 1, x: 60, y: 60 }, { frame: 6, x: 210, y: 90 }]
    intensity: 12
    radius: 3
lens: { preset: double-gauss-50, f_number: 4 }
flare:
  glow: { fraction: 0.04, size: 5 }   # the scatter
  starburst: { fraction: 0.05, size: 10 }
output:
  path: out/f.####.png   # never written by the preview
`;

const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/** GET a raw path (no URL normalisation on the way) with a chosen Host header. */
function rawGet(port: number, rawPath: string, host = `127.0.0.1:${port}`): Promise<{ status: number; body: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, path: rawPath, method: 'GET', headers: { Host: host } }, (res) => {
      let body = '';
      res.setEncoding('latin1');
      res.on('data', (c) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', reject);
    req.end();
  });
}

/** Sum of the picture's 8-bit values as the page shows it (drawn into a canvas). */
function pictureSum(page: Page): Promise<number> {
  return page.evaluate(() => {
    const img = document.getElementById('frame') as HTMLImageElement;
    const c = document.createElement('canvas');
    c.width = img.naturalWidth;
    c.height = img.naturalHeight;
    const g = c.getContext('2d')!;
    g.drawImage(img, 0, 0);
    const d = g.getImageData(0, 0, c.width, c.height).data;
    let s = 0;
    for (let i = 0; i < d.length; i += 4) s += d[i] + d[i + 1] + d[i + 2];
    return s;
  });
}

/** The frame number and the picture's address once the page shows frame n drawn for `version` or later. */
async function shown(page: Page, n: number, minVersion = 0): Promise<void> {
  await page.waitForFunction(
    ([n, v]) => {
      const img = document.getElementById('frame') as HTMLImageElement;
      return img.dataset.frame === String(n) && Number(img.dataset.version) >= v && img.complete && img.naturalWidth > 0;
    },
    [n, minVersion] as const,
    { timeout: 20_000 },
  );
}

describe('straylight preview', () => {
  let dir: string;
  let shotFile: string;
  let server: PreviewServer;
  let browser: Browser;
  let page: Page;
  const problems: string[] = [];
  const logged: string[] = [];

  beforeAll(async () => {
    dir = mkdtempSync(path.join(tmpdir(), 'straylight-preview-'));
    shotFile = path.join(dir, 'look.yaml');
    writeFileSync(shotFile, SHOT);
    server = await startPreview({ shotFile, port: 0, quality: 'draft', log: (l) => logged.push(l) });
    browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    page.on('console', (m) => {
      if (m.type() === 'error') problems.push(m.text());
    });
    page.on('pageerror', (e) => problems.push(e.message));
  }, 60_000);

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it('is bound to the loopback interface only', () => {
    expect(server.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
  });

  it('loads without console errors and shows the first frame with its timecode', async () => {
    await page.goto(server.url);
    await shown(page, 1);
    expect(await page.textContent('#frameLabel')).toBe('frame 1 \u00b7 00:00:00:01');
    expect(await page.textContent('#errors')).toBe('none');
    expect(await page.locator('#elements tbody tr').count()).toBeGreaterThanOrEqual(4); // core, glow, ghosts, starburst
    expect(problems).toEqual([]);
  });

  it('the slider moves to another frame and the picture changes', async () => {
    await shown(page, 1);
    const before = await page.getAttribute('#frame', 'src');
    const sumBefore = await pictureSum(page);
    await page.locator('#slider').fill('4');
    await shown(page, 4);
    expect(await page.textContent('#frameLabel')).toBe('frame 4 \u00b7 00:00:00:04');
    expect(await page.getAttribute('#frame', 'src')).not.toBe(before);
    expect(await pictureSum(page)).not.toBe(sumBefore);
  });

  it('switching the glow off takes its light out of the picture, and on again puts it back', async () => {
    await shown(page, 4);
    const withGlow = await pictureSum(page);
    const src = await page.getAttribute('#frame', 'src');
    await page.uncheck('#on-glow');
    await page.waitForFunction((s) => (document.getElementById('frame') as HTMLImageElement).getAttribute('src') !== s, src);
    await shown(page, 4);
    const without = await pictureSum(page);
    expect(without).toBeLessThan(withGlow);
    const srcWithout = await page.getAttribute('#frame', 'src');
    await page.check('#on-glow');
    await page.waitForFunction((s) => (document.getElementById('frame') as HTMLImageElement).getAttribute('src') !== s, srcWithout);
    await shown(page, 4);
    expect(await pictureSum(page)).toBe(withGlow);
  });

  it('names the ghosts on the picture as the lens table names them', async () => {
    await page.check('#showGhosts');
    await page.waitForFunction(() => document.querySelectorAll('#overlay text.ghost-name').length > 0);
    const names = await page.locator('#overlay text.ghost-name').allTextContents();
    for (const n of names) expect(n).toMatch(/^\d+-\d+$/);
    await page.uncheck('#showGhosts');
  });

  it('a saved shot file is drawn again and the page says so', async () => {
    await shown(page, 4);
    const v0 = Number(await page.getAttribute('#frame', 'data-version'));
    const before = await pictureSum(page);
    writeFileSync(shotFile, SHOT.replace('intensity: 12', 'intensity: 10'));
    await shown(page, 4, v0 + 1);
    await page.waitForFunction(() => (document.getElementById('status')!.textContent ?? '').includes('look.yaml saved, shot reloaded'));
    expect(await pictureSum(page)).toBeLessThan(before);
    expect(logged.some((l) => /look\.yaml changed: shot reloaded/.test(l))).toBe(true);
  });

  it('a broken shot shows its file:line:col error in the page and the server keeps running', async () => {
    writeFileSync(shotFile, SHOT.replace('radius: 3', 'radius: big'));
    await page.waitForFunction(() => /look\.yaml:\d+:\d+: lights\[0\]\.radius: expected a number/.test(document.getElementById('errors')!.textContent ?? ''), undefined, { timeout: 20_000 });
    expect(await page.getAttribute('#status', 'class')).toContain('bad');
    // the same line check prints
    const located = (await page.textContent('#errors'))!.trim();
    await expect(loadShot(shotFile)).rejects.toThrow(located);
    // still answering
    const state = await rawGet(server.port, '/api/state');
    expect(state.status).toBe(200);
    expect(JSON.parse(state.body).errors).toEqual([located]);
    // fixed again: the errors go and the frame is drawn from the new version
    writeFileSync(shotFile, SHOT);
    await page.waitForFunction(() => document.getElementById('errors')!.textContent === 'none', undefined, { timeout: 20_000 });
    expect(problems).toEqual([]);
  });

  it('answers no path outside its routes, however it is spelled, and only to its own address', async () => {
    const attempts = [
      '/../../etc/passwd',
      '/%2e%2e/%2e%2e/etc/passwd',
      '/%2E%2E%2F%2E%2E%2Fetc%2Fpasswd',
      '/..%2f..%2f..%2fetc%2fpasswd',
      '/api/frame/../../../../etc/passwd',
      '/api/..%5c..%5c..%5cetc%5cpasswd',
      '//etc/passwd',
      `/${encodeURIComponent(shotFile)}`,
      '/look.yaml',
      '/out/f.0001.png',
      '/%00/etc/passwd',
    ];
    for (const a of attempts) {
      const r = await rawGet(server.port, a);
      expect([403, 404], a).toContain(r.status);
      expect(r.body, a).not.toMatch(/root:|version: 1/);
    }
    // a page elsewhere whose name resolves here (DNS rebinding) is refused
    const foreign = await rawGet(server.port, '/api/state', 'attacker.example:80');
    expect(foreign.status).toBe(403);
  });

  it('writes the page\'s settings back to the shot file when asked, keeping every comment', async () => {
    await page.reload();
    await shown(page, 1);
    await page.uncheck('#on-starburst');
    await page.locator('#gain-glow').fill('2');
    await page.locator('#gain-glow').dispatchEvent('change');
    await page.click('#write');
    await page.waitForFunction(() => (document.getElementById('writeStatus')!.textContent ?? '').startsWith('wrote'));
    // only the two settings changed, each where it stands; every comment and space kept
    const text = readFileSync(shotFile, 'utf8');
    expect(text).toBe(SHOT.replace('glow: { fraction: 0.04, size: 5 }', 'glow: { fraction: 0.04, size: 5, gain: 2 }').replace('starburst: { fraction: 0.05, size: 10 }', 'starburst: { fraction: 0.05, size: 10, enabled: false }'));
    const shot = await loadShot(shotFile);
    expect(shot.elements.starburst.enabled).toBe(false);
    expect(shot.glow.fraction).toBe(0.04);
    expect(shot.elements.glow.gain[0].value).toBe(2);
    // the page reloads the written shot and starts again from its settings
    await page.waitForFunction(() => (document.getElementById('on-starburst') as HTMLInputElement | null)?.checked === false && (document.getElementById('gain-glow') as HTMLInputElement).value === '1', undefined, { timeout: 20_000 });
  });
});

describe('write-back', () => {
  const text = `# a shot
version: 1
flare:
  # the glow, keyed
  glow:
    fraction: 0.04
    gain:   # fades in
      - { frame: 1, value: 0 }
      - { frame: 10, value: 0.5 }
  ghosts: { quality: low }   # quick
`;

  it('multiplies keyed gains, adds keys where missing, and changes nothing else', () => {
    const out = writeBack(text, { glow: { on: true, gain: 2 }, ghosts: { on: false, gain: 1 }, core: { on: true, gain: 1 } }, { glow: true, ghosts: true, core: true });
    expect(out.changed).toEqual(['flare.glow.gain', 'flare.ghosts.enabled']);
    expect(out.text).toBe(`# a shot
version: 1
flare:
  # the glow, keyed
  glow:
    fraction: 0.04
    gain:   # fades in
      - { frame: 1, value: 0 }
      - { frame: 10, value: 1 }
  ghosts: { quality: low, enabled: false }   # quick
`);
  });

  it('leaves the text byte for byte when the page matches the file', () => {
    const out = writeBack(text, { glow: { on: true, gain: 1 } }, { glow: true });
    expect(out).toEqual({ text, changed: [] });
  });

  it('adds a missing element as a line of its block, and a missing flare section at the end', () => {
    const out = writeBack(text, { veil: { on: true, gain: 0.5 }, dust: { on: false, gain: 1 } }, { veil: true, dust: true });
    expect(out.text).toBe(text.replace('  ghosts: { quality: low }   # quick\n', '  ghosts: { quality: low }   # quick\n  veil: { gain: 0.5 }\n  dust: { enabled: false }\n'));
    const bare = writeBack('version: 1 # v\n', { veil: { on: true, gain: 0.5 } }, { veil: true });
    expect(bare.text).toBe('version: 1 # v\nflare: { veil: { gain: 0.5 } }\n');
  });

  it('adds keys to a block element after its nested keys', () => {
    const out = writeBack(text, { glow: { on: false, gain: 1 } }, { glow: true });
    expect(out.text).toBe(text.replace('      - { frame: 10, value: 0.5 }\n', '      - { frame: 10, value: 0.5 }\n    enabled: false\n'));
  });
});

describe('the preview\'s split of a frame between threads', () => {
  it('gives every element to one thread, and the ghosts to all in shares', () => {
    const split = splitLayers(['core', 'glow', 'ghosts', 'starburst', 'streak'], 2);
    // glow (1.9) goes to one thread, starburst, streak and core (0.8) to the other; the ghosts (10)
    // even the two out at 6.35 each: shares of 0.445 and 0.555 that tile [0, 1)
    const shares = split.map((jobs) => jobs.filter((j) => j.element === 'ghosts').map((j) => j.share!));
    expect(shares.map((s) => s.length)).toEqual([1, 1]);
    expect(shares[0][0].from).toBe(0);
    expect(shares[0][0].to).toBe(shares[1][0].from);
    expect(shares[1][0].to).toBe(1);
    const costOf = (t: number) => split[t].reduce((sum, j) => sum + (j.element === 'ghosts' ? 10 * (j.share!.to - j.share!.from) : { glow: 1.9, starburst: 0.6, streak: 0.1, core: 0.1 }[j.element as 'glow']), 0);
    expect(costOf(0)).toBeCloseTo(costOf(1), 9);
    // a thread already at or over the level gets no ghosts: of twelve, the glow's and the dust's
    const many = splitLayers(['ghosts', 'glow', 'dust'], 12);
    expect(many.filter((jobs) => jobs.some((j) => j.element === 'ghosts')).length).toBe(10);
    const others = split.flat().filter((j) => j.element !== 'ghosts').map((j) => j.element).sort();
    expect(others).toEqual(['core', 'glow', 'starburst', 'streak']);
    expect(splitLayers(['ghosts', 'glow'], 1)).toEqual([[{ element: 'ghosts' }, { element: 'glow' }]]);
  });

  it('the ghosts\' shares add up to the whole ghost layer (to float rounding), and neither is empty', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'straylight-preview-'));
    try {
      const file = path.join(dir, 'look.yaml');
      writeFileSync(file, SHOT);
      const shot = await loadShot(file);
      const [whole] = drawLayers(shot, jobShots(shot, [{ element: 'ghosts' }]), 3);
      const halves = [0, 1].map((index) => drawLayers(shot, jobShots(shot, [{ element: 'ghosts', share: [{ from: 0, to: 0.5 }, { from: 0.5, to: 1 }][index] }]), 3)[0]);
      let peak = 0;
      let worst = 0;
      for (let i = 0; i < whole.data.length; i++) {
        peak = Math.max(peak, whole.data[i]);
        worst = Math.max(worst, Math.abs(halves[0].data[i] + halves[1].data[i] - whole.data[i]));
      }
      expect(peak).toBeGreaterThan(0);
      expect(worst).toBeLessThan(1e-5 * peak);
      for (const h of halves) expect(h.channelSums()[1]).toBeGreaterThan(0.05 * whole.channelSums()[1]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('straylight preview on the command line', () => {
  it('a port in use is one line and the usage exit code', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'straylight-preview-'));
    const file = path.join(dir, 'look.yaml');
    writeFileSync(file, SHOT);
    const first = await startPreview({ shotFile: file, port: 0, quality: 'draft' });
    try {
      const r = await cli(['preview', file, '--port', String(first.port)]);
      expect(r.code).toBe(ExitCode.usage);
      expect(r.stderr.trim()).toBe(`--port: port ${first.port} on 127.0.0.1 is in use: choose another (--port 0 picks a free one)`);
    } finally {
      await first.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
