// Folder creation fails cleanly where Node's recursive mkdir spins forever: under procfs, which
// answers ENOENT for children of an existing folder, and through a dangling symlink.

import { existsSync, symlinkSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ensureDir } from '../../src/io/ensure-dir.js';
import { tempDir } from '../helpers.js';

const code = (fn: () => void) => {
  try {
    fn();
    return 'ok';
  } catch (e) {
    return (e as NodeJS.ErrnoException).code;
  }
};

describe('ensureDir', () => {
  it('makes every missing level', () => {
    const d = path.join(tempDir(), 'a', 'b', 'c');
    ensureDir(d);
    expect(existsSync(d)).toBe(true);
    ensureDir(d); // and is happy when it exists
  });
  it('fails with ENOENT under /proc instead of looping', () => {
    expect(code(() => ensureDir('/proc/straylight-no-such/frames'))).toBe('ENOENT');
  });
  it('fails with ENOENT through a dangling symlink', () => {
    const d = tempDir();
    symlinkSync(path.join(d, 'gone'), path.join(d, 'link'));
    expect(code(() => ensureDir(path.join(d, 'link', 'frames')))).toBe('ENOENT');
  });
  it('fails with ENOTDIR when a file stands in the way', () => {
    const d = tempDir();
    writeFileSync(path.join(d, 'file'), '');
    expect(code(() => ensureDir(path.join(d, 'file', 'frames')))).toBe('ENOTDIR');
  });
});
