// Atomic file writes: write a temporary file beside the target, flush it, rename it over the
// target. A reader (or a crash) never sees a half-written file under a final frame name.

import { closeSync, fsyncSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import path from 'node:path';
import { ensureDir } from './ensure-dir.js';

let counter = 0;

/** Name of the temporary file for a target: hidden, in the same folder, unique to this process. */
export function tempPathFor(target: string): string {
  const dir = path.dirname(target);
  return path.join(dir, `.${path.basename(target)}.${process.pid}.${counter++}.tmp`);
}

export function writeFileAtomic(target: string, data: Uint8Array): void {
  ensureDir(path.dirname(target));
  const tmp = tempPathFor(target);
  let fd: number | undefined;
  try {
    fd = openSync(tmp, 'w', 0o644);
    let off = 0;
    while (off < data.length) off += writeSync(fd, data, off, data.length - off);
    fsyncSync(fd);
    closeSync(fd);
    fd = undefined;
    renameSync(tmp, target);
  } catch (e) {
    if (fd !== undefined) closeSync(fd);
    rmSync(tmp, { force: true });
    throw e;
  }
}
