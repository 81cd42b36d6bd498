// The pictures of the README's "Shaping the look" walkthrough, made from the demo shot with the
// same keys a user would add (`node dist/tools/make-look-pictures.js` after `npm run build`):
// frame 1024 as shipped, with its most visible ghost switched off, and with the mast lamp given a
// flare block of its own. Written at half size to docs/images/.

import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodePng } from '../src/io/png.js';
import { checkMattes } from '../src/io/matte-provider.js';
import { presetNames, presetPath } from '../src/io/presets.js';
import { renderFrame } from '../src/render/render-frame.js';
import { scaleShot } from '../src/render/overrides.js';
import { resolveShot } from '../src/shot/resolve.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const shotFile = path.join(root, 'shots', 'harbour-beacon.yaml');
const text = readFileSync(shotFile, 'utf8');
const reader = { readText: (p: string) => readFileSync(p, 'utf8'), presetNames, presetPath };
const FRAME = 1024;

function shotWith(edit: (t: string) => string) {
  const shot = resolveShot(edit(text), shotFile, reader);
  if (checkMattes(shot).length) throw new Error('the demo mattes are missing');
  return scaleShot(shot, 0.5);
}

function write(name: string, edit: (t: string) => string): void {
  const img = renderFrame(shotWith(edit), FRAME);
  writeFileSync(path.join(root, 'docs', 'images', name), encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
  console.log(`docs/images/${name}`);
}

// the ghost that shows most in this frame (the most pixels lifted past 0.01), found by drawing each alone
const plain = shotWith((t) => t);
const names = plain.lens!.model.surfaces.flatMap((_, i) => plain.lens!.model.surfaces.map((__, j) => `${i + 1}-${j + 1}`)).filter((n) => {
  const [i, j] = n.split('-').map(Number);
  const s = plain.lens!.model.surfaces;
  return i > j && !s[i - 1].stop && !s[j - 1].stop;
});
let best = '';
let bestEnergy = -1;
for (const n of names) {
  const img = renderFrame(shotWith((t) => t.replace('ghosts: { quality: low }', `ghosts: { quality: low, solo: ${n} }`).replace('glow: {', 'core: { enabled: false }\n  glow: { enabled: false, ').replace('starburst: {', 'starburst: { enabled: false, ')), FRAME);
  // the most visible: pixels it lifts by a clearly visible amount (a large dim disc can carry
  // more energy yet show less; a caustic spot is bright but tiny)
  let e = 0;
  for (let k = 0; k < img.data.length; k += 4) if (0.2126 * img.data[k] + 0.7152 * img.data[k + 1] + 0.0722 * img.data[k + 2] > 0.01) e++;
  if (e > bestEnergy) [best, bestEnergy] = [n, e];
}
console.log(`most visible ghost at frame ${FRAME}: ${best}`);
write('look-as-shipped.png', (t) => t);
write('look-ghost-off.png', (t) => t.replace('ghosts: { quality: low }', `ghosts: { quality: low, paths: { ${best}: { enabled: false } } }`));
write('look-lamp-own-flare.png', (t) => t.replace('    occluded_by: []', '    occluded_by: []\n    flare: { glow: { fraction: 0.15, size: 12 }, starburst: { fraction: 0.2, size: 120 } }'));
