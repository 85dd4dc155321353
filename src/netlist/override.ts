/**
 * Overrides: change values in a netlist's YAML by their path (`chambers.cell_a.thickness`,
 * `valves.v1.schedule.0.at`), then read the result like any netlist, so that every override
 * is validated exactly as a user's own value would be.
 *
 * The YAML is parsed with the reader's options (yaml-tree.ts), the node at each path is set,
 * and the document is written back out. Diagnostics of the edited text are mapped back: one
 * about an overridden value names the override (not a line of the edited text, which the user
 * never saw); any other one points at the same path in the original file.
 */
import { isMap, isScalar, isSeq, parseDocument, type Document } from 'yaml';
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { closestMatches, listChoices } from '../diag/did-you-mean.js';
import { readNetlist, readNetlistTree } from './read.js';
import type { NetlistDoc } from './types.js';
import { parseYamlTree } from './yaml-tree.js';
import type { Pos, YamlTree, YNode } from './yaml-types.js';

export type PathSegment = string | number;

/** One value to set: where, the value as YAML will hold it, and how the user wrote it. */
export interface Override {
  path: PathSegment[];
  value: string | number;
  /** `chambers.cell_a.thickness = 1.4 mm`, for messages. */
  label: string;
}

export type PathCheck = { ok: true; path: PathSegment[]; exists: boolean } | { ok: false; message: string; hint: string };

const NUMBER = /^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$/;
/** How many of a mapping's keys a hint lists before it stops. */
const LIST_KEYS = 12;

/** Same options as the netlist reader (yaml-tree.ts), so both see the same document. */
function parse(source: string): Document.Parsed {
  return parseDocument(source, { uniqueKeys: true, version: '1.2', schema: 'core', merge: false, resolveKnownTags: false });
}

function dotted(path: readonly PathSegment[]): string {
  return path.join('.');
}

/** `1.6` and `1e-7` become numbers (as they would written in the netlist); anything else text. */
export function overrideValue(text: string): string | number {
  const t = text.trim();
  return NUMBER.test(t) ? Number(t) : t;
}

/** Splits `valves.v1.schedule.0.at` into segments; whole-number segments index lists. */
export function splitPath(text: string): PathSegment[] {
  return text.trim().split('.').map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

function keysOf(node: unknown): string[] {
  if (!isMap(node)) return [];
  return node.items.map((p) => (isScalar(p.key) ? String(p.key.value) : '')).filter((k) => k !== '');
}

function keysHint(word: string, keys: string[], where: string): string {
  const close = closestMatches(word, keys);
  if (close.length) return `did you mean ${close.map((c) => `\`${c}\``).join(' or ')}?`;
  if (!keys.length) return `${where} has no keys`;
  const shown = keys.slice(0, LIST_KEYS);
  return `${where} has ${listChoices(shown)}${keys.length > LIST_KEYS ? ', …' : ''}`;
}

/**
 * Checks that a path addresses a value in the netlist: every step but the last must exist;
 * the last may be a key not yet written in an existing mapping (e.g. `simulate.tolerance` when
 * the default is used; the reader then judges the key). A path to a mapping or a list is
 * refused: an override sets one value.
 */
export function checkPath(source: string, text: string): PathCheck {
  const path = splitPath(text);
  if (path.some((s) => s === '')) return { ok: false, message: `\`${text}\` is not a netlist path`, hint: 'write dot-separated keys, e.g. `chambers.cell_a.thickness` or `valves.v1.schedule.0.at`' };
  let node: unknown = parse(source).contents;
  for (let i = 0; i < path.length; i++) {
    const seg = path[i];
    const here = i === 0 ? 'the netlist' : `\`${dotted(path.slice(0, i))}\``;
    const last = i === path.length - 1;
    if (isSeq(node)) {
      const n = node.items.length;
      if (typeof seg !== 'number' || seg >= n) {
        return { ok: false, message: `${here} is a list of ${n} item${n === 1 ? '' : 's'}; \`${seg}\` does not index it`, hint: n ? `use an index 0..${n - 1}, e.g. \`${dotted([...path.slice(0, i), 0])}\`` : 'the list is empty' };
      }
      node = node.items[seg];
    } else if (isMap(node)) {
      const key = String(seg);
      const pair = node.items.find((p) => isScalar(p.key) && String(p.key.value) === key);
      if (!pair) {
        const keys = keysOf(node);
        const close = closestMatches(key, keys);
        if (last && !close.length) return { ok: true, path, exists: false };
        return { ok: false, message: `${here} has no \`${key}\``, hint: keysHint(key, keys, here) };
      }
      node = pair.value;
    } else {
      return { ok: false, message: `\`${dotted(path.slice(0, i))}\` is a single value; it has no \`${seg}\``, hint: `address the value itself: \`${dotted(path.slice(0, i))}\`` };
    }
  }
  if (isMap(node)) return { ok: false, message: `\`${text}\` is a mapping, not a single value`, hint: keysHint('', keysOf(node), `\`${text}\``) };
  if (isSeq(node)) return { ok: false, message: `\`${text}\` is a list, not a single value`, hint: `address one item, e.g. \`${text}.0\`` };
  return { ok: true, path, exists: true };
}

/** The netlist text with every override applied (paths must have passed checkPath). */
export function applyOverrides(source: string, overrides: readonly Override[]): string {
  const doc = parse(source);
  for (const o of overrides) doc.setIn(o.path, o.value);
  return doc.toString();
}

function startsWith(path: readonly PathSegment[], prefix: readonly PathSegment[]): boolean {
  return prefix.length <= path.length && prefix.every((s, i) => String(s) === String(path[i]));
}

/** Where a path sits in the original tree: the deepest node along it that exists. */
function positionOf(root: YNode | undefined, path: readonly PathSegment[]): { line: number; column: number } {
  let node = root;
  let pos = { line: 0, column: 0 };
  for (const seg of path) {
    if (!node) break;
    pos = node.pos;
    if (node.kind === 'map') node = node.entries.find((e) => e.key === String(seg))?.value;
    else if (node.kind === 'seq') node = typeof seg === 'number' ? node.items[seg] : undefined;
    else node = undefined;
  }
  return node ? node.pos : pos;
}

/**
 * Re-labels diagnostics of an overridden netlist. One whose path lies at or under an override
 * names that override; any other one points at the same path in the original file and says
 * which overrides were in force.
 */
export function mapOverrideDiagnostics(diagnostics: readonly Diagnostic[], source: string, file: string, overrides: readonly Override[]): Diagnostic[] {
  let tree: YNode | undefined;
  let parsed = false;
  const all = overrides.map((o) => o.label).join(', ');
  return diagnostics.map((d) => {
    const own = overrides.find((o) => startsWith(d.path, o.path));
    if (own) return { ...d, file: `${file} (override ${own.label})`, line: 0, column: 0 };
    if (!parsed) {
      tree = parseYamlTree(source, file).root;
      parsed = true;
    }
    const pos = positionOf(tree, d.path);
    return { ...d, file, line: pos.line, column: pos.column, message: overrides.length ? `${d.message} (with ${all})` : d.message };
  });
}

/** A scalar node holding an override's value at `path`. */
function overrideNode(path: readonly PathSegment[], value: string | number, pos: Pos): YNode {
  return { kind: 'scalar', value, empty: false, path: path.slice(), pos, keyPos: pos };
}

/** node with the value at path[k..] set, sharing every node off the path (copy on write). */
function setIn(node: YNode, path: readonly PathSegment[], k: number, value: string | number): YNode {
  if (k === path.length) return { ...overrideNode(path, value, node.pos), keyPos: node.keyPos };
  const seg = path[k];
  if (node.kind === 'map') {
    const key = String(seg);
    const i = node.entries.findIndex((e) => e.key === key);
    const entries = node.entries.slice();
    if (i >= 0) entries[i] = { ...entries[i], value: setIn(entries[i].value, path, k + 1, value) };
    else if (k === path.length - 1) entries.push({ key, keyPos: node.pos, value: overrideNode(path, value, node.pos) });
    else throw new Error(`override path ${dotted(path)} was not checked`);
    return { ...node, entries };
  }
  if (node.kind === 'seq' && typeof seg === 'number' && seg < node.items.length) {
    const items = node.items.slice();
    items[seg] = setIn(items[seg], path, k + 1, value);
    return { ...node, items };
  }
  throw new Error(`override path ${dotted(path)} was not checked`);
}

/**
 * The parsed netlist with every override set (paths must have passed checkPath): the same
 * document `applyOverrides` writes out and the reader parses back, without writing or parsing
 * text. Untouched nodes are shared with `tree`, which stays as it was.
 */
export function overrideTree(tree: YamlTree, overrides: readonly Override[]): YamlTree {
  if (!tree.root || !overrides.length) return tree;
  let root = tree.root;
  for (const o of overrides) root = setIn(root, o.path, 0, o.value);
  return { root, diagnostics: tree.diagnostics };
}

/**
 * readNetlist on the netlist with overrides applied, diagnostics mapped back to the user's input.
 * With `tree` (the netlist parsed once by parseYamlTree, for many cases) the overrides are set in
 * the parsed document instead of the text; the document's `source` is then the original text.
 */
export function readWithOverrides(source: string, file: string, overrides: readonly Override[], tree?: YamlTree): Result<NetlistDoc> {
  const r = tree
    ? readNetlistTree(overrideTree(tree, overrides), source, file)
    : readNetlist(overrides.length ? applyOverrides(source, overrides) : source, file);
  if (!overrides.length) return r;
  if (!r.ok) return { ok: false, diagnostics: mapOverrideDiagnostics(r.diagnostics, source, file, overrides) };
  return { ok: true, value: r.value, warnings: mapOverrideDiagnostics(r.warnings, source, file, overrides) };
}
