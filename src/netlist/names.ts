/**
 * Element names: collected from every section before anything else is read, so that
 * references can be checked in any order. Names are identifiers, unique across the whole
 * netlist; `ambient` is reserved for the surroundings (and usable as a reservoir reference).
 */
import { didYouMean } from '../diag/did-you-mean.js';
import { IDENTIFIER, type Checker, type Where } from './checker.js';
import type { YMap, YNode } from './yaml-types.js';

export type ElementKind = 'chamber' | 'reservoir' | 'line' | 'valve' | 'feed' | 'controller';
export const SECTIONS: Record<ElementKind, string> = {
  chamber: 'chambers',
  reservoir: 'reservoirs',
  line: 'lines',
  valve: 'valves',
  feed: 'feeds',
  controller: 'controllers',
};
export const AMBIENT = 'ambient';

export interface NameEntry {
  name: string;
  kind: ElementKind;
  where: Where;
  node: YNode;
}

export type Names = Map<string, NameEntry>;

/** Registers the elements of one section, reporting bad, reserved and duplicate names. */
export function collectNames(ck: Checker, names: Names, kind: ElementKind, section: YMap): NameEntry[] {
  const fresh: NameEntry[] = [];
  for (const e of section.entries) {
    const where = { pos: e.keyPos, path: [...section.path, e.key] };
    if (e.key === AMBIENT) {
      ck.error(where, 'reserved-name', '`ambient` is reserved for the surroundings', `rename this ${kind}; \`ambient\` is always available as a reservoir`);
      continue;
    }
    if (!IDENTIFIER.test(e.key)) {
      ck.error(where, 'bad-name', `\`${e.key}\` is not a valid name`, 'names are letters, digits and _, starting with a letter (e.g. `cell_a`)');
      continue;
    }
    const first = names.get(e.key);
    if (first) {
      ck.error(where, 'duplicate-name', `the name \`${e.key}\` is already used by a ${first.kind}`, `names are unique across the netlist; the ${first.kind} is at line ${first.where.pos.line}`);
      continue;
    }
    const entry: NameEntry = { name: e.key, kind, where, node: e.value };
    names.set(e.key, entry);
    fresh.push(entry);
  }
  return fresh;
}

/**
 * Checks that `name` (read from `node`) names an element of one of `kinds` (`ambient` counts
 * as a reservoir). Reports unknown names with a did-you-mean among the allowed ones.
 */
export function resolve(ck: Checker, names: Names, node: YNode, name: string, kinds: readonly ElementKind[], what: string): boolean {
  const allowAmbient = kinds.includes('reservoir');
  if (name === AMBIENT && allowAmbient) return true;
  const entry = names.get(name);
  const wanted = kinds.join(' or ') + (allowAmbient ? ' (or `ambient`)' : '');
  if (!entry) {
    const candidates = [...names.values()].filter((n) => kinds.includes(n.kind)).map((n) => n.name);
    if (allowAmbient) candidates.push(AMBIENT);
    ck.error(node, 'unknown-reference', `${what} names \`${name}\`, which is not defined`, didYouMean(name, candidates) ?? `name a ${wanted}`);
    return false;
  }
  if (!kinds.includes(entry.kind)) {
    ck.error(node, 'wrong-reference', `${what} names \`${name}\`, which is a ${entry.kind}`, `name a ${wanted}`);
    return false;
  }
  return true;
}
