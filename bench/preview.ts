// Bench rows for `straylight preview`: a draft frame of a 1920x1080 shot through the 16-surface
// preset drawn at the preview's 960x540 (every element as a layer, composed and encoded as the
// page gets it), recomposing a drawn frame when a switch changes, and the time from saving the
// shot file to the new frame shown in headless Chromium. Run alone: `node dist/bench/preview.js`.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import { startPreview } from '../src/preview/server.js';
import { PreviewSession } from '../src/preview/session.js';

const shotText = (intensity: number) => `version: 1
frame: { width: 1920, height: 1080, rate: 24, first: 1, last: 48 }
lights:
  - name: sun
    position: [{ frame: 1, x: 300, y: 200 }, { frame: 48, x: 1600, y: 700 }]
    intensity: ${intensity}
    radius: 6
    colour: { kelvin: 5200 }
lens: { preset: zoom-like-35, f_number: 4 }
flare:
  glow: { fraction: 0.04 }
  starburst: { fraction: 0.05 }
  streak: { fraction: 0.02 }
output: { path: out/f.####.png }
`;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const spread = (xs: number[]) => `${Math.min(...xs).toFixed(0)}-${Math.max(...xs).toFixed(0)} ms`;

export async function previewRows(): Promise<[string, string][]> {
  const rows: [string, string][] = [];
  const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-preview-'));
  try {
    const shotFile = path.join(dir, 'shot.yaml');
    writeFileSync(shotFile, shotText(12));
    // frames drawn for the first time (none cached): ten while the threads' code warms up (as in
    // the first seconds of a preview), then twenty
    const session = new PreviewSession({ shotFile, quality: 'draft' });
    await session.load();
    const fresh: number[] = [];
    for (let n = 1; n <= 30; n++) {
      const f = await session.frame(n, {}, false);
      if (n > 10) fresh.push(f.ms);
    }
    // a drawn frame again with an element switched off: composed from its layers, encoded
    const recompose: number[] = [];
    let gain = 1;
    for (let n = 28; n <= 30; n++) for (let k = 0; k < 3; k++) recompose.push((await session.frame(n, { glow: { on: true, gain: (gain += 0.1) } }, false)).ms);
    const size = session.state().showing!;
    rows.push([`preview: draft frame ${size.widthPx}x${size.heightPx} of 1920x1080, zoom-like-35 (target < 100 ms)`, `${median(fresh).toFixed(1)} ms (${spread(fresh)} over ${fresh.length} frames)`]);
    await session.close();
    rows.push(['preview: the same frame again with a switch changed (layers kept)', `${median(recompose).toFixed(1)} ms (${spread(recompose)})`]);

    // saving the shot file to the new frame on the page, in headless Chromium
    const server = await startPreview({ shotFile, port: 0, quality: 'draft' });
    const browser = await chromium.launch({
      executablePath: '/usr/bin/chromium',
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    try {
      const page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
      await page.goto(server.url);
      // page-side code reaches the page's document through globalThis: the bench is compiled
      // without the DOM's types, and the page's policy forbids code given as text
      const shownVersion = () =>
        page.evaluate(() => {
          const img = (globalThis as unknown as { document: { getElementById(id: string): { dataset: Record<string, string> } } }).document.getElementById('frame');
          return Number(img.dataset.version ?? 0);
        });
      await page.waitForFunction(() => (globalThis as unknown as { document: { getElementById(id: string): { dataset: Record<string, string> } } }).document.getElementById('frame').dataset.frame === '1', undefined, { timeout: 30_000 });
      // warm the threads up on the page's own frames first (the slider through 20 frames)
      for (let n = 2; n <= 20; n++) {
        await page.locator('#slider').fill(String(n));
        await page.waitForFunction((f) => (globalThis as unknown as { document: { getElementById(id: string): { dataset: Record<string, string> } } }).document.getElementById('frame').dataset.frame === String(f), n, { timeout: 30_000 });
      }
      const saved: number[] = [];
      for (let i = 1; i <= 9; i++) {
        const before = await shownVersion();
        const t0 = performance.now();
        writeFileSync(shotFile, shotText(12 + 0.25 * i));
        await page.waitForFunction(
          (v) => {
            const img = (globalThis as unknown as { document: { getElementById(id: string): { dataset: Record<string, string>; complete: boolean; naturalWidth: number } } }).document.getElementById('frame');
            return Number(img.dataset.version) > v && img.complete && img.naturalWidth > 0;
          },
          before,
          { timeout: 30_000, polling: 5 },
        );
        const t = performance.now() - t0;
        if (i > 2) saved.push(t);
      }
      rows.push(['preview: shot file saved to its new frame shown in Chromium (target < 300 ms)', `${median(saved).toFixed(0)} ms (${spread(saved)} over ${saved.length} saves)`]);
    } finally {
      await browser.close();
      await server.close();
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  for (const [name, v] of await previewRows()) console.log(`  ${name.padEnd(58)} ${v}`);
}
