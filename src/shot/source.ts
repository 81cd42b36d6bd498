// YAML text -> document with source locations, and a field reader that collects every problem.
//
// Reading a document declares which keys exist: what is left unread is an unknown key, reported
// with a "did you mean" hint (the way a scene parser reports unused parameters).

import { Document, LineCounter, isAlias, isMap, isScalar, isSeq, parseDocument } from 'yaml';
import type { Node as YamlNode, Pair, Scalar } from 'yaml';
import type { Diagnostic, SourceLoc } from '../errors.js';
import { closest } from './suggest.js';

/** Largest number of nodes a document may expand to through aliases (guards alias bombs). */
export const MAX_EXPANDED_NODES = 200_000;

/** Deepest nesting of collections accepted (a shot needs under ten; the YAML parser recurses). */
export const MAX_NESTING = 64;

/**
 * Where a document first nests deeper than `max` (flow brackets, or block indentation levels),
 * found by a scan of the text before the parser recurses into it. Quoted strings and comments are
 * skipped; the count is an upper bound of the parser's own nesting, good enough to refuse a
 * pathological file with a real location.
 */
export function tooDeep(text: string, max: number): { line: number; col: number } | undefined {
  const indents: number[] = [];
  let flow = 0;
  let quote = '';
  let line = 1;
  let lineStart = 0;
  let atLineStart = true;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '\n') {
      line++;
      lineStart = i + 1;
      atLineStart = true;
      if (quote === "'" || quote === '"') continue;
      quote = '';
      continue;
    }
    if (quote === '#') continue;
    if (quote) {
      if (ch === '\\' && quote === '"') i++;
      else if (ch === quote) quote = '';
      continue;
    }
    if (atLineStart && ch !== ' ') {
      atLineStart = false;
      if (ch !== '#' && flow === 0) {
        const indent = i - lineStart;
        while (indents.length && indents[indents.length - 1] >= indent) indents.pop();
        indents.push(indent);
        // a "- " item opens one more level at the same indentation
        let k = i;
        let extra = 0;
        while (text[k] === '-' && (text[k + 1] === ' ' || text[k + 1] === '\n')) {
          extra++;
          k += 2;
          while (text[k] === ' ') k++;
        }
        if (indents.length + extra > max) return { line, col: indent + 1 };
      }
    }
    if (ch === '#' && (i === 0 || /\s/.test(text[i - 1]))) quote = '#';
    else if (ch === '"' || ch === "'") quote = ch;
    else if (ch === '[' || ch === '{') {
      flow++;
      if (flow + indents.length > max) return { line, col: i - lineStart + 1 };
    } else if (ch === ']' || ch === '}') flow = Math.max(0, flow - 1);
  }
  return undefined;
}

export interface SourceContext {
  file: string;
  lines: LineCounter;
  doc: Document;
  diagnostics: Diagnostic[];
}

/** Parse YAML text; syntax errors become diagnostics and the root field is undefined. */
export function parseYamlSource(
  text: string,
  file: string,
): { ctx: SourceContext; root: Field | undefined } {
  const lines = new LineCounter();
  const deep = tooDeep(text, MAX_NESTING);
  if (deep) {
    const diagnostics = [{ loc: { file, ...deep }, path: '', message: `the document nests deeper than ${MAX_NESTING} levels here (a shot needs fewer than 10); refusing it` }];
    return { ctx: { file, lines, doc: new Document(), diagnostics }, root: undefined };
  }
  const doc = parseDocument(text, { lineCounter: lines, uniqueKeys: true, prettyErrors: false });
  const ctx: SourceContext = { file, lines, doc, diagnostics: [] };
  const seen = new Set<string>();
  // the first slip only: after it the parser is lost and reports the rest of the line (and the
  // lines after) as a cascade of errors of its own; a key given twice stands alone, and is kept
  const errors = [...doc.errors].sort((x, y) => (x.pos?.[0] ?? 0) - (y.pos?.[0] ?? 0));
  const first = errors.find((e) => e.code !== 'DUPLICATE_KEY');
  for (const e of errors) {
    if (e !== first && e.code !== 'DUPLICATE_KEY') continue;
    // one message a place: the parser often reports one slip several ways at the same spot
    const pos = e.pos ? lines.linePos(e.pos[0]) : { line: 1, col: 1 };
    if (seen.has(`${pos.line}:${pos.col}`)) continue;
    seen.add(`${pos.line}:${pos.col}`);
    ctx.diagnostics.push({
      loc: { file, line: pos.line, col: pos.col },
      path: '',
      message: `YAML syntax: ${yamlProblem(e.code)}`,
    });
  }
  if (ctx.diagnostics.length > 0) return { ctx, root: undefined };
  if (doc.contents === null) {
    ctx.diagnostics.push({ loc: { file, line: 1, col: 1 }, path: '', message: 'the file is empty' });
    return { ctx, root: undefined };
  }
  const size = expandedSize(doc.contents as YamlNode, doc, MAX_EXPANDED_NODES);
  if (size > MAX_EXPANDED_NODES) {
    ctx.diagnostics.push({
      loc: { file, line: 1, col: 1 },
      path: '',
      message: `aliases expand the document to more than ${MAX_EXPANDED_NODES} nodes; refusing it (an alias bomb?)`,
    });
    return { ctx, root: undefined };
  }
  return { ctx, root: new Field(ctx, doc.contents as YamlNode, '') };
}

/** The YAML parser's error codes in our words (the parser's own sentences never reach a user). */
const YAML_PROBLEMS: Record<string, string> = {
  MISSING_CHAR: 'a [ ], { } or quoted string is not closed (or not indented under its key)',
  BAD_INDENT: 'the indentation here does not line up with the lines around it (or a [ ] or { } before it is not closed)',
  TAB_AS_INDENT: 'a tab is used for indentation; indent with spaces',
  DUPLICATE_KEY: 'this key appears twice in one mapping',
  BLOCK_AS_IMPLICIT_KEY: 'a key cannot hold a nested block here (a missing colon, or a value on the wrong line?)',
  MULTILINE_IMPLICIT_KEY: 'a key runs over more than one line (a missing colon or quote?)',
  UNEXPECTED_TOKEN: 'unexpected text here (a missing colon or comma, or a stray character?)',
  BLOCK_IN_FLOW: 'an indented block inside [ ] or { }; write it inline or drop the brackets',
  BAD_SCALAR_START: 'a value cannot start with this character; put it in quotes',
  BAD_DQ_ESCAPE: 'an unknown backslash escape in a double-quoted string',
  MULTIPLE_DOCS: 'more than one document (---) in one file',
  BAD_ALIAS: 'an alias (*name) with no anchor (&name) before it',
  ALIAS_PROPS: 'an alias (*name) cannot carry a tag or anchor',
  MULTIPLE_ANCHORS: 'two anchors (&name) on one value',
  MULTIPLE_TAGS: 'two tags (!tag) on one value',
  NON_STRING_KEY: 'a key must be a plain word or string',
};

function yamlProblem(code: string): string {
  return YAML_PROBLEMS[code] ?? 'this is not valid YAML here';
}

/** Node count after alias expansion, memoised per anchored node so the count itself is linear. */
function expandedSize(root: YamlNode, doc: Document, cap: number): number {
  const memo = new Map<unknown, number>();
  const visit = (node: unknown, depth: number): number => {
    if (depth > 200) return cap + 1;
    if (isAlias(node)) {
      const target = node.resolve(doc);
      if (!target) return 1;
      return visit(target, depth + 1);
    }
    const known = memo.get(node);
    if (known !== undefined) return known;
    let n = 1;
    if (isMap(node) || isSeq(node)) {
      for (const item of node.items as unknown[]) {
        if (isScalar(item) || isMap(item) || isSeq(item) || isAlias(item)) n += visit(item, depth + 1);
        else {
          const pair = item as Pair;
          n += visit(pair.key, depth + 1) + visit(pair.value, depth + 1);
        }
        if (n > cap) break;
      }
    }
    memo.set(node, n);
    return n;
  };
  return visit(root, 0);
}

/** A value in the document, its key path, and where it came from. */
export class Field {
  readonly node: YamlNode | null;

  constructor(
    readonly ctx: SourceContext,
    node: YamlNode | null,
    readonly path: string,
    private readonly fallbackLoc?: SourceLoc,
  ) {
    this.node = isAlias(node) ? ((node.resolve(ctx.doc) as YamlNode | undefined) ?? null) : node;
  }

  get loc(): SourceLoc {
    const start = this.node?.range?.[0];
    if (start === undefined) return this.fallbackLoc ?? { file: this.ctx.file, line: 1, col: 1 };
    const { line, col } = this.ctx.lines.linePos(start);
    return { file: this.ctx.file, line, col };
  }

  error(message: string): undefined {
    this.ctx.diagnostics.push({ loc: this.loc, path: this.path, message });
    return undefined;
  }

  /** Report "expected X, found Y" at this field. */
  expected(what: string): undefined {
    return this.error(`expected ${what}, found ${this.describe()}`);
  }

  /** How the value reads to a user, for "found ..." messages. */
  describe(): string {
    const n = this.node;
    if (n === null || (isScalar(n) && n.value === null)) return 'nothing';
    if (isMap(n)) return 'a mapping';
    if (isSeq(n)) return 'a list';
    if (isScalar(n)) {
      const v = n.value;
      if (typeof v === 'string') return JSON.stringify(v.length > 60 ? `${v.slice(0, 57)}...` : v);
      return String(v);
    }
    return 'an unsupported YAML value';
  }

  get scalar(): unknown {
    return isScalar(this.node) ? (this.node as Scalar).value : undefined;
  }

  isMap(): boolean {
    return isMap(this.node);
  }

  isSeq(): boolean {
    return isSeq(this.node);
  }

  isNumber(): boolean {
    return typeof this.scalar === 'number';
  }

  isString(): boolean {
    return typeof this.scalar === 'string';
  }

  map(expectedWhat = 'a mapping'): MapField | undefined {
    if (!isMap(this.node)) return this.expected(expectedWhat);
    return new MapField(this);
  }

  list(expectedWhat = 'a list'): Field[] | undefined {
    if (!isSeq(this.node)) return this.expected(expectedWhat);
    return this.node.items.map(
      (item, i) => new Field(this.ctx, item as YamlNode, `${this.path}[${i}]`, this.loc),
    );
  }

  /** A finite number within [min, max]; `integer` demands a whole number. */
  number(opts: NumberRule = {}): number | undefined {
    const v = this.scalar;
    const what = describeRule(opts);
    if (typeof v !== 'number') return this.expected(what);
    if (!Number.isFinite(v)) return this.expected(what);
    if (opts.integer && !Number.isInteger(v)) return this.expected(what);
    if (opts.min !== undefined && (opts.minExclusive ? v <= opts.min : v < opts.min)) return this.expected(what);
    if (opts.max !== undefined && v > opts.max) return this.expected(what);
    return v;
  }

  string(what = 'a string'): string | undefined {
    const v = this.scalar;
    if (typeof v !== 'string' || v.length === 0) return this.expected(what);
    return v;
  }

  /** One of a fixed set of words, with a hint for a near miss. */
  oneOf<T extends string>(choices: readonly T[]): T | undefined {
    const v = this.scalar;
    const what = `one of ${choices.join(', ')}`;
    if (typeof v !== 'string') return this.expected(what);
    if ((choices as readonly string[]).includes(v)) return v as T;
    const hint = closest(v, choices);
    return this.error(`expected ${what}, found ${JSON.stringify(v)}${hint ? ` (did you mean "${hint}"?)` : ''}`);
  }

  /** A list of exactly n numbers, each checked by the rule. */
  numbers(n: number, rule: NumberRule = {}): number[] | undefined {
    const what = `a list of ${n} numbers`;
    if (!isSeq(this.node)) return this.expected(what);
    const items = this.list()!;
    if (items.length !== n) return this.error(`expected ${what}, found a list of ${items.length}`);
    const out = items.map((f) => f.number(rule));
    return out.every((x) => x !== undefined) ? (out as number[]) : undefined;
  }
}

export interface NumberRule {
  min?: number;
  max?: number;
  /** min itself is not allowed */
  minExclusive?: boolean;
  integer?: boolean;
}

function describeRule(r: NumberRule): string {
  const noun = r.integer ? 'a whole number' : 'a number';
  if (r.min !== undefined && r.max !== undefined) {
    return r.minExclusive ? `${noun} above ${r.min} and at most ${r.max}` : `${noun} from ${r.min} to ${r.max}`;
  }
  if (r.min !== undefined) return r.minExclusive ? `${noun} above ${r.min}` : `${noun} of at least ${r.min}`;
  if (r.max !== undefined) return `${noun} of at most ${r.max}`;
  return noun;
}

/** A mapping whose keys are declared as they are read; `finish` reports the rest. */
export class MapField {
  private readonly entries = new Map<string, { key: YamlNode; value: YamlNode | null }>();
  private readonly declared = new Set<string>();

  constructor(readonly field: Field) {
    for (const pair of (field.node as unknown as { items: Pair[] }).items) {
      const k = isScalar(pair.key) ? String((pair.key as Scalar).value) : String(pair.key);
      this.entries.set(k, { key: pair.key as YamlNode, value: (pair.value as YamlNode | null) ?? null });
    }
  }

  private childPath(key: string): string {
    return this.field.path ? `${this.field.path}.${key}` : key;
  }

  /** Every key present, in file order (each is declared by reading it with get). */
  keys(): string[] {
    return [...this.entries.keys()];
  }

  /** The key itself as a field (for problems with the key's own text, such as a ghost's name). */
  keyField(key: string): Field | undefined {
    const e = this.entries.get(key);
    return e ? new Field(this.field.ctx, e.key, this.childPath(key)) : undefined;
  }

  has(key: string): boolean {
    this.declared.add(key);
    return this.entries.has(key);
  }

  get(key: string): Field | undefined {
    this.declared.add(key);
    const e = this.entries.get(key);
    if (!e) return undefined;
    const keyLoc = new Field(this.field.ctx, e.key, '').loc;
    return new Field(this.field.ctx, e.value, this.childPath(key), keyLoc);
  }

  /** A key that must be present; its absence is reported by finish(). */
  require(key: string, what: string): Field | undefined {
    const f = this.get(key);
    if (!f) this.missing.set(key, what);
    return f;
  }

  private readonly missing = new Map<string, string>();

  /** Record a key as missing (for keys whose need depends on others); reported by finish(). */
  reportMissing(key: string, what: string): void {
    this.declared.add(key);
    this.missing.set(key, what);
  }

  /**
   * Report keys that were never declared, each with a hint when one is close, and required keys
   * that are absent (unless a misspelt key already points at them).
   */
  finish(): void {
    const hinted = new Set<string>();
    for (const [key, e] of this.entries) {
      if (this.declared.has(key)) continue;
      const hint = closest(key, this.declared);
      const keyField = new Field(this.field.ctx, e.key, this.childPath(key));
      if (hint) {
        hinted.add(hint);
        keyField.error(`unknown key "${key}" (did you mean "${hint}"?)`);
      } else {
        keyField.error(`unknown key "${key}"; known keys here: ${[...this.declared].join(', ')}`);
      }
    }
    for (const [key, what] of this.missing) {
      if (!hinted.has(key)) this.field.error(what.startsWith('"') ? `missing key ${what}` : `missing key "${key}" (${what})`);
    }
  }
}
