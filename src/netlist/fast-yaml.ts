/**
 * A fast reader for the plain YAML that netlists are written in, producing exactly the tree
 * that the general path (the yaml package + TreeBuilder in yaml-tree.ts) produces: the same
 * nodes, values, paths and positions. It exists for speed: the yaml package reads about half a
 * megabyte a second, seconds for a netlist of ten thousand chambers, where this takes a tenth of
 * that.
 *
 * It accepts only a conservative subset and returns undefined for anything else, so that the
 * general path reads it (and reports any error with its own words and positions):
 * - block mappings whose keys are plain names (letters, digits, `_`, `-`; not a word that YAML
 *   reads as a boolean or null), `key: value` with one space or more after the colon;
 * - block sequences (`- item`), whose items are one-line values or block mappings started on
 *   the dash line (`- name: x` with further keys below, aligned with `name`);
 * - one-line flow mappings and sequences (`{ a: 1, b: [x, y] }`), nested, without trailing commas
 *   or empty values;
 * - plain scalars resolved by the YAML 1.2 core schema (null, booleans, integers in decimal,
 *   0o and 0x, floats, .inf and .nan), single-quoted scalars, double-quoted ones without
 *   backslash escapes;
 * - comments, blank lines, spaces (no tabs, no carriage returns).
 * Anything else (anchors, aliases, tags, block scalars, multi-line flow collections or plain
 * scalars, document markers, directives, `?` keys, duplicate keys, deep nesting) falls back.
 * `test/netlist/fast-yaml.test.ts` checks the tree against the general path on every netlist in
 * the repository and on thousands of random edits of them.
 *
 * References: YAML 1.2.2 specification (2021), §7.3.3 (plain scalars), §7.4 (flow collections),
 * §8.2 (block collections), §10.3 (core schema).
 */
import type { Diagnostic } from '../diag/diagnostic.js';
import type { Pos, YamlTree, YEntry, YMap, YNode, YScalar, YSeq } from './yaml-types.js';

/** Deeper than this goes to the general path (which reports the nesting limit). */
const MAX_FAST_DEPTH = 24;

const KEY = /^[A-Za-z0-9_][A-Za-z0-9_-]*$/;

/** Thrown inside the parser to fall back; never escapes `fastYamlTree`. */
class Fallback extends Error {}
const FALLBACK = new Fallback('fallback');

/** YAML 1.2 core schema resolution of a plain scalar (same tests, same order as the yaml package). */
function resolvePlain(s: string): unknown {
  // Every non-string form starts with one of -+.0-9~ or the first letter of true, false, null,
  // and has no space: most netlist values ("15 mm") are strings at the first look.
  const c = s.charCodeAt(0);
  const maybe = (c >= 48 && c <= 57) || c === 45 || c === 43 || c === 46 || c === 126 || c === 116 || c === 84 || c === 102 || c === 70 || c === 110 || c === 78;
  if (s !== '' && (!maybe || s.includes(' '))) return s;
  if (s === '' || s === '~' || s === 'null' || s === 'Null' || s === 'NULL') return null;
  if (/^(?:[Tt]rue|TRUE)$/.test(s)) return true;
  if (/^(?:[Ff]alse|FALSE)$/.test(s)) return false;
  if (/^0o[0-7]+$/.test(s)) return parseInt(s.substring(2), 8);
  if (/^[-+]?[0-9]+$/.test(s)) return parseInt(s, 10);
  if (/^0x[0-9a-fA-F]+$/.test(s)) return parseInt(s.substring(2), 16);
  if (/^(?:[-+]?\.(?:inf|Inf|INF)|\.nan|\.NaN|\.NAN)$/.test(s)) {
    return s.slice(-3).toLowerCase() === 'nan' ? Number.NaN : s[0] === '-' ? Number.NEGATIVE_INFINITY : Number.POSITIVE_INFINITY;
  }
  if (/^[-+]?(?:\.[0-9]+|[0-9]+(?:\.[0-9]*)?)[eE][-+]?[0-9]+$/.test(s)) return parseFloat(s);
  if (/^[-+]?(?:\.[0-9]+|[0-9]+\.[0-9]*)$/.test(s)) return parseFloat(s);
  return s;
}

/** A key the core schema reads as a string (not `true`, `null`, `10`, `1e3` ...), unchanged by String(). */
function plainName(key: string): boolean {
  return typeof resolvePlain(key) === 'string' && KEY.test(key);
}

/** A plain scalar must not start with an indicator nor hold text that YAML reads otherwise. */
function plainOk(s: string, flow: boolean): boolean {
  if (s === '') return false;
  const c = s[0];
  if ('-?:,[]{}#&*!|>\'"%@`'.includes(c)) {
    // `-`, `?`, `:` may start a plain scalar when followed by a non-space (e.g. -1 kPa gauge)
    if (!((c === '-' || c === '?' || c === ':') && s.length > 1 && s[1] !== ' ')) return false;
    if (flow && c === ':') return false;
  }
  if (s.includes(': ') || s.endsWith(':') || s.includes(' #')) return false;
  // in a flow collection the scan that found s stopped at , [ ] { }: none can be inside
  return true;
}

/** Characters of a plain name: letters, digits, `_` and `-`. */
function nameChar(c: number): boolean {
  return (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || (c >= 48 && c <= 57) || c === 95 || c === 45;
}

/** End of a name starting at i (a letter, digit or `_`, then name characters), or i when none. */
function nameEnd(text: string, i: number): number {
  const c = text.charCodeAt(i);
  if (!nameChar(c) || c === 45) return i;
  let e = i + 1;
  while (e < text.length && nameChar(text.charCodeAt(e))) e++;
  return e;
}

class FastParser {
  private readonly lines: string[];

  constructor(source: string) {
    this.lines = source.split('\n');
  }

  /** Indentation of line k, or −1 for a blank or comment-only line. */
  private indent(k: number): number {
    const l = this.lines[k];
    let n = 0;
    while (n < l.length && l.charCodeAt(n) === 32) n++;
    if (n === l.length || l[n] === '#') return -1;
    return n;
  }

  /** The next line at or after `k` with content, or lines.length. */
  private next(k: number): number {
    while (k < this.lines.length && this.indent(k) < 0) k++;
    return k;
  }

  parse(): YNode {
    const first = this.next(0);
    if (first >= this.lines.length) throw FALLBACK; // empty: the general path reports it
    if (this.indent(first) !== 0) throw FALLBACK;
    const line = this.lines[first];
    if (line.startsWith('- ') || line === '-' || line.startsWith('---') || line.startsWith('...') || line.startsWith('%')) throw FALLBACK;
    const { node, end } = this.blockMap(first, 0, 0, [], 0, undefined);
    if (this.next(end) < this.lines.length) throw FALLBACK;
    return node;
  }

  /**
   * A block mapping whose keys sit at column `col` (0-based), starting at line k where the key
   * starts at character `start` (= col for an ordinary line, after `- ` for a sequence item).
   */
  private blockMap(k: number, start: number, col: number, path: (string | number)[], depth: number, keyPos: Pos | undefined): { node: YMap; end: number } {
    if (depth > MAX_FAST_DEPTH) throw FALLBACK;
    const entries: YEntry[] = [];
    const seen = new Set<string>();
    const map: YMap = { kind: 'map', entries, path, pos: { line: k + 1, column: col + 1 }, keyPos };
    let line = k;
    let from = start;
    for (;;) {
      const text = this.lines[line];
      const colon = text.indexOf(':', from);
      if (colon < 0) throw FALLBACK;
      const key = text.slice(from, colon);
      if (!plainName(key)) throw FALLBACK;
      if (seen.has(key)) throw FALLBACK; // the general path reports duplicates
      seen.add(key);
      const kpos: Pos = { line: line + 1, column: from + 1 };
      const after = colon + 1;
      if (after < text.length && text[after] !== ' ') throw FALLBACK;
      let v = after;
      while (v < text.length && text[v] === ' ') v++;
      const childPath = [...path, key];
      let value: YNode;
      let endLine: number;
      if (v >= text.length || text[v] === '#') {
        if (v < text.length && v === after) throw FALLBACK; // `key:#` is not a comment
        // value on the following lines, or empty
        const n = this.next(line + 1);
        const ind = n < this.lines.length ? this.indent(n) : -1;
        if (n < this.lines.length && ind > col) {
          const r = this.blockValue(n, ind, childPath, depth + 1, kpos);
          value = r.node;
          endLine = r.end;
        } else if (n < this.lines.length && ind === col && (this.lines[n].startsWith('- ', col) || this.lines[n].length === col + 1 && this.lines[n][col] === '-')) {
          throw FALLBACK; // a sequence at the key's own indentation
        } else {
          value = { kind: 'scalar', value: null, empty: true, path: childPath, pos: kpos, keyPos: kpos };
          endLine = line + 1;
        }
      } else {
        value = this.inlineValue(text, v, line, childPath, depth + 1, kpos);
        endLine = line + 1;
      }
      entries.push({ key, keyPos: kpos, value });
      const n = this.next(endLine);
      if (n >= this.lines.length) return { node: map, end: n };
      const ind = this.indent(n);
      if (ind < col) return { node: map, end: n };
      if (ind > col) throw FALLBACK;
      const t = this.lines[n];
      if (t.startsWith('- ', col) || t.length === col + 1) throw FALLBACK;
      line = n;
      from = col;
    }
  }

  /** A block node starting at line k, indentation ind: a sequence or a mapping. */
  private blockValue(k: number, ind: number, path: (string | number)[], depth: number, keyPos: Pos): { node: YNode; end: number } {
    const text = this.lines[k];
    if (text.startsWith('- ', ind)) return this.blockSeq(k, ind, path, depth, keyPos);
    if (text.length === ind + 1 && text[ind] === '-') throw FALLBACK;
    return this.blockMap(k, ind, ind, path, depth, keyPos);
  }

  private blockSeq(k: number, col: number, path: (string | number)[], depth: number, keyPos: Pos | undefined): { node: YSeq; end: number } {
    if (depth > MAX_FAST_DEPTH) throw FALLBACK;
    const items: YNode[] = [];
    const seq: YSeq = { kind: 'seq', items, path, pos: { line: k + 1, column: col + 1 }, keyPos };
    let line = k;
    for (;;) {
      const text = this.lines[line];
      let v = col + 1;
      while (v < text.length && text[v] === ' ') v++;
      if (v >= text.length || text[v] === '#') throw FALLBACK; // item on the next lines
      const itemPath = [...path, items.length];
      const c = text[v];
      let endLine = line + 1;
      if (c === '-' && (v + 1 === text.length || text[v + 1] === ' ')) throw FALLBACK; // nested sequence
      if (c !== '{' && c !== '[' && c !== '"' && c !== '\'' && this.looksLikeKey(text, v)) {
        const r = this.blockMap(line, v, v, itemPath, depth + 1, undefined);
        items.push(r.node);
        endLine = r.end;
      } else {
        items.push(this.inlineValue(text, v, line, itemPath, depth + 1, undefined));
      }
      const n = this.next(endLine);
      if (n >= this.lines.length) return { node: seq, end: n };
      const ind = this.indent(n);
      if (ind < col) return { node: seq, end: n };
      if (ind > col) throw FALLBACK;
      if (!this.lines[n].startsWith('- ', col)) return { node: seq, end: n };
      line = n;
    }
  }

  /** Whether text at v starts `name:` followed by a space or the end of the line. */
  private looksLikeKey(text: string, v: number): boolean {
    const m = /^([A-Za-z0-9_][A-Za-z0-9_-]*):(?: |$)/.exec(text.slice(v));
    return m !== null;
  }

  /** A value that ends on this line: a flow collection, a quoted or a plain scalar (then a comment). */
  private inlineValue(text: string, v: number, line: number, path: (string | number)[], depth: number, keyPos: Pos | undefined): YNode {
    const c = text[v];
    let node: YNode;
    let end: number;
    if (c === '{' || c === '[') {
      const r = this.flow(text, v, line, path, depth, keyPos);
      node = r.node;
      end = r.end;
    } else if (c === '"' || c === '\'') {
      const r = this.quoted(text, v, line, path, keyPos);
      node = r.node;
      end = r.end;
    } else {
      let e = text.indexOf(' #', v);
      if (e < 0) e = text.length;
      const raw = text.slice(v, e).replace(/ +$/, '');
      if (!plainOk(raw, false)) throw FALLBACK;
      return { kind: 'scalar', value: resolvePlain(raw), empty: false, path, pos: { line: line + 1, column: v + 1 }, keyPos };
    }
    // only spaces or a comment may follow
    let e = end;
    while (e < text.length && text[e] === ' ') e++;
    if (e < text.length && !(text[e] === '#' && e > end)) throw FALLBACK;
    return node;
  }

  private quoted(text: string, v: number, line: number, path: (string | number)[], keyPos: Pos | undefined): { node: YScalar; end: number } {
    const q = text[v];
    let i = v + 1;
    let out = '';
    for (;;) {
      if (i >= text.length) throw FALLBACK; // continues on the next line
      const ch = text[i];
      if (q === '"' && ch === '\\') throw FALLBACK;
      if (ch === q) {
        if (q === '\'' && text[i + 1] === '\'') { out += '\''; i += 2; continue; }
        break;
      }
      out += ch;
      i++;
    }
    return { node: { kind: 'scalar', value: out, empty: false, path, pos: { line: line + 1, column: v + 1 }, keyPos }, end: i + 1 };
  }

  /** A one-line flow collection starting at text[v] ('{' or '['); end is just past its closing bracket. */
  private flow(text: string, v: number, line: number, path: (string | number)[], depth: number, keyPos: Pos | undefined): { node: YNode; end: number } {
    if (depth > MAX_FAST_DEPTH) throw FALLBACK;
    const open = text[v];
    const close = open === '{' ? '}' : ']';
    const pos: Pos = { line: line + 1, column: v + 1 };
    let i = v + 1;
    while (text.charCodeAt(i) === 32) i++;
    if (open === '{') {
      const entries: YEntry[] = [];
      const map: YMap = { kind: 'map', entries, path, pos, keyPos };
      if (text[i] === '}') return { node: map, end: i + 1 };
      for (;;) {
        const e = nameEnd(text, i);
        // `name: ` (a colon and a space) and nothing else starts an entry here
        if (e === i || text.charCodeAt(e) !== 58 || text.charCodeAt(e + 1) !== 32) throw FALLBACK;
        const key = text.slice(i, e);
        if (!plainName(key)) throw FALLBACK;
        for (let q = 0; q < entries.length; q++) if (entries[q].key === key) throw FALLBACK; // duplicate: short maps
        const kpos: Pos = { line: line + 1, column: i + 1 };
        i = e + 1;
        while (text.charCodeAt(i) === 32) i++;
        const r = this.flowValue(text, i, line, [...path, key], depth + 1, kpos);
        entries.push({ key, keyPos: kpos, value: r.node });
        i = r.end;
        while (text.charCodeAt(i) === 32) i++;
        if (text[i] === ',') {
          i++;
          while (text.charCodeAt(i) === 32) i++;
          if (text[i] === '}' || text[i] === ']' || text[i] === ',') throw FALLBACK;
          continue;
        }
        if (text[i] === '}') return { node: map, end: i + 1 };
        throw FALLBACK;
      }
    }
    const items: YNode[] = [];
    const seq: YSeq = { kind: 'seq', items, path, pos, keyPos };
    if (text[i] === ']') return { node: seq, end: i + 1 };
    for (;;) {
      const r = this.flowValue(text, i, line, [...path, items.length], depth + 1, undefined);
      items.push(r.node);
      i = r.end;
      while (text.charCodeAt(i) === 32) i++;
      if (text[i] === ',') {
        i++;
        while (text.charCodeAt(i) === 32) i++;
        if (text[i] === '}' || text[i] === ']' || text[i] === ',') throw FALLBACK;
        continue;
      }
      if (text[i] === close) return { node: seq, end: i + 1 };
      throw FALLBACK;
    }
  }

  private flowValue(text: string, i: number, line: number, path: (string | number)[], depth: number, keyPos: Pos | undefined): { node: YNode; end: number } {
    const c = text[i];
    if (c === undefined) throw FALLBACK;
    if (c === '{' || c === '[') return this.flow(text, i, line, path, depth, keyPos);
    if (c === '"' || c === '\'') return this.quoted(text, i, line, path, keyPos);
    let e = i;
    for (; e < text.length; e++) {
      const ch = text.charCodeAt(e);
      // , [ ] { } end a plain scalar in a flow collection, and so does ` #`
      if (ch === 44 || ch === 91 || ch === 93 || ch === 123 || ch === 125) break;
      if (ch === 35 && text.charCodeAt(e - 1) === 32) break;
    }
    while (e > i && text.charCodeAt(e - 1) === 32) e--;
    const raw = text.slice(i, e);
    if (!plainOk(raw, true) || /^[A-Za-z0-9_-]+:$/.test(raw)) throw FALLBACK;
    // a `key: value` pair inside a flow sequence is a one-entry map in YAML: not handled here
    return { node: { kind: 'scalar', value: resolvePlain(raw), empty: false, path, pos: { line: line + 1, column: i + 1 }, keyPos }, end: i + raw.length };
  }
}

/**
 * The netlist tree of `source` by the fast path, or undefined when the text is outside the
 * subset (then the general path must read it). Never reports problems itself.
 */
export function fastYamlTree(source: string): YamlTree | undefined {
  if (source.includes('\t') || source.includes('\r') || source.charCodeAt(0) === 0xfeff) return undefined;
  try {
    const root = new FastParser(source).parse();
    const diagnostics: Diagnostic[] = [];
    return { root, diagnostics };
  } catch (e) {
    if (e === FALLBACK) return undefined;
    throw e;
  }
}
