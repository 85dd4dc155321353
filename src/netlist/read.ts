/**
 * readNetlist: YAML text → a validated NetlistDoc with every number in SI, or every problem
 * found (each with file:line:column, the path in the netlist and a hint).
 *
 * Order matters only where values depend on each other: ambient first (gauge pressures are
 * read against it), then simulate (expressions and expectations are checked against its
 * duration), then all names (so references may point forwards), then the elements.
 */
import { boundDiagnostic } from '../diag/diagnostic.js';
import { resetSuggestions } from '../diag/did-you-mean.js';
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { readFeed, readLine, readValve } from './branches.js';
import { readChamber } from './chambers.js';
import { readCylinder } from './cylinders.js';
import { Checker } from './checker.js';
import { drivenValves, readController } from './controllers.js';
import { readExpect, readSimulate } from './expect.js';
import { namedGas } from './gases.js';
import { AMBIENT, CUSTOM_GAS, ELEMENT_TABLES, GAS_NAMES, HEAT_MODES, RESERVOIR, TOP, VISCOSITY } from './kinds.js';
import { readElement } from './elements.js';
import { collectNames, registerPorts, SECTIONS, type ElementKind, type NameEntry, type Names } from './names.js';
import { readPressureSeries } from './time-series.js';
import type { ChamberSpec, ControllerSpec, GasSpec, LineSpec, NetlistDoc, ReservoirSpec } from './types.js';
import { parseYamlTree } from './yaml-tree.js';
import type { YamlTree, YMap, YNode } from './yaml-types.js';

const DEFAULT_AMBIENT = { pressure: 101325, temperature: 293.15 };

function baseName(file: string): string {
  return file.split(/[\\/]/).pop() || file;
}

function readFormat(ck: Checker, root: YMap): boolean {
  const node = ck.get(root, 'format');
  if (!node) {
    ck.error({ pos: { line: 1, column: 1 }, path: ['format'] }, 'format-missing', 'the netlist does not say its format', 'add `format: 1` as the first line');
    return false;
  }
  if (!(node.kind === 'scalar' && node.value === 1)) {
    const v = node.kind === 'scalar' ? node.value : undefined;
    const message = typeof v === 'string' && v.trim() === '1' ? 'the format must be the number 1, not text' : `unsupported format ${v === undefined ? node.kind : String(v)}`;
    ck.error(node, 'format-version', message, 'this version of plenum reads `format: 1`');
    return false;
  }
  return true;
}

function readAmbient(ck: Checker, root: YMap): { pressure: number; temperature: number } {
  const node = ck.get(root, 'ambient');
  const map = node ? ck.map(node, '`ambient`', 'write e.g. `ambient: { pressure: 101.325 kPa, temperature: 20 degC }`', true) : undefined;
  const source: YMap = map ?? { kind: 'map', entries: [], path: ['ambient'], pos: { line: 1, column: 1 } };
  ck.checkKeys(source, AMBIENT.params.map((p) => p.name), '`ambient`');
  const v = ck.params(source, AMBIENT.params);
  return {
    pressure: (v.pressure as number | undefined) ?? DEFAULT_AMBIENT.pressure,
    temperature: (v.temperature as number | undefined) ?? DEFAULT_AMBIENT.temperature,
  };
}

function readGas(ck: Checker, root: YMap): GasSpec {
  const fallback = namedGas('air') as GasSpec;
  const node = ck.get(root, 'gas');
  if (!node) {
    ck.defaulted.push('gas');
    return fallback;
  }
  if (node.kind !== 'map') {
    const name = ck.enumValue(node, GAS_NAMES, 'gas', 'unknown-gas');
    return (name && namedGas(name)) || fallback;
  }
  ck.checkKeys(node, CUSTOM_GAS.params.map((p) => p.name), 'a custom gas');
  const v = ck.params(node, CUSTOM_GAS.params);
  const visc = v.viscosity ? ck.map(v.viscosity as YNode, '`viscosity`', 'write `viscosity: { value: 1.8e-5 Pa*s, at: 20 degC, sutherland: 110 K }`') : undefined;
  if (visc) ck.checkKeys(visc, VISCOSITY.params.map((p) => p.name), '`viscosity`');
  const mu = visc ? ck.params(visc, VISCOSITY.params) : {};
  if ([v['molar-mass'], v.gamma, mu.value, mu.at, mu.sutherland].some((x) => x === undefined)) return fallback;
  return {
    name: (v.name as string | undefined) ?? 'custom',
    molarMass: v['molar-mass'] as number,
    gamma: v.gamma as number,
    viscosity: { value: mu.value as number, at: mu.at as number, sutherland: mu.sutherland as number },
  };
}

/** The element sections as maps, their names registered. */
function collectSections(ck: Checker, root: YMap, names: Names): Record<ElementKind, NameEntry[]> {
  const out = {} as Record<ElementKind, NameEntry[]>;
  for (const kind of Object.keys(SECTIONS)) {
    const key = SECTIONS[kind];
    const node = ck.get(root, key);
    const map = node ? ck.map(node, `\`${key}\``, `\`${key}\` maps names to definitions, e.g. \`${key}:\\n  name_1: {...}\``, true) : undefined;
    out[kind] = map ? collectNames(ck, names, kind, map) : [];
  }
  registerPorts(names, out.cylinder);
  return out;
}

function readReservoir(ck: Checker, entry: NameEntry, duration?: number): ReservoirSpec | undefined {
  const what = `reservoir \`${entry.name}\``;
  const map = ck.map(entry.node, what, 'write e.g. `supply: { pressure: 600 kPa gauge }`');
  if (!map) return undefined;
  ck.checkKeys(map, RESERVOIR.params.map((p) => p.name), what);
  const v = ck.params(map, RESERVOIR.params);
  const pressure = v.pressure ? readPressureSeries(ck, v.pressure as YNode, duration) : undefined;
  if (!pressure) return undefined;
  const spec: ReservoirSpec = { name: entry.name, pressure, pos: ck.sourcePos(entry.where) };
  if (v.temperature !== undefined) spec.temperature = v.temperature as number;
  return spec;
}

/**
 * A chamber that no line, valve or feed mentions is an error: sealed and alone it has nothing
 * to do in a transient, and in practice it is a slip (a misspelt name in a line, a line left
 * out). A chamber with only a feed is fine (a vessel being charged). The references are read
 * as written, from every entry of the sections, including entries with other errors (a bad or
 * duplicate name, a misspelt key), so that a slip elsewhere is not reported twice.
 */
/** Keys of lines, valves and feeds that name a node. */
const NODE_KEYS = new Set(['from', 'to', 'into']);

function checkConnected(ck: Checker, root: YMap, sections: Record<ElementKind, NameEntry[]>): void {
  const touched = new Set<string>();
  for (const key of [SECTIONS.line, SECTIONS.valve, SECTIONS.feed, ...ELEMENT_TABLES.map((k) => k.key)]) {
    const section = ck.get(root, key);
    if (section?.kind !== 'map') continue;
    for (const element of section.entries) {
      if (element.value.kind !== 'map') continue;
      for (const e of element.value.entries) {
        // only the keys that name a node (a chamber named `open` is not joined by `initially: open`)
        if (!NODE_KEYS.has(e.key)) continue;
        if (e.value.kind === 'scalar' && typeof e.value.value === 'string') touched.add(e.value.value.trim());
      }
    }
  }
  for (const c of sections.chamber) {
    if (!touched.has(c.name)) {
      ck.error(c.where, 'unconnected-chamber', `chamber \`${c.name}\` is not connected to anything`,
        'connect it with a line, a valve, a feed or another element, or remove it (to keep it sealed, join it to `ambient` by a valve with `initially: closed`)');
    }
  }
}

function byPosition(a: Diagnostic, b: Diagnostic): number {
  return a.line - b.line || a.column - b.column;
}

function defined<T>(xs: (T | undefined)[]): T[] {
  return xs.filter((x): x is T => x !== undefined);
}

/** Reads and validates a netlist. `file` is used in diagnostics and as the default title. */
export function readNetlist(source: string, file: string): Result<NetlistDoc> {
  return readNetlistTree(parseYamlTree(source, file), source, file);
}

/** readNetlist on a tree already parsed from `source` (or edited from one: see override.ts). */
export function readNetlistTree(tree: YamlTree, source: string, file: string): Result<NetlistDoc> {
  resetSuggestions();
  const r = readChecked(tree, source, file);
  return r.ok ? { ...r, warnings: r.warnings.map(boundDiagnostic) } : { ok: false, diagnostics: r.diagnostics.map(boundDiagnostic) };
}

function readChecked(tree: YamlTree, source: string, file: string): Result<NetlistDoc> {
  if (!tree.root) return { ok: false, diagnostics: tree.diagnostics };
  const ck = new Checker(file);
  ck.diagnostics.push(...tree.diagnostics);
  const root = ck.map(tree.root, 'a netlist', 'start with `format: 1`, then `chambers:` and `simulate:`');
  if (!root) return { ok: false, diagnostics: ck.diagnostics };
  ck.checkKeys(root, TOP.params.map((p) => p.name), 'the netlist');

  readFormat(ck, root);
  const titleNode = ck.get(root, 'title');
  const titleValue = titleNode && ck.scalar(titleNode, '`title`', 'write the title as text');
  const title = titleValue === undefined || titleValue === '' ? baseName(file) : String(titleValue);
  const descriptionNode = ck.get(root, 'description');
  const descriptionValue = descriptionNode && ck.scalar(descriptionNode, '`description`', 'write the description as text (a `|` block keeps line breaks)');
  const description = descriptionValue === undefined || descriptionValue === null || String(descriptionValue).trim() === '' ? undefined : String(descriptionValue).trim();
  const ambient = readAmbient(ck, root);
  ck.ambientPa = ambient.pressure;
  const gas = readGas(ck, root);
  const heatNode = ck.get(root, 'heat');
  const heat = (heatNode ? ck.enumValue(heatNode, HEAT_MODES, 'heat model') : 'isothermal') ?? 'isothermal';
  if (!heatNode) ck.defaulted.push('heat');
  const simulate = readSimulate(ck, ck.get(root, 'simulate'), root);

  const names: Names = new Map();
  const sections = collectSections(ck, root, names);
  const empty = (node: YNode | undefined): boolean => !node || (node.kind === 'map' && node.entries.length === 0) || (node.kind === 'scalar' && node.value === null);
  if (empty(ck.get(root, 'chambers')) && empty(ck.get(root, 'cylinders'))) {
    ck.error(ck.missingAt(root, 'chambers'), 'missing-key', 'the netlist has no chambers', 'add `chambers:` with at least one chamber (or `cylinders:`); there is nothing to simulate otherwise');
  }
  const chambers = defined(sections.chamber.map((e) => readChamber(ck, e, { heat: heat as NetlistDoc['heat'] })));
  const reservoirs = defined(sections.reservoir.map((e) => readReservoir(ck, e, simulate?.duration)));
  const lines = defined(sections.line.map((e) => readLine(ck, e, names)));
  const lineMap = new Map<string, LineSpec>(lines.map((l) => [l.name, l]));
  const taken = new Map<string, string>();
  const driven = drivenValves(ck, root);
  const valves = defined(sections.valve.map((e) => readValve(ck, e, names, lineMap, taken, driven.get(e.name))));
  const feeds = defined(sections.feed.map((e) => readFeed(ck, e, names)));
  const chamberMap = new Map<string, ChamberSpec>(chambers.map((c) => [c.name, c]));
  const carriesDriven = new Set<string>();
  for (const v of valves) if (driven.has(v.name)) { carriesDriven.add(v.name); if (v.inLine) carriesDriven.add(v.inLine); }
  const controllers = defined(sections.controller.map((e) => readController(ck, e, names, driven, { names, chambers: chamberMap, duration: simulate?.duration }, carriesDriven)));
  const cylinders = defined(sections.cylinder.map((e) => readCylinder(ck, e, heat as NetlistDoc['heat'])));
  const elements = defined(ELEMENT_TABLES.flatMap((k) => sections[k.kind].map((e) => readElement(ck, e, k, names))));
  checkConnected(ck, root, sections);
  // every element either reads or says why not: none may vanish without a diagnostic
  if (!ck.hasErrors) {
    const read: Record<ElementKind, { name: string }[]> = { chamber: chambers, reservoir: reservoirs, line: lines, valve: valves, feed: feeds, cylinder: cylinders, controller: controllers };
    for (const k of ELEMENT_TABLES) read[k.kind] = elements.filter((e) => e.kind === k.kind);
    for (const kind of Object.keys(SECTIONS)) {
      const got = new Set(read[kind].map((x) => x.name)); // a set: ten thousand chambers are read
      for (const e of sections[kind]) {
        if (!got.has(e.name)) ck.error(e.where, 'invalid-element', `${kind} \`${e.name}\` could not be read`, 'check its keys and values');
      }
    }
  }

  const controllerMap = new Map<string, ControllerSpec>(controllers.map((c) => [c.name, c]));
  const expectNode = ck.get(root, 'expect');
  const expect = expectNode ? readExpect(ck, expectNode, { names, chambers: chamberMap, controllers: controllerMap, duration: simulate?.duration }) : [];

  const diagnostics = ck.diagnostics.slice().sort(byPosition);
  if (ck.hasErrors || !simulate) return { ok: false, diagnostics };
  const doc: NetlistDoc = {
    file,
    source,
    format: 1,
    title,
    ...(description !== undefined ? { description } : {}),
    gas,
    ambient,
    heat: heat as NetlistDoc['heat'],
    chambers,
    reservoirs,
    lines,
    valves,
    feeds,
    cylinders,
    controllers,
    ...(elements.length ? { elements } : {}),
    simulate,
    expect,
    defaulted: ck.defaulted.slice(),
  };
  return { ok: true, value: doc, warnings: diagnostics };
}
