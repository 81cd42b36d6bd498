// Writing what a command makes (a still, a sheet, a plot, a report, a sequence's folder), with
// failures said in our words: one line naming the file and the reason, as an OutputError
// (exit 4), never a library's message or a stack trace.

import { rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { OutputError } from '../errors.js';
import { tempPathFor, writeFileAtomic } from './atomic-write.js';
import { ensureDir } from './ensure-dir.js';

/** A file-system error code in plain words. */
export function whyNotWritable(e: unknown): string {
  const err = e as NodeJS.ErrnoException;
  switch (err.code) {
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EROFS':
      return 'the file system is read-only';
    case 'ENOTDIR':
      return 'a part of the path is a file, not a folder';
    case 'ENOENT':
      return 'a folder cannot be made there';
    case 'EISDIR':
      return 'a folder has that name';
    case 'ENOSPC':
      return 'no space left on the device';
    case 'EDQUOT':
      return 'the disk quota is used up';
    case 'ENAMETOOLONG':
      return 'the name is too long';
    case 'EEXIST':
      return 'something else has that name';
    default:
      return err.code ? `the system refused it (${err.code})` : 'the system refused it';
  }
}

/**
 * Make sure files can be written in `folder` (made if missing): a probe file is written and
 * removed, so a read-only mount or a /proc path is found before any work starts.
 */
export function checkWritableFolder(folder: string, what = 'the output folder'): void {
  try {
    ensureDir(folder);
    const probe = tempPathFor(path.join(folder, 'straylight-probe'));
    writeFileSync(probe, '');
    rmSync(probe, { force: true });
  } catch (e) {
    throw new OutputError(`cannot write to ${what} ${folder}: ${whyNotWritable(e)}`);
  }
}

/** Write a whole file atomically; failure is an OutputError naming the file. */
export function writeOutputFile(file: string, data: Uint8Array): void {
  try {
    writeFileAtomic(file, data);
  } catch (e) {
    throw new OutputError(`cannot write ${file}: ${whyNotWritable(e)}`);
  }
}
