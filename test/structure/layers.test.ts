// The source tree's shape: every import points down the pipeline's layers (never from a lower
// folder to a higher one, never between two folders of one layer), no two modules import each
// other in a circle, and no source file grows past the size a reader can hold (DEVELOPERS.md,
// "Layout"). Read from the files themselves, so a new arrow upwards fails here.

import { mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { tempDir } from '../helpers.js';

const SRC = path.resolve(import.meta.dirname, '../../src');

/** Each top-level folder (or file) of src/ and its layer; a module may import only lower layers or its own folder. */
const LAYER: Record<string, number> = {
  errors: 0,
  version: 0,
  colour: 1,
  timeline: 1,
  format: 1,
  raster: 1,
  safety: 2,
  optics: 2,
  scene: 2,
  plot: 3,
  shot: 3,
  occlusion: 3,
  elements: 3,
  plate: 3,
  io: 4,
  render: 5,
  review: 6,
  farm: 6,
  preview: 7,
  cli: 8,
  index: 9,
};

/** Files allowed past MAX_LINES, each with its reason. */
const LONG_FILES: Record<string, string> = {
  'format/exr-read.ts': 'one decoder: the OpenEXR header, its five compressions and PIZ Huffman + wavelet, kept in one reading order',
};
const MAX_LINES = 450;

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? sourceFiles(p) : p.endsWith('.ts') ? [p] : [];
  });
}

/** Relative imports of a module (static, re-exports and dynamic), as absolute .ts paths. */
function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const out: string[] = [];
  for (const m of text.matchAll(/(?:from\s+|import\s*\(\s*)'(\.{1,2}\/[^']+)'/g)) {
    out.push(path.resolve(path.dirname(file), m[1]).replace(/\.js$/, '.ts'));
  }
  return out;
}

const topOf = (root: string, file: string) => path.relative(root, file).split(path.sep)[0].replace(/\.ts$/, '');

/** Imports from a folder to one of the same or a higher layer, as "from -> to". */
function upwardImports(root: string): string[] {
  const upward: string[] = [];
  for (const f of sourceFiles(root)) {
    for (const target of importsOf(f)) {
      const a = topOf(root, f);
      const b = topOf(root, target);
      if (a !== b && LAYER[b] >= LAYER[a]) upward.push(`${path.relative(root, f)} -> ${path.relative(root, target)}`);
    }
  }
  return upward;
}

/** Import cycles between modules, each as "a -> b -> ... -> a". */
function importCycles(root: string): string[] {
  const files = sourceFiles(root);
  const graph = new Map(files.map((f) => [f, importsOf(f).filter((t) => files.includes(t))]));
  const state = new Map<string, 'open' | 'done'>();
  const cycles: string[] = [];
  const visit = (f: string, trail: string[]) => {
    if (state.get(f) === 'done') return;
    if (state.get(f) === 'open') {
      cycles.push([...trail.slice(trail.indexOf(f)), f].map((x) => path.relative(root, x)).join(' -> '));
      return;
    }
    state.set(f, 'open');
    for (const t of graph.get(f)!) visit(t, [...trail, f]);
    state.set(f, 'done');
  };
  for (const f of files) visit(f, []);
  return cycles;
}

const files = sourceFiles(SRC);

describe('source layout', () => {
  it('knows the layer of every top-level folder of src/', () => {
    const unknown = [...new Set(files.map((f) => topOf(SRC, f)))].filter((t) => !(t in LAYER));
    expect(unknown).toEqual([]);
  });

  it('has every import pointing to a lower layer or within its own folder', () => {
    expect(upwardImports(SRC)).toEqual([]);
  });

  it('has no import cycle between modules', () => {
    expect(importCycles(SRC)).toEqual([]);
  });

  it(`keeps every source file under ${MAX_LINES} lines, or names why not`, () => {
    const long = files
      .map((f) => ({ file: path.relative(SRC, f), lines: readFileSync(f, 'utf8').split('\n').length }))
      .filter((x) => x.lines > MAX_LINES && !(x.file in LONG_FILES))
      .map((x) => `${x.file}: ${x.lines} lines`);
    expect(long).toEqual([]);
  });

  it('finds an upward import, an import between folders of one layer, and a cycle in a made-up tree', () => {
    const root = tempDir();
    const put = (rel: string, text: string) => {
      mkdirSync(path.dirname(path.join(root, rel)), { recursive: true });
      writeFileSync(path.join(root, rel), text);
    };
    put('shot/a.ts', "import { b } from '../io/b.js';\nexport const a = b;\n");
    put('io/b.ts', 'export const b = 1;\n');
    put('elements/c.ts', "export { d } from '../occlusion/d.js';\n");
    put('occlusion/d.ts', "export const d = 1;\n");
    put('render/e.ts', "import { f } from './f.js';\nexport const e = f;\n");
    put('render/f.ts', "const g = () => import('./e.js');\nexport const f = g;\n");
    expect(upwardImports(root)).toEqual([`elements${path.sep}c.ts -> occlusion${path.sep}d.ts`, `shot${path.sep}a.ts -> io${path.sep}b.ts`]);
    expect(importCycles(root)).toEqual([`render${path.sep}e.ts -> render${path.sep}f.ts -> render${path.sep}e.ts`]);
  });
});
