/**
 * `simulate` and `expect`.
 *
 * An expectation is either a probe check — `probe: <element>.<quantity>`, one of
 * `at: <time | end>` or `over: [t0, t1]` with `stat`, and one of `below`, `above`,
 * `near: { value, within }` — or `settles: { within, band }`. Values are in the probe's
 * dimension; pressures (`pressure` and `gauge` probes) must say gauge or abs and are stored
 * absolute. `within` is relative when written with `%`, otherwise an absolute difference in
 * the probe's dimension (a bare number is SI). `name` defaults to a description of the check.
 */
import { didYouMean, listChoices } from '../diag/did-you-mean.js';
import type { Dimension } from '../units/dimensions.js';
import { parseFraction } from '../units/quantity.js';
import type { Checker } from './checker.js';
import { ELEMENT_TABLES, EXPECT, NEAR, PROBE_QUANTITIES, SETTLES, SIMULATE, SPHERE_LAWS, STATS } from './kinds.js';
import type { Names } from './names.js';
import type { ChamberSpec, Comparison, ControllerSpec, ExpectSpec, Probe, ProbeQuantity, SimulateSpec } from './types.js';
import type { YMap, YNode, YScalar } from './yaml-types.js';

const PROBE_HINT = 'write `<element>.<quantity>`, e.g. `cell_a.gauge`, `supply.flow` or `total.mass`';
const COMPARISONS = ['below', 'above', 'near'] as const;
/** Most output samples a run may record (a million rows; every row is kept in memory). */
export const MAX_SAMPLES = 1_000_000;

/** Dimension of each quantity; a controller's `error` takes its measure's (see probeValueKind). */
export const QUANTITY_DIMENSION: Record<string, Dimension> = {
  pressure: 'pressure',
  gauge: 'pressure',
  volume: 'volume',
  mass: 'mass',
  temperature: 'temperature',
  stretch: 'dimensionless',
  flow: 'mass-flow',
  reynolds: 'dimensionless',
  position: 'length',
  velocity: 'velocity',
  'stroke-time': 'time',
  'impact-velocity': 'velocity',
  dissipated: 'energy',
};

/** The dimension of a probe quantity (built in, or declared by a kind's table). */
function probeDimension(q: ProbeQuantity): Dimension {
  return QUANTITY_DIMENSION[q] ?? ELEMENT_TABLES.find((k) => q in k.probes)!.probes[q];
}

export function readSimulate(ck: Checker, node: YNode | undefined, root: YMap): SimulateSpec | undefined {
  if (!node) {
    ck.error(ck.missingAt(root, 'simulate'), 'missing-key', 'the netlist has no `simulate` section', 'add e.g. `simulate: { duration: 5 s }`');
    return undefined;
  }
  const map = ck.map(node, '`simulate`', 'write e.g. `simulate: { duration: 5 s, sample: 1 ms }`', true);
  if (!map) return undefined;
  ck.checkKeys(map, SIMULATE.params.map((p) => p.name), '`simulate`');
  const v = ck.params(map, SIMULATE.params);
  const duration = v.duration as number | undefined;
  const sample = v.sample as number | undefined;
  if (duration !== undefined && sample !== undefined && sample > duration) {
    ck.error(ck.get(map, 'sample') ?? map, 'out-of-range', `\`sample\` (${sample} s) is longer than \`duration\` (${duration} s)`, 'choose a sample interval no longer than the duration');
    return undefined;
  }
  if (duration !== undefined && sample !== undefined && duration / sample > MAX_SAMPLES) {
    ck.error(ck.get(map, 'sample') ?? map, 'too-many-samples', `\`sample\` (${sample} s) gives ${Math.ceil(duration / sample).toExponential(2)} samples over the duration, more than the limit of ${MAX_SAMPLES}`, `choose a sample interval of at least ${(duration / MAX_SAMPLES).toPrecision(3)} s`);
    return undefined;
  }
  if (duration === undefined || v.method === undefined || v.tolerance === undefined) return undefined;
  if (ck.get(map, 'max-steps') && v['max-steps'] === undefined) return undefined;
  if (ck.get(map, 'max-wall') && v['max-wall'] === undefined) return undefined;
  const spec: SimulateSpec = { duration, method: v.method as SimulateSpec['method'], tolerance: v.tolerance as number };
  if (sample !== undefined) spec.sample = sample;
  spec.samplePos = ck.sourcePos(ck.get(map, 'sample') ?? map);
  if (v['max-steps'] !== undefined) spec.maxSteps = v['max-steps'] as number;
  if (v['max-wall'] !== undefined) spec.maxWall = v['max-wall'] as number;
  return spec;
}

export interface ExpectContext {
  names: Names;
  chambers: Map<string, ChamberSpec>;
  /** Controllers read so far (their `error` probe has the dimension of what they measure). */
  controllers?: Map<string, ControllerSpec>;
  duration?: number;
}

/**
 * How a value compared with a probe is read: an absolute pressure (`pressure`, `gauge`), a
 * pressure difference (a controller's error on a pressure), a fraction (a controller's output),
 * or a quantity of a dimension.
 */
export type ProbeValueKind = 'absolute-pressure' | 'pressure-difference' | 'fraction' | Dimension;

export function probeValueKind(probe: Probe, controllers?: Map<string, ControllerSpec>): ProbeValueKind {
  if (probe.quantity === 'output') return 'fraction';
  if (probe.quantity === 'error') {
    const m = controllers?.get(probe.element)?.measure;
    if (!m || m.quantity === 'output' || m.quantity === 'error') return 'dimensionless';
    const d = probeDimension(m.quantity);
    return d === 'pressure' ? 'pressure-difference' : d === 'temperature' ? 'temperature-difference' : d;
  }
  const d = probeDimension(probe.quantity);
  return d === 'pressure' ? 'absolute-pressure' : d;
}

/** Reads `<element>.<quantity>`; `forControl` refuses controller probes (a controller measures the network). */
export function readProbe(ck: Checker, node: YNode, cx: ExpectContext, forControl = false): Probe | undefined {
  const text = ck.text(node, '`probe`', PROBE_HINT);
  if (text === undefined) return undefined;
  // the element may be a cylinder's side: `clamp.cap.gauge`
  const m = /^\s*([A-Za-z][A-Za-z0-9_]*(?:\.(?:cap|rod))?)\.([A-Za-z_-]+)\s*$/.exec(text);
  if (!m) {
    ck.error(node, 'bad-probe', `cannot read the probe \`${text}\``, PROBE_HINT);
    return undefined;
  }
  const [, element, quantity] = m;
  let kind: string;
  if (element === 'total') {
    kind = 'total';
    if (cx.names.has('total')) {
      ck.warn(node, 'ambiguous-probe', '`total.*` probes the whole network, not the element named `total`', 'rename the element to probe it');
    }
  } else {
    const entry = cx.names.get(element);
    const probed = (k: string): boolean => (forControl ? k === 'chamber' || k === 'line' || k === 'valve' : k in PROBE_QUANTITIES);
    if (!entry || !probed(entry.kind)) {
      const candidates = [...cx.names.values()].filter((n) => probed(n.kind)).map((n) => n.name);
      const why = entry
        ? `\`${element}\` is a ${entry.kind}, which has no probes${forControl && entry.kind === 'controller' ? ' a controller can measure' : ''}`
        : `the probe names \`${element}\`, which is not defined`;
      ck.error(node, 'unknown-reference', why, (entry ? undefined : didYouMean(element, [...candidates, 'total'])) ?? (forControl ? 'measure a chamber, a line or a valve' : 'probe a chamber, a line, a valve, a cylinder (or its side `<cylinder>.cap`), a controller, or `total.mass`'));
      return undefined;
    }
    kind = entry.kind;
  }
  const allowed: readonly string[] = PROBE_QUANTITIES[kind];
  const law = kind === 'chamber' ? cx.chambers.get(element)?.wall.law : undefined;
  const sphere = law === undefined || (SPHERE_LAWS as readonly string[]).includes(law);
  if (!allowed.includes(quantity) || (quantity === 'stretch' && !sphere)) {
    const own = allowed.filter((q) => q !== 'stretch' || sphere);
    const which = kind === 'total' ? '`total`' : `${kind === 'port' ? 'cylinder side' : kind} \`${element}\``;
    const has = `${which} has ${listChoices(own).replace(/ or (?=[^ ]*$)/, ' and ')}`;
    const close = didYouMean(quantity, own);
    ck.error(node, 'unknown-quantity', `${which} has no quantity \`${quantity}\``, close ? `${close} (${has})` : has);
    return undefined;
  }
  return { element, quantity: quantity as ProbeQuantity, text: text.trim() };
}

/** A time within the simulated interval. */
function readTime(ck: Checker, node: YNode, what: string, duration?: number): number | undefined {
  const t = ck.quantity(node, 'time', what, { ge: 0 });
  if (t !== undefined && duration !== undefined && t > duration) {
    ck.error(node, 'out-of-range', `${what} (${t} s) is after the end of the simulation (${duration} s)`, 'choose a time within `simulate.duration`');
    return undefined;
  }
  return t;
}

/** A comparison value in the probe's dimension (pressures say gauge or abs → Pa absolute). */
export function readProbeValue(ck: Checker, node: YNode, kind: ProbeValueKind, what: string): number | undefined {
  if (kind === 'absolute-pressure') return ck.absolutePressure(node, what);
  if (kind === 'pressure-difference') return ck.pressureDifference(node, what);
  if (kind === 'fraction') return ck.fraction(node, what);
  return ck.quantity(node, kind, what);
}

function readWithin(ck: Checker, node: YNode, kind: ProbeValueKind): { abs: number } | { rel: number } | undefined {
  if (kind !== 'fraction' && node.kind === 'scalar' && typeof node.value === 'string' && node.value.trim().endsWith('%')) {
    const r = ck.checked(node, parseFraction(node.value), '`within`', { gt: 0 });
    return r === undefined ? undefined : { rel: r };
  }
  const bounds = { gt: 0 };
  const abs =
    kind === 'absolute-pressure' || kind === 'pressure-difference'
      ? ck.pressureDifference(node, '`within`', bounds)
      : kind === 'fraction'
        ? ck.fraction(node, '`within`', bounds)
        : ck.quantity(node, kind === 'temperature' ? 'temperature-difference' : kind, '`within`', bounds);
  return abs === undefined ? undefined : { abs };
}

function readComparison(ck: Checker, map: YMap, q: ProbeValueKind, what: string): Comparison | undefined {
  const given = COMPARISONS.filter((k) => ck.get(map, k) !== undefined);
  if (given.length !== 1) {
    const where = given.length ? ck.keyWhere(map, given[1]) : ck.missingAt(map, 'below');
    ck.error(where, given.length ? 'conflicting-keys' : 'missing-key', `${what} needs exactly one of below, above, near`, 'write e.g. `below: 30 kPa gauge` or `near: { value: 20 kPa gauge, within: 5% }`');
    return undefined;
  }
  const kind = given[0];
  const node = ck.get(map, kind) as YNode;
  if (kind !== 'near') {
    const value = readProbeValue(ck, node, q, `\`${kind}\``);
    return value === undefined ? undefined : { kind, value };
  }
  const near = ck.map(node, '`near`', 'write `near: { value: 20 kPa gauge, within: 5% }`');
  if (!near) return undefined;
  ck.checkKeys(near, NEAR.params.map((p) => p.name), '`near`');
  const v = ck.params(near, NEAR.params);
  const value = v.value ? readProbeValue(ck, v.value as YNode, q, '`value`') : undefined;
  const within = v.within ? readWithin(ck, v.within as YNode, q) : undefined;
  return value === undefined || within === undefined ? undefined : { kind: 'near', value, within };
}

function readWhen(ck: Checker, map: YMap, cx: ExpectContext, what: string): Extract<ExpectSpec, { kind: 'probe' }>['when'] | undefined {
  const at = ck.get(map, 'at');
  const over = ck.get(map, 'over');
  const stat = ck.get(map, 'stat');
  if ((at ? 1 : 0) + (over ? 1 : 0) !== 1) {
    ck.error(at && over ? ck.keyWhere(map, 'over') : ck.missingAt(map, 'at'), at && over ? 'conflicting-keys' : 'missing-key', `${what} needs exactly one of \`at\` and \`over\``, 'write `at: end`, `at: 2 s`, or `over: [1 s, 3 s]` with `stat: max`');
    return undefined;
  }
  if (at) {
    if (stat) ck.error(ck.keyWhere(map, 'stat'), 'conflicting-keys', '`stat` goes with `over`, not with `at`', 'remove `stat`, or use `over: [t0, t1]`');
    if (at.kind === 'scalar' && at.value === 'end') return { at: 'end' };
    const t = readTime(ck, at, '`at`', cx.duration);
    return t === undefined || stat ? undefined : { at: t };
  }
  const seq = ck.seq(over as YNode, '`over`', 'write `over: [1 s, 3 s]`');
  if (!seq) return undefined;
  if (seq.items.length !== 2) {
    ck.error(seq, 'wrong-type', '`over` must be a pair [t0, t1]', 'write `over: [1 s, 3 s]`');
    return undefined;
  }
  const t0 = readTime(ck, seq.items[0], 'the start of `over`', cx.duration);
  const t1 = readTime(ck, seq.items[1], 'the end of `over`', cx.duration);
  const s = stat ? ck.enumValue(stat, STATS, '`stat`') : undefined;
  if (!stat) ck.error(ck.missingAt(map, 'stat'), 'missing-key', '`over` needs `stat`', `add \`stat:\` with ${listChoices(STATS)}`);
  if (t0 !== undefined && t1 !== undefined && !(t0 < t1)) {
    ck.error(seq.items[1], 'out-of-range', '`over` must end after it starts', 'write `over: [t0, t1]` with t0 < t1');
    return undefined;
  }
  if (t0 === undefined || t1 === undefined || s === undefined) return undefined;
  return { over: [t0, t1], stat: s as 'max' | 'min' | 'mean' | 'overshoot' };
}

function scalarText(node: YNode | undefined): string {
  if (!node) return '';
  if (node.kind === 'scalar') return String((node as YScalar).value);
  if (node.kind === 'seq') return `[${node.items.map(scalarText).join(', ')}]`;
  return `{ ${node.entries.map((e) => `${e.key}: ${scalarText(e.value)}`).join(', ')} }`;
}

function defaultName(map: YMap): string {
  if (map.entries.some((e) => e.key === 'settles')) return `settles ${scalarText(map.entries.find((e) => e.key === 'settles')?.value)}`;
  return map.entries
    .filter((e) => e.key !== 'name')
    .map((e) => (e.key === 'probe' ? scalarText(e.value) : `${e.key} ${scalarText(e.value)}`))
    .join(' ');
}

function readSettles(ck: Checker, map: YMap, name: string, cx: ExpectContext): ExpectSpec | undefined {
  const extra = map.entries.find((e) => e.key !== 'name' && e.key !== 'settles' && e.key !== 'probe');
  if (extra) {
    ck.error({ pos: extra.keyPos, path: [...map.path, extra.key] }, 'conflicting-keys', `\`settles\` stands alone; \`${extra.key}\` does not go with it`, 'put probe checks in their own list item');
    return undefined;
  }
  const s = ck.map(ck.get(map, 'settles') as YNode, '`settles`', 'write `settles: { within: 3 s, band: 2% }`');
  if (!s) return undefined;
  ck.checkKeys(s, SETTLES.params.map((p) => p.name), '`settles`');
  const v = ck.params(s, SETTLES.params);
  const within = v.within as number | undefined;
  if (within !== undefined && cx.duration !== undefined && within > cx.duration) {
    ck.error(ck.get(s, 'within') ?? s, 'out-of-range', `\`within\` (${within} s) is after the end of the simulation (${cx.duration} s)`, 'choose a time within `simulate.duration`');
    return undefined;
  }
  const probeNode = ck.get(map, 'probe');
  const probe = probeNode ? readProbe(ck, probeNode, cx) : undefined;
  if (within === undefined || v.band === undefined || (probeNode && !probe)) return undefined;
  if (ck.get(s, 'relative-to') && v['relative-to'] === undefined) return undefined;
  const relativeTo = (v['relative-to'] ?? 'excursion') as 'excursion' | 'final-value';
  const spec: ExpectSpec = { kind: 'settles', name, within, band: v.band as number, relativeTo, pos: ck.sourcePos({ pos: map.pos, path: map.path }) };
  if (probe) spec.probe = probe;
  return spec;
}

/** The quantity a probe's text names (`x.gauge` → gauge), whatever its element; or undefined. */
function probeQuantity(node: YNode): ProbeQuantity | undefined {
  if (node.kind !== 'scalar' || typeof node.value !== 'string') return undefined;
  const q = /\.([A-Za-z_-]+)\s*$/.exec(node.value)?.[1];
  return q !== undefined && q in QUANTITY_DIMENSION ? (q as ProbeQuantity) : undefined;
}

function readOne(ck: Checker, item: YNode, cx: ExpectContext): ExpectSpec | undefined {
  const map = ck.map(item, 'an expectation', 'write e.g. `- { name: peak, probe: cell_a.gauge, over: [0 s, 5 s], stat: max, below: 30 kPa gauge }`');
  if (!map) return undefined;
  ck.checkKeys(map, EXPECT.params.map((p) => p.name), 'an expectation');
  const nameNode = ck.get(map, 'name');
  const given = nameNode ? ck.scalar(nameNode, '`name`', 'write a short name') : undefined;
  const name = nameNode ? (given === undefined ? undefined : String(given)) : defaultName(map);
  if (name === undefined) return undefined;
  if (ck.get(map, 'settles')) return readSettles(ck, map, name, cx);
  const probeNode = ck.get(map, 'probe');
  if (!probeNode) {
    ck.error(ck.missingAt(map, 'probe'), 'missing-key', 'an expectation needs `probe` (or `settles`)', PROBE_HINT);
    return undefined;
  }
  const probe = readProbe(ck, probeNode, cx);
  const what = `the expectation \`${name}\``;
  const when = readWhen(ck, map, cx, what);
  // a probe that cannot be resolved (a misspelt element) still names its quantity: the values
  // are checked in that dimension too, so that every problem shows in one pass
  const overshoot = when !== undefined && 'over' in when && when.stat === 'overshoot';
  const quantity = probe?.quantity ?? probeQuantity(probeNode);
  const valueKind = overshoot ? 'fraction' : probe ? probeValueKind(probe, cx.controllers) : quantity ? probeValueKind({ element: '', quantity, text: '' }, cx.controllers) : undefined;
  const compare = valueKind ? readComparison(ck, map, valueKind, what) : undefined;
  if (!probe || !when || !compare) return undefined;
  return { kind: 'probe', name, probe, when, compare, pos: ck.sourcePos({ pos: map.pos, path: map.path }) };
}

export function readExpect(ck: Checker, node: YNode, cx: ExpectContext): ExpectSpec[] {
  if (node.kind === 'scalar' && node.value === null) return [];
  const seq = ck.seq(node, '`expect`', 'write a list: `expect:\n  - { probe: cell_a.gauge, at: end, below: 30 kPa gauge }`');
  if (!seq) return [];
  const out: ExpectSpec[] = [];
  const seen = new Map<string, number>();
  seq.items.forEach((item, i) => {
    const spec = readOne(ck, item, cx);
    if (!spec) return;
    if (seen.has(spec.name)) {
      ck.error(item, 'duplicate-name', `two expectations are named \`${spec.name}\` (items ${(seen.get(spec.name) as number) + 1} and ${i + 1})`, 'give each expectation its own name (reports and JUnit need them unique)');
      return;
    }
    seen.set(spec.name, i);
    out.push(spec);
  });
  return out;
}
