// The README's picture of `straylight preview`: the demo shot's page at frame 1024 with the ghosts
// named, as headless Chromium shows it (`node dist/tools/make-preview-picture.js` after `npm run
// build`; needs Debian chromium). Written to docs/images/preview.png.

import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import { startPreview } from '../src/preview/server.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
process.chdir(root); // the page names the shot as given
const server = await startPreview({ shotFile: 'shots/harbour-beacon.yaml', port: 0, quality: 'draft' });
const browser = await chromium.launch({
  executablePath: '/usr/bin/chromium',
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
try {
  const page = await browser.newPage({ viewport: { width: 1400, height: 890 } });
  await page.goto(server.url);
  type Doc = { document: { getElementById(id: string): { dataset: Record<string, string>; complete: boolean } } };
  const at = (n: number) => page.waitForFunction((f) => {
    const img = (globalThis as unknown as Doc).document.getElementById('frame');
    return img.dataset.frame === String(f) && img.complete;
  }, n, { timeout: 30_000 });
  await at(1001);
  await page.locator('#slider').fill('1024');
  await at(1024);
  await page.check('#showGhosts');
  await page.waitForTimeout(500);
  await page.screenshot({ path: path.join(root, 'docs', 'images', 'preview.png') });
} finally {
  await browser.close();
  await server.close();
}
