// A lens from a preset name or a lens file, for `straylight lens`.

import { existsSync } from 'node:fs';
import { parse } from 'yaml';
import { InputError, ShotError, whyNotReadable } from '../errors.js';
import type { LensModel } from '../optics/lens.js';
import { parseLensText } from '../shot/lens-file.js';
import { closest } from '../shot/suggest.js';
import { readTextFile } from './load-shot.js';
import { presetNames, presetPath } from './presets.js';

export function loadLens(nameOrFile: string): { lens: LensModel; source: string } {
  const presets = presetNames();
  const isPreset = presets.includes(nameOrFile);
  if (!isPreset && !existsSync(nameOrFile)) {
    const hint = closest(nameOrFile, presets);
    throw new InputError(`${nameOrFile}: not a preset lens or a lens file${hint ? ` (did you mean "${hint}"?)` : ''}; presets: ${presets.join(', ')}`);
  }
  const file = isPreset ? presetPath(nameOrFile) : nameOrFile;
  let text: string;
  try {
    text = readTextFile(file);
  } catch (e) {
    throw new InputError(`${file}: cannot read the lens file: ${whyNotReadable(e)}`);
  }
  const shown = isPreset ? `lenses/${nameOrFile}.yaml` : nameOrFile;
  const { model, diagnostics } = parseLensText(text, shown, nameOrFile.replace(/\.ya?ml$/, ''));
  if (!model) throw new ShotError(diagnostics);
  return { lens: model, source: isPreset ? 'preset' : 'file' };
}

/**
 * Whether a file is a lens file rather than a shot: a YAML mapping with `surfaces` and neither
 * `frame` nor `lights`. Anything unreadable is not (the shot loader then says what is wrong).
 */
export function looksLikeLensFile(file: string): boolean {
  try {
    const doc = parse(readTextFile(file), { maxAliasCount: 100 }) as unknown;
    return typeof doc === 'object' && doc !== null && 'surfaces' in doc && !('frame' in doc) && !('lights' in doc);
  } catch {
    return false;
  }
}
