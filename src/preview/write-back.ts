// Writing the page's element settings back into the shot file, only when the user asks. The file
// is edited as text at the places the yaml package's parse tree locates (each node's source
// range): a changed number is replaced where it stands, a missing key is added at the end of its
// map in that map's style (`, enabled: false` inside braces; a line at the map's indentation in a
// block), so every comment, blank line, quote and spacing of the rest of the file stays as it was.

import { isMap, isScalar, isSeq, parseDocument, type Node, type YAMLMap } from 'yaml';
import type { ElementName } from '../shot/types.js';
import type { ElementSetting } from './session.js';

/** A gain as written: six significant digits (a slider's 0.1 x 3 stays 0.3). */
const tidy = (v: number) => Number(v.toPrecision(6));

interface Edit {
  at: number;
  end: number;
  text: string;
}

/**
 * The shot file's text with each element's on/off and gain multiplier applied under `flare:`:
 * `enabled` is written where it differs from the file; a gain multiplier other than 1 multiplies a
 * written gain (a number, or every key's value) or becomes the gain. Returns the new text and the
 * keys it changed (`flare.glow.gain`, ...). Throws when the text is not a YAML map, or when the
 * place a setting goes is not a map.
 */
export function writeBack(text: string, settings: Partial<Record<ElementName, ElementSetting>>, fileEnabled: Partial<Record<ElementName, boolean>>): { text: string; changed: string[] } {
  const doc = parseDocument(text);
  if (doc.errors.length || !isMap(doc.contents)) throw new Error('the shot file is not a YAML map');
  const root = doc.contents as YAMLMap;
  const changed: string[] = [];
  const edits: Edit[] = [];
  /** elements whose map is missing: their keys, written as one flow map */
  const missing: [ElementName, [string, string][]][] = [];
  const flareNode = root.get('flare', true) as Node | undefined;
  if (flareNode !== undefined && flareNode !== null && !isMap(flareNode)) throw new Error('flare is not a mapping');
  const flare = flareNode as YAMLMap | undefined;
  for (const [name, s] of Object.entries(settings) as [ElementName, ElementSetting][]) {
    if (!s) continue;
    const el = flare?.get(name, true) as Node | undefined;
    if (el !== undefined && el !== null && !isMap(el)) throw new Error(`flare.${name} is not a mapping`);
    const map = el as YAMLMap | undefined;
    const add: [string, string][] = [];
    if (s.on !== (fileEnabled[name] ?? true)) {
      const at = map?.get('enabled', true);
      if (isScalar(at) && at.range) edits.push({ at: at.range[0], end: at.range[1], text: String(s.on) });
      else add.push(['enabled', String(s.on)]);
      changed.push(`flare.${name}.enabled`);
    }
    if (s.gain !== 1 && Number.isFinite(s.gain) && s.gain >= 0) {
      const gain = map?.get('gain', true);
      if (isScalar(gain) && typeof gain.value === 'number' && gain.range) edits.push({ at: gain.range[0], end: gain.range[1], text: String(tidy(gain.value * s.gain)) });
      else if (isSeq(gain)) {
        for (const k of gain.items) {
          const v = isMap(k) ? k.get('value', true) : undefined;
          if (isScalar(v) && typeof v.value === 'number' && v.range) edits.push({ at: v.range[0], end: v.range[1], text: String(tidy(v.value * s.gain)) });
        }
      } else add.push(['gain', String(tidy(s.gain))]);
      changed.push(`flare.${name}.gain`);
    }
    if (!add.length) continue;
    if (map) edits.push(insertKeys(text, map, add));
    else missing.push([name, add]);
  }
  if (missing.length) {
    const entries: [string, string][] = missing.map(([name, keys]) => [name, `{ ${keys.map(([k, v]) => `${k}: ${v}`).join(', ')} }`]);
    if (flare) edits.push(insertKeys(text, flare, entries));
    else edits.push(insertKeys(text, root, [['flare', `{ ${entries.map(([k, v]) => `${k}: ${v}`).join(', ')} }`]]));
  }
  if (!edits.length) return { text, changed };
  // apply from the end of the file, so earlier ranges stay where they were
  edits.sort((a, b) => b.at - a.at);
  let out = text;
  for (const e of edits) out = out.slice(0, e.at) + e.text + out.slice(e.end);
  return { text: out, changed };
}

/** The edit that adds `key: value` pairs at the end of a map, in its own style. */
function insertKeys(text: string, map: YAMLMap, pairs: [string, string][]): Edit {
  const range = map.range;
  if (!range) throw new Error('the shot file could not be located for writing');
  if (map.flow) {
    // before the closing brace, after the last pair
    const last = map.items.at(-1);
    const lastEnd = (last?.value as Node | null)?.range?.[1] ?? (last?.key as Node | null)?.range?.[1];
    const body = pairs.map(([k, v]) => `${k}: ${v}`).join(', ');
    if (lastEnd === undefined) {
      const open = text.indexOf('{', range[0]);
      return { at: open + 1, end: text.indexOf('}', open), text: ` ${body} ` };
    }
    return { at: lastEnd, end: lastEnd, text: `, ${body}` };
  }
  // a block map: a line at the indentation of its first key, after the line its last value ends on
  const firstKey = map.items[0]?.key as Node | null | undefined;
  const keyAt = firstKey?.range?.[0] ?? range[0];
  const indent = keyAt - (text.lastIndexOf('\n', keyAt - 1) + 1);
  const last = map.items.at(-1);
  const lastEnd = (last?.value as Node | null)?.range?.[1] ?? (last?.key as Node | null)?.range?.[1] ?? range[1];
  const lines = pairs.map(([k, v]) => `${' '.repeat(indent)}${k}: ${v}`).join('\n');
  // a nested block (a list of keys, a map) ends at the start of the next line
  if (lastEnd > 0 && text[lastEnd - 1] === '\n') return { at: lastEnd, end: lastEnd, text: `${lines}\n` };
  const nl = text.indexOf('\n', lastEnd);
  if (nl < 0) return { at: text.length, end: text.length, text: `\n${lines}\n` };
  return { at: nl, end: nl, text: `\n${lines}` };
}
