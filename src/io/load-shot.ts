// Reading a shot file from disk: the file-system edge of shot/resolve.

import { readFileSync, statSync } from 'node:fs';
import { InputError, ShotError, whyNotReadable } from '../errors.js';
import { checkMattes } from './matte-provider.js';
import { resolveShot } from '../shot/resolve.js';
import { presetNames, presetPath } from './presets.js';
import type { ResolvedShot } from '../shot/types.js';

/** Shot and track files larger than this are refused before parsing. */
export const MAX_INPUT_BYTES = 64 * 1024 * 1024;

export function readTextFile(file: string): string {
  const st = statSync(file);
  if (!st.isFile()) throw Object.assign(new Error(`${file} is not a file`), { code: 'EISDIR' });
  if (st.size > MAX_INPUT_BYTES) throw Object.assign(new Error(`${file} is larger than ${MAX_INPUT_BYTES} bytes`), { code: 'EFBIG' });
  return readFileSync(file, 'utf8');
}

export function loadShot(file: string): ResolvedShot {
  let text: string;
  try {
    text = readTextFile(file);
  } catch (e) {
    throw new InputError(`${file}: cannot read the shot file: ${whyNotReadable(e)}`);
  }
  if (text.includes('\u0000') || text.includes('\ufffd')) {
    throw new InputError(`${file}: not a text file (a YAML shot file was expected)`);
  }
  // messages name the shot as the user wrote it
  const shot = resolveShot(text, file, { readText: readTextFile, presetNames, presetPath });
  const problems = checkMattes(shot);
  if (problems.length) throw new ShotError(problems);
  return shot;
}
