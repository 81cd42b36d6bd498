// Create a folder and its missing parents, failing cleanly. Node's mkdir {recursive: true} never
// returns when a parent exists but cannot hold children and mkdir answers ENOENT (a path under
// /proc, a dangling symlink): it retries forever. Here each missing level is made once, top down,
// and the first real error is thrown.

import { mkdirSync, statSync } from 'node:fs';
import path from 'node:path';

export function ensureDir(dir: string): void {
  const missing: string[] = [];
  let d = path.resolve(dir);
  for (;;) {
    try {
      if (!statSync(d).isDirectory()) {
        throw Object.assign(new Error(`ENOTDIR: not a folder: ${d}`), { code: 'ENOTDIR', path: d });
      }
      break;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
      missing.push(d);
      const parent = path.dirname(d);
      if (parent === d) throw e;
      d = parent;
    }
  }
  for (const m of missing.reverse()) {
    try {
      mkdirSync(m);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
    }
  }
}
