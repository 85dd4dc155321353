/**
 * Element names: collected from every section before anything else is read, so that
 * references can be checked in any order. Names are identifiers, unique across the whole
 * netlist; `ambient` is reserved for the surroundings (and usable as a reservoir reference).
 */
import { didYouMean } from '../diag/did-you-mean.js';
import { IDENTIFIER, type Checker, type Where } from './checker.js';
import { ELEMENT_TABLES } from './kinds.js';
import type { YMap, YNode } from './yaml-types.js';

/** Built-in kinds, and kinds read from their table alone (kinds.ts: ELEMENT_TABLES). */
export type ElementKind = 'chamber' | 'reservoir' | 'line' | 'valve' | 'feed' | 'cylinder' | 'controller' | (string & {});
/** What a name can stand for: an element, or one side of a cylinder (`clamp.cap`, `clamp.rod`). */
export type NameKind = ElementKind | 'port';
export const SECTIONS: Readonly<Record<string, string>> = {
  chamber: 'chambers',
  reservoir: 'reservoirs',
  line: 'lines',
  valve: 'valves',
  feed: 'feeds',
  cylinder: 'cylinders',
  controller: 'controllers',
  ...Object.fromEntries(ELEMENT_TABLES.map((k) => [k.kind, k.key])),
};
export const AMBIENT = 'ambient';
/** A cylinder's side as a node: `<cylinder>.cap` or `<cylinder>.rod`. */
export const PORT_NAME = /^([A-Za-z][A-Za-z0-9_]*)\.(cap|rod)$/;

const NOUN: Record<NameKind, string> = {
  chamber: 'chamber', reservoir: 'reservoir', line: 'line', valve: 'valve', feed: 'feed', cylinder: 'cylinder', port: 'cylinder side', controller: 'controller',
};

export interface NameEntry {
  name: string;
  kind: NameKind;
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
 * Registers the sides of each cylinder as nodes: `<name>.cap` always, `<name>.rod` when the
 * cylinder has a rod (double-acting). Read from the YAML as written, before the cylinders are
 * validated, so that lines and valves can name them in any order.
 */
export function registerPorts(names: Names, cylinders: readonly NameEntry[]): void {
  for (const c of cylinders) {
    const sides = c.node.kind === 'map' && c.node.entries.some((e) => e.key === 'rod') ? ['cap', 'rod'] : ['cap'];
    for (const side of sides) {
      const name = `${c.name}.${side}`;
      names.set(name, { name, kind: 'port', where: c.where, node: c.node });
    }
  }
}

/** A hint for a reference to a cylinder itself, or to the rod side of a single-acting one. */
function cylinderHint(names: Names, name: string): string | undefined {
  const entry = names.get(name);
  if (entry?.kind === 'cylinder') {
    const sides = [`\`${name}.cap\``, ...(names.has(`${name}.rod`) ? [`\`${name}.rod\``] : [])];
    return `connect to a side of the cylinder: ${sides.join(' or ')}`;
  }
  const m = PORT_NAME.exec(name);
  if (m && names.get(m[1])?.kind === 'cylinder' && m[2] === 'rod') {
    return `cylinder \`${m[1]}\` has no \`rod\`: it is single-acting, its rod side open to ambient (give it a \`rod\` diameter to make it double-acting)`;
  }
  return undefined;
}

/**
 * Checks that `name` (read from `node`) names an element of one of `kinds` (`ambient` counts
 * as a reservoir). Reports unknown names with a did-you-mean among the allowed ones.
 */
export function resolve(ck: Checker, names: Names, node: YNode, name: string, kinds: readonly NameKind[], what: string): boolean {
  const allowAmbient = kinds.includes('reservoir');
  if (name === AMBIENT && allowAmbient) return true;
  const entry = names.get(name);
  const wanted = kinds.map((k) => NOUN[k]).join(' or ') + (allowAmbient ? ' (or `ambient`)' : '');
  if (!entry) {
    const candidates = [...names.values()].filter((n) => kinds.includes(n.kind)).map((n) => n.name);
    if (allowAmbient) candidates.push(AMBIENT);
    const hint = (kinds.includes('port') ? cylinderHint(names, name) : undefined) ?? didYouMean(name, candidates) ?? `name a ${wanted}`;
    ck.error(node, 'unknown-reference', `${what} names \`${name}\`, which is not defined`, hint);
    return false;
  }
  if (!kinds.includes(entry.kind)) {
    const hint = (kinds.includes('port') ? cylinderHint(names, name) : undefined) ?? `name a ${wanted}`;
    ck.error(node, 'wrong-reference', `${what} names \`${name}\`, which is a ${NOUN[entry.kind]}`, hint);
    return false;
  }
  return true;
}
