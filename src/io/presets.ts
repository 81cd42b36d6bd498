// The preset lenses shipped in the package's lenses/ folder.

import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** The package's lenses/ folder, found by walking up from this module (src/ or dist/src/). */
export function presetsDir(): string {
  let dir = path.dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 6; i++) {
    const candidate = path.join(dir, 'lenses');
    if (existsSync(path.join(dir, 'package.json')) && existsSync(candidate)) return candidate;
    dir = path.dirname(dir);
  }
  throw new Error('cannot find the lenses/ folder of the straylight package');
}

export function presetNames(): string[] {
  return readdirSync(presetsDir())
    .filter((f) => f.endsWith('.yaml'))
    .map((f) => f.slice(0, -5))
    .sort();
}

export function presetPath(name: string): string {
  return path.join(presetsDir(), `${name}.yaml`);
}
