/**
 * YAML text → a small tree of maps, lists and scalars, each with its source position and its
 * path in the netlist. Guards run before and while parsing: a size limit, binary junk, a
 * nesting limit, YAML 1.2 core schema only, warnings (unknown tags) as errors, and aliases
 * refused outright so that an alias bomb never expands.
 */
import { isAlias, isMap, isPair, isScalar, isSeq, LineCounter, parseDocument } from 'yaml';
import type { Node as YamlNode, YAMLError } from 'yaml';
import type { Diagnostic } from '../diag/diagnostic.js';
import { fastYamlTree } from './fast-yaml.js';
import type { Pos, YamlTree, YEntry, YNode, YScalar } from './yaml-types.js';

import { MAX_SOURCE_BYTES, MAX_SOURCE_TEXT } from './limits.js';

export { MAX_SOURCE_BYTES };
/** Deepest nesting of maps and lists accepted (a netlist needs about 6). */
export const MAX_DEPTH = 32;

const BINARY = /[\x00-\x08\x0B\x0C\x0E-\x1F\x7F\uFFFD]/;

function lineColumn(source: string, offset: number): Pos {
  let line = 1;
  let start = 0;
  for (let i = source.indexOf('\n'); i !== -1 && i < offset; i = source.indexOf('\n', i + 1)) {
    line++;
    start = i + 1;
  }
  return { line, column: offset - start + 1 };
}

/**
 * Where a cheap upper estimate of nesting depth first exceeds `limit`, run before the YAML
 * parser (whose recursion would otherwise take seconds, then overflow, on a megabyte of `[`):
 * indentation levels plus list markers plus open flow brackets. Quotes are ignored; a false
 * alarm needs dozens of unbalanced brackets inside strings. Undefined when within the limit.
 */
function tooDeepAt(source: string, limit: number): number | undefined {
  const indents: number[] = [];
  let flow = 0;
  let offset = 0;
  for (const line of source.split('\n')) {
    const indent = line.length - line.trimStart().length;
    const body = line.slice(indent);
    if (body && !body.startsWith('#')) {
      if (flow === 0) {
        while (indents.length && indents[indents.length - 1] >= indent) indents.pop();
        indents.push(indent);
      }
      const markers = /^(?:[-?](?:\s+|$))*/.exec(body)?.[0].replace(/\s/g, '').length ?? 0;
      if (indents.length + markers + flow > limit) return offset + indent;
      for (let i = 0; i < body.length; i++) {
        const c = body[i];
        if (c === '#' && (i === 0 || /\s/.test(body[i - 1]))) break;
        if (c === '[' || c === '{') flow++;
        else if (c === ']' || c === '}') flow = Math.max(0, flow - 1);
        if (indents.length + markers + flow > limit) return offset + indent + i;
      }
    }
    offset += line.length + 1;
  }
  return undefined;
}

function diag(file: string, code: string, pos: Pos, message: string, hint: string, path: (string | number)[] = []): Diagnostic {
  return { code, severity: 'error', message, file, line: pos.line, column: pos.column, path, hint };
}

/** The first line of a yaml error message, without the position it repeats. */
function yamlMessage(e: YAMLError): string {
  const first = e.message.split('\n')[0];
  return first.replace(/ at line \d+, column \d+:?$/, '');
}

const YAML_HINTS: Record<string, string> = {
  DUPLICATE_KEY: 'each key may appear once in a mapping; remove or rename one',
  TAG_RESOLVE_FAILED: 'plenum reads plain YAML 1.2 (core schema); remove the tag',
  MULTIPLE_DOCS: 'a netlist is a single YAML document; remove the `---` separators',
  BAD_INDENT: 'check the indentation and that every `[` and `{` is closed',
  MISSING_CHAR: 'check the indentation and that every `[` and `{` is closed',
};

/**
 * Where an unterminated quoted string opens: the parser reports the end of the input, but
 * the quote that was never closed is the last unescaped one of its kind before that point.
 */
function openingQuote(source: string, e: YAMLError): number | undefined {
  const q = /Missing closing (["'])quote/.exec(e.message)?.[1];
  if (!q) return undefined;
  for (let i = Math.min(e.pos[0], source.length) - 1; i >= 0; i--) {
    if (source[i] === q && !(q === '"' && source[i - 1] === '\\')) return i;
  }
  return undefined;
}

function fromYamlError(file: string, e: YAMLError, warning: boolean, source: string): Diagnostic {
  const quote = openingQuote(source, e);
  const at = e.linePos?.[0];
  const pos = quote !== undefined ? lineColumn(source, quote) : at ? { line: at.line, column: at.col } : { line: 1, column: 1 };
  const code = e.code === 'DUPLICATE_KEY' ? 'duplicate-key' : e.code === 'TAG_RESOLVE_FAILED' || warning ? 'yaml-tag' : 'yaml-syntax';
  if (quote !== undefined) return diag(file, code, pos, `the quoted text opened here (\`${source[quote]}\`) is never closed`, 'close the quote on the same line');
  const hint = (Object.hasOwn(YAML_HINTS, e.code) ? YAML_HINTS[e.code] : undefined) ?? 'check the YAML syntax near here';
  return diag(file, code, pos, yamlMessage(e), hint);
}

function preflight(source: string, file: string): Diagnostic | undefined {
  const start = { line: 1, column: 1 };
  const bytes = source.length > MAX_SOURCE_BYTES ? source.length : Buffer.byteLength(source, 'utf8');
  if (bytes > MAX_SOURCE_BYTES) {
    return diag(file, 'input-too-large', start, `the netlist is ${bytes} bytes, more than the limit of ${MAX_SOURCE_TEXT}`, 'split the network or generate a smaller netlist');
  }
  const junk = BINARY.exec(source);
  if (junk) {
    const what = junk[0] === '\uFFFD' ? 'bytes that are not UTF-8' : `a control character (code ${junk[0].charCodeAt(0)})`;
    return diag(file, 'input-binary', lineColumn(source, junk.index), `the file contains ${what}; it does not look like a YAML netlist`, 'save the netlist as UTF-8 text');
  }
  const deep = tooDeepAt(source, MAX_DEPTH);
  if (deep !== undefined) {
    return diag(file, 'too-deep', lineColumn(source, deep), `the YAML is nested more than ${MAX_DEPTH} levels deep`, 'a netlist needs only a few levels of nesting');
  }
  return undefined;
}

class TreeBuilder {
  readonly diagnostics: Diagnostic[] = [];
  /** The first alias found (the one reported) and how many there are. */
  private firstAlias: Diagnostic | undefined;
  private firstAliasText = '';
  private aliases = 0;
  constructor(
    private readonly file: string,
    private readonly lines: LineCounter,
  ) {}

  private pos(offset: number | undefined): Pos {
    if (offset === undefined) return { line: 1, column: 1 };
    const p = this.lines.linePos(offset);
    return { line: p.line, column: p.col };
  }

  build(node: unknown, path: (string | number)[], depth: number, keyPos?: Pos): YNode {
    const range = (node as YamlNode | null)?.range;
    const pos = range ? this.pos(range[0]) : (keyPos ?? { line: 1, column: 1 });
    const empty: YScalar = { kind: 'scalar', value: null, empty: true, path, pos, keyPos };
    if (depth > MAX_DEPTH) {
      this.diagnostics.push(diag(this.file, 'too-deep', pos, `the YAML is nested more than ${MAX_DEPTH} levels deep`, 'a netlist needs only a few levels of nesting', path));
      return empty;
    }
    if (node === null || node === undefined) return empty;
    if (isAlias(node)) {
      // One diagnostic for all aliases, with a count: a bomb has thousands.
      if (this.aliases++ === 0) {
        this.firstAliasText = `YAML aliases (\`*${node.source}\`) are not allowed in a netlist`;
        this.firstAlias = diag(this.file, 'yaml-alias', pos, this.firstAliasText, 'write the value out in full', path);
        this.diagnostics.push(this.firstAlias);
      } else if (this.firstAlias) {
        this.firstAlias.message = `${this.firstAliasText} (and ${this.aliases - 1} more)`;
      }
      return empty;
    }
    if (isScalar(node)) {
      const isEmpty = node.value === null && (range == null || range[0] === range[1]);
      return { kind: 'scalar', value: node.value, empty: isEmpty, path, pos: isEmpty && keyPos ? keyPos : pos, keyPos };
    }
    if (isSeq(node)) {
      const items = node.items.map((item, i) => this.build(item, [...path, i], depth + 1));
      return { kind: 'seq', items, path, pos, keyPos };
    }
    if (isMap(node)) {
      const entries: YEntry[] = [];
      // Duplicate keys are found here with a set (the parser's own check is pairwise, quadratic
      // in the size of a map: seconds for a netlist with ten thousand chambers).
      const seen = new Set<unknown>();
      for (const pair of node.items) {
        if (!isPair(pair)) continue;
        const key = pair.key;
        const kpos = this.pos((key as YamlNode | null)?.range?.[0]);
        if (!isScalar(key) || key.value === null || typeof key.value === 'object') {
          this.diagnostics.push(diag(this.file, 'yaml-complex-key', kpos, 'a key must be a plain name', 'write `name: value`', path));
          continue;
        }
        if (seen.has(key.value)) {
          this.diagnostics.push(diag(this.file, 'duplicate-key', kpos, 'Map keys must be unique', YAML_HINTS.DUPLICATE_KEY));
        }
        seen.add(key.value);
        const name = String(key.value);
        entries.push({ key: name, keyPos: kpos, value: this.build(pair.value, [...path, name], depth + 1, kpos) });
      }
      return { kind: 'map', entries, path, pos, keyPos };
    }
    this.diagnostics.push(diag(this.file, 'yaml-syntax', pos, 'unsupported YAML node', 'use plain maps, lists and scalars', path));
    return empty;
  }
}

/**
 * Parses a netlist's YAML. Returns the tree when it is usable (duplicate keys and unknown tags
 * are reported but do not hide the rest), and every problem found. `fast = false` skips the fast
 * path (for tests comparing the two).
 */
export function parseYamlTree(source: string, file: string, fast = true): YamlTree {
  const refused = preflight(source, file);
  if (refused) return { diagnostics: [refused] };
  // Plain netlists take the fast path (the same tree, ten times sooner; fast-yaml.ts); anything
  // else, and every text with a problem, is read by the yaml package below.
  if (fast) {
    const quick = fastYamlTree(source);
    if (quick) return quick;
  }
  const lines = new LineCounter();
  const doc = parseDocument(source, {
    lineCounter: lines,
    uniqueKeys: false, // checked in TreeBuilder, in linear time
    prettyErrors: true,
    version: '1.2',
    schema: 'core',
    merge: false,
    resolveKnownTags: false,
  });
  const diagnostics: Diagnostic[] = [];
  let exhausted = false;
  for (const e of doc.errors) {
    if (e.code === 'RESOURCE_EXHAUSTION') {
      if (!exhausted) diagnostics.push(diag(file, 'too-deep', { line: e.linePos?.[0].line ?? 1, column: e.linePos?.[0].col ?? 1 }, 'the YAML is nested too deeply to read', 'a netlist needs only a few levels of nesting'));
      exhausted = true;
    } else diagnostics.push(fromYamlError(file, e, false, source));
  }
  for (const w of doc.warnings) diagnostics.push(fromYamlError(file, w, true, source));
  const fatal = doc.errors.some((e) => e.code !== 'DUPLICATE_KEY');
  if (fatal) return { diagnostics };
  if (doc.contents === null || doc.contents === undefined) {
    diagnostics.push(diag(file, 'empty-netlist', { line: 1, column: 1 }, 'the netlist is empty', 'start with `format: 1`, then `chambers:` and `simulate:`'));
    return { diagnostics };
  }
  const builder = new TreeBuilder(file, lines);
  const root = builder.build(doc.contents, [], 0);
  diagnostics.push(...builder.diagnostics);
  return { root, diagnostics };
}
