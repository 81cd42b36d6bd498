// The shot's `lens`: a preset, a lens file (its own document, its own located messages) or the
// lens keys inline, and the f-number keys.

import path from 'node:path';
import { whyNotReadable } from '../../errors.js';
import { LINEAR } from '../../timeline/easing.js';
import type { Key } from '../../timeline/track.js';
import { LENS_KEYS, parseLensText, readLens } from '../lens-file.js';
import type { Field } from '../source.js';
import type { ResolvedLens } from '../types.js';
import type { ResolveContext } from './context.js';
import { scalarKeys } from './keys.js';

export function resolveLens(ctx: ResolveContext, f: Field): ResolvedLens | undefined {
  const m = f.map('{preset: NAME}, {file: PATH}, or a lens description, with f_number');
  if (!m) return undefined;
  const presetField = m.get('preset');
  const fileField = m.get('file');
  const fnField = m.get('f_number');
  let model: ResolvedLens['model'] | undefined;
  let source = 'inline';
  const hasInline = LENS_KEYS.some((k) => m.has(k));
  if ([presetField, fileField, hasInline ? f : undefined].filter(Boolean).length > 1) {
    return f.error('a lens is a preset, a file, or described inline: give one of them');
  }
  if (presetField) {
    const name = presetField.string('a preset name');
    const names = ctx.reader.presetNames?.() ?? [];
    if (name !== undefined) {
      if (!names.includes(name)) {
        presetField.oneOf(names);
      } else {
        source = `preset ${name}`;
        model = resolveLensFile(ctx, presetField, ctx.reader.presetPath!(name), `lenses/${name}.yaml`);
      }
    }
  } else if (fileField) {
    const rel = fileField.string('a path to a lens file');
    if (rel !== undefined) {
      const abs = path.resolve(ctx.dir, rel);
      source = abs;
      model = resolveLensFile(ctx, fileField, abs, path.isAbsolute(rel) ? rel : path.join(ctx.shownDir, rel));
    }
  } else if (hasInline) {
    model = readLens(m, 'inline lens');
  } else {
    f.error('expected preset, file, or the lens keys (surfaces, ...)');
  }
  let fNumber: Key<number>[] | undefined;
  if (model) {
    const rule = { min: model.fNumberMin, max: 64 };
    fNumber = fnField ? scalarKeys(ctx, fnField, 'value', rule) : [{ frame: 0, value: model.fNumberMin, ease: LINEAR }];
  }
  m.finish();
  if (!model || !fNumber) return undefined;
  return { model, source, fNumber };
}

/** A lens in a file of its own: its own YAML document, its own located messages. */
export function resolveLensFile(ctx: ResolveContext, at: Field, abs: string, shown: string): ResolvedLens['model'] | undefined {
  let text: string;
  try {
    text = ctx.reader.readText(abs);
  } catch (e) {
    return at.error(`cannot read lens file ${abs}: ${whyNotReadable(e)}`);
  }
  const { model, diagnostics } = parseLensText(text, shown, path.basename(abs, '.yaml'));
  ctx.diagnostics.push(...diagnostics);
  return model;
}
