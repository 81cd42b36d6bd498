// The README's pictures of every preset lens (`node dist/tools/make-lens-pictures.js` after `npm run
// build`): its cross-section with its strongest ghost's rays, as `straylight lens NAME --plot`
// draws it, and a still of the flare it gives one bright light (an invented test scene: a light
// at (300, 150) of a 960x540 frame, the preset at its widest aperture, medium ghosts, a little
// glow and the iris's starburst). Written to docs/images/lenses/, and a Markdown table printed.

import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodePng } from '../src/io/png.js';
import { presetNames, presetPath } from '../src/io/presets.js';
import { chartBytes } from '../src/io/svg-png.js';
import { prepareLens } from '../src/optics/ghost-system.js';
import { focalLength } from '../src/optics/paraxial.js';
import { lensSvg } from '../src/plot/lens.js';
import { renderFrame } from '../src/render/render-frame.js';
import { parseLensText } from '../src/shot/lens-file.js';
import { resolveShot } from '../src/shot/resolve.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const out = path.join(root, 'docs', 'images', 'lenses');
mkdirSync(out, { recursive: true });
const rows: string[] = ['| preset | what it is | cross-section (strongest ghost\'s rays) | its flare |', '|---|---|---|---|'];
for (const name of presetNames()) {
  const text = readFileSync(presetPath(name), 'utf8');
  const { model } = parseLensText(text, `${name}.yaml`, name);
  const lens = model!;
  writeFileSync(path.join(out, `${name}.png`), chartBytes(lensSvg(lens, prepareLens(lens, 'medium', 0), { ghost: 0 }), `${name}.png`));
  const shot = resolveShot(
    `version: 1
frame: { width: 960, height: 540, rate: 24, first: 1, last: 1 }
lights:
  - { name: lamp, position: [300, 150], intensity: 13, radius: 4, colour: { kelvin: 4800 } }
lens: { preset: ${name}, f_number: ${lens.fNumberMin} }
flare:
  glow: { fraction: 0.02, size: 4 }
  ghosts: { quality: medium }
  starburst: { fraction: 0.05, size: 20 }
output: { path: x.####.png }
`,
    path.join(root, 'pictures.yaml'),
    { readText: (p) => readFileSync(p, 'utf8'), presetNames, presetPath },
  );
  writeFileSync(path.join(out, `${name}-flare.png`), encodePng(renderFrame(shot, 1), { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
  const corner = /the corner gets\n# (\d+)%/.exec(text)?.[1];
  rows.push(`| \`${name}\` | ${lens.note.replace(/ \(straylight design\)$/, '')}; f = ${focalLength(lens).toFixed(0)} mm, f/${lens.fNumberMin} widest${corner ? `, corner ${corner}% of the centre's light wide open` : ''} | ![${name} in section](docs/images/lenses/${name}.png) | ![the flare of ${name}](docs/images/lenses/${name}-flare.png) |`);
}
console.log(rows.join('\n'));
