/**
 * Lines, valves and feeds: what connects the nodes.
 *
 * A line or valve joins two nodes (chambers, reservoirs, or `ambient`), never a node to
 * itself. A valve has exactly one rating (ISO 6358 conductance + critical-ratio, or orifice +
 * discharge-coefficient) and exactly one way of opening (initially/schedule, check, or
 * relief). With `in-line: <line>` it sits inside that line: its from/to may be omitted (they
 * are copied from the line) or, if given, must equal the line's. One valve per line.
 * A feed puts mass into a chamber at a mass flow or at a standard volume flow (`ANR`).
 */
import { listChoices } from '../diag/did-you-mean.js';
import { parseQuantity } from '../units/quantity.js';
import type { Checker } from './checker.js';
import { CHECK, FEED, LINE, REGULATES, RELIEF, VALVE, VALVE_OPERATIONS, VALVE_RATINGS, type KindTable } from './kinds.js';
import { resolve, type NameEntry, type Names } from './names.js';
import { readOpening, readSchedule } from './schedule.js';
import type { FeedCurve, FeedSpec, FlowValue, LineSpec, ValveOperation, ValveRating, ValveSpec } from './types.js';
import type { YMap, YNode } from './yaml-types.js';

const NODE_KINDS = ['chamber', 'port', 'reservoir'] as const;
const RATE_HINT = 'write a mass flow (`0.5 g/s`) or a standard volume flow at ISO 8778 (`10 L/min ANR`)';

function keysOf(tables: readonly KindTable[]): string[] {
  return tables.flatMap((t) => t.params.map((p) => p.name));
}

/** The tables among `tables` that have a key present in `map`. */
function groupsPresent(ck: Checker, map: YMap, tables: readonly KindTable[]): KindTable[] {
  return tables.filter((t) => t.params.some((p) => ck.get(map, p.name) !== undefined));
}

/** Reads from/to and checks them: existing nodes, not the same. */
function readEnds(ck: Checker, map: YMap, what: string, from: unknown, to: unknown, names: Names): boolean {
  const fromNode = ck.get(map, 'from');
  const toNode = ck.get(map, 'to');
  let ok = typeof from === 'string' && typeof to === 'string';
  if (typeof from === 'string' && fromNode) ok = resolve(ck, names, fromNode, from, NODE_KINDS, `\`from\` of ${what}`) && ok;
  if (typeof to === 'string' && toNode) ok = resolve(ck, names, toNode, to, NODE_KINDS, `\`to\` of ${what}`) && ok;
  if (typeof from === 'string' && from === to) {
    ck.error(toNode ?? map, 'self-connection', `${what} connects \`${from}\` to itself`, 'connect two different nodes');
    ok = false;
  }
  return ok;
}

export function readLine(ck: Checker, entry: NameEntry, names: Names): LineSpec | undefined {
  const what = `line \`${entry.name}\``;
  const map = ck.map(entry.node, what, 'write e.g. `supply: { from: tank, to: cell_a, diameter: 4 mm, length: 2 m }`');
  if (!map) return undefined;
  ck.checkKeys(map, LINE.params.map((p) => p.name), what);
  const v = ck.params(map, LINE.params);
  const ends = readEnds(ck, map, what, v.from, v.to, names);
  if (!ends || [v.diameter, v.length, v.roughness].some((x) => x === undefined)) return undefined;
  const spec: LineSpec = {
    name: entry.name,
    from: v.from as string,
    to: v.to as string,
    diameter: v.diameter as number,
    length: v.length as number,
    roughness: v.roughness as number,
    model: (v.model as 'lumped' | 'wave' | undefined) ?? 'lumped',
    pos: ck.sourcePos(entry.where),
  };
  const segNode = ck.get(map, 'segments');
  if (segNode) {
    if (v.segments === undefined) return undefined;
    if (spec.model !== 'wave') {
      ck.error(segNode, 'conflicting-keys', `${what} has \`segments\` but is a lumped line`, 'add `model: wave`, or remove `segments`');
      return undefined;
    }
    spec.segments = v.segments as number;
  }
  if (spec.roughness >= spec.diameter / 2) {
    ck.error(ck.get(map, 'roughness') ?? map, 'out-of-range', '`roughness` must be much smaller than the diameter', 'typical roughness is 0 to a few µm');
    return undefined;
  }
  if (spec.length < spec.diameter) {
    // a stub this short is an orifice, not a tube: friction laws assume a developed flow
    ck.warn(ck.get(map, 'length') ?? map, 'short-line', `line \`${entry.name}\` is shorter than its diameter (${spec.length} m against ${spec.diameter} m): the tube-friction law does not describe it`, 'model a short connection as a valve with an orifice, or join the chambers into one');
  }
  return spec;
}

function readRating(ck: Checker, map: YMap, what: string): ValveRating | undefined {
  const present = groupsPresent(ck, map, VALVE_RATINGS);
  if (present.length === 0) {
    ck.error(ck.missingAt(map, 'conductance'), 'missing-key', `${what} has no flow rating`, 'add `conductance` + `critical-ratio` (ISO 6358), or `orifice` + `discharge-coefficient`');
    return undefined;
  }
  if (present.length > 1) {
    ck.error(ck.keyWhere(map, 'orifice'), 'conflicting-keys', `${what} has two flow ratings (ISO 6358 and orifice)`, 'give either `conductance` + `critical-ratio` or `orifice` + `discharge-coefficient`');
    return undefined;
  }
  const table = present[0];
  const v = ck.params(map, table.params);
  if (table.params.some((p) => v[p.name] === undefined)) return undefined;
  if (table.kind === 'iso6358') {
    return { kind: 'iso6358', conductance: v.conductance as number, criticalRatio: v['critical-ratio'] as number, subsonicIndex: v['subsonic-index'] as number };
  }
  return { kind: 'orifice', diameter: v.orifice as number, dischargeCoefficient: v['discharge-coefficient'] as number };
}

/** A YAML boolean (`true`/`false`). */
function readBoolean(ck: Checker, node: YNode, what: string): boolean | undefined {
  if (node.kind === 'scalar' && typeof node.value === 'boolean') return node.value;
  if (node.kind === 'scalar' && typeof node.value === 'string' && /^(true|false)$/i.test(node.value.trim())) return node.value.trim().toLowerCase() === 'true';
  ck.error(node, 'wrong-type', `${what} must be \`true\` or \`false\``, `write \`${what.replace(/`/g, '')}: true\``);
  return undefined;
}

function readRegulator(ck: Checker, map: YMap, what: string): ValveOperation | undefined {
  const table = VALVE_OPERATIONS.find((t) => t.kind === 'regulator') as KindTable;
  const v = ck.params(map, table.params.filter((p) => p.name === 'time-constant'));
  const regNode = ck.get(map, 'regulates');
  if (!regNode) {
    ck.missing(map, 'regulates', `${what} has \`${ck.get(map, 'relieving') ? 'relieving' : 'time-constant'}\` but no \`regulates\``, 'add `regulates: { set: 4 bar gauge, band: 0.3 bar }`');
    return undefined;
  }
  const m = ck.map(regNode, '`regulates`', 'write e.g. `regulates: { set: 4 bar gauge, band: 0.3 bar }`');
  if (!m) return undefined;
  ck.checkKeys(m, REGULATES.params.map((p) => p.name), '`regulates`');
  const r = ck.params(m, REGULATES.params);
  const relNode = ck.get(map, 'relieving');
  const relieving = relNode ? readBoolean(ck, relNode, '`relieving`') : false;
  if (!relNode) ck.defaulted.push([...map.path, 'relieving'].join('.'));
  const set = r.set as number | undefined;
  const band = r.band as number | undefined;
  const tau = v['time-constant'] as number | undefined;
  if (set === undefined || band === undefined || relieving === undefined || tau === undefined) return undefined;
  if (set - band + ck.ambientPa < 0) {
    ck.warn(ck.get(m, 'band') ?? m, 'band-below-vacuum', `${what}: set − band (${((set - band) / 1000).toPrecision(4)} kPa gauge) is below vacuum, so the regulator is never fully open`, 'a proportional band is usually a small fraction of the set pressure');
  }
  return { kind: 'regulator', set, band, relieving, timeConstant: tau };
}

function readOperation(ck: Checker, map: YMap, what: string, drivenBy?: string): ValveOperation | undefined {
  const present = groupsPresent(ck, map, VALVE_OPERATIONS);
  if (drivenBy !== undefined) {
    // a conflict is reported at the controller's `drives` (netlist/controllers.ts)
    return present.length === 0 ? { kind: 'driven', controller: drivenBy } : undefined;
  }
  if (present.length === 0) {
    ck.error(ck.missingAt(map, 'initially'), 'missing-key', `${what} does not say how it opens`, 'add `initially: open`, a `schedule`, `check: { cracking }`, `relief: { opens-above, reseats-below }`, `regulates: { set, band }`, or drive it by a controller');
    return undefined;
  }
  if (present.length > 1) {
    const keys = present.map((t) => t.params.find((p) => ck.get(map, p.name))?.name ?? t.kind);
    ck.error(ck.keyWhere(map, keys[1]), 'conflicting-keys', `${what} has ${keys.map((k) => `\`${k}\``).join(' and ')}; a valve opens in one way`, `keep one of ${listChoices(['initially/schedule', 'check', 'relief', 'regulates'])}`);
    return undefined;
  }
  switch (present[0].kind) {
    case 'schedule': {
      const initNode = ck.get(map, 'initially');
      const schedNode = ck.get(map, 'schedule');
      const initially = initNode ? readOpening(ck, initNode, '`initially`') : 0;
      const steps = schedNode ? readSchedule(ck, schedNode) : [];
      if (initially === undefined || steps === undefined) return undefined;
      return { kind: 'schedule', initially, steps };
    }
    case 'regulator':
      return readRegulator(ck, map, what);
    case 'check': {
      const m = ck.map(ck.get(map, 'check') as YNode, '`check`', 'write e.g. `check: { cracking: 5 kPa }`');
      if (!m) return undefined;
      ck.checkKeys(m, CHECK.params.map((p) => p.name), '`check`');
      const cracking = ck.param(m, CHECK.params[0]) as number | undefined;
      return cracking === undefined ? undefined : { kind: 'check', cracking };
    }
    default: {
      const m = ck.map(ck.get(map, 'relief') as YNode, '`relief`', 'write e.g. `relief: { opens-above: 50 kPa gauge, reseats-below: 45 kPa gauge }`');
      if (!m) return undefined;
      ck.checkKeys(m, RELIEF.params.map((p) => p.name), '`relief`');
      const v = ck.params(m, RELIEF.params);
      const opens = v['opens-above'] as number | undefined;
      const reseats = v['reseats-below'] as number | undefined;
      const full = v['full-lift-at'] as number | undefined;
      const reseatsNode = ck.get(m, 'reseats-below');
      const fullNode = ck.get(m, 'full-lift-at');
      if (reseatsNode && fullNode) {
        ck.error(fullNode, 'conflicting-keys', '`relief` has `reseats-below` and `full-lift-at`; a relief valve acts in one way', 'keep `reseats-below` for pop action or `full-lift-at` for proportional lift');
        return undefined;
      }
      if (!reseatsNode && !fullNode) {
        ck.error(m, 'missing-key', '`relief` needs `reseats-below` (pop action) or `full-lift-at` (proportional lift)', 'write e.g. `relief: { opens-above: 50 kPa gauge, reseats-below: 45 kPa gauge }` or `relief: { opens-above: 50 kPa gauge, full-lift-at: 55 kPa gauge }`');
        return undefined;
      }
      if (opens === undefined) return undefined;
      if (fullNode) {
        if (full === undefined) return undefined;
        if (!(full > opens)) {
          ck.error(fullNode, 'out-of-range', '`full-lift-at` must be higher than `opens-above`', 'a proportional relief valve starts lifting at `opens-above` and is fully open at `full-lift-at` (about 10 % above the set pressure is common practice)');
          return undefined;
        }
        return { kind: 'relief', opensAbove: opens, reseatsBelow: opens, fullLiftAt: full };
      }
      if (reseats === undefined) return undefined;
      if (!(reseats < opens)) {
        ck.error(ck.get(m, 'reseats-below') ?? m, 'out-of-range', '`reseats-below` must be lower than `opens-above`', 'a relief valve recloses below the pressure at which it opens');
        return undefined;
      }
      return { kind: 'relief', opensAbove: opens, reseatsBelow: reseats };
    }
  }
}

/** in-line: the line exists, holds no other valve, and from/to agree with it. */
function readInLine(ck: Checker, map: YMap, what: string, v: Record<string, unknown>, lines: Map<string, LineSpec>, names: Names, taken: Map<string, string>): { from?: string; to?: string; ok: boolean } {
  const lineName = v['in-line'] as string;
  const node = ck.get(map, 'in-line') as YNode;
  if (!resolve(ck, names, node, lineName, ['line'], `\`in-line\` of ${what}`)) return { ok: false };
  const line = lines.get(lineName);
  if (!line) return { ok: false }; // the line itself has errors, already reported
  const other = taken.get(lineName);
  if (other) {
    ck.error(node, 'conflicting-keys', `line \`${lineName}\` already holds valve \`${other}\``, 'one valve per line; put a second valve in its own line');
    return { ok: false };
  }
  let ok = true;
  for (const end of ['from', 'to'] as const) {
    const given = v[end] as string | undefined;
    if (given !== undefined && given !== line[end]) {
      ck.error(ck.get(map, end) ?? map, 'in-line-mismatch', `\`${end}\` of ${what} is \`${given}\` but line \`${lineName}\` goes ${end} \`${line[end]}\``, `omit \`from\`/\`to\` with \`in-line\` (they are taken from the line), or make them agree`);
      ok = false;
    }
  }
  return { from: line.from, to: line.to, ok };
}

/**
 * `drivenBy`: the controller that drives this valve, if any (found by a first pass over the
 * controllers); such a valve has no way of opening of its own.
 */
export function readValve(ck: Checker, entry: NameEntry, names: Names, lines: Map<string, LineSpec>, taken: Map<string, string>, drivenBy?: string): ValveSpec | undefined {
  const what = `valve \`${entry.name}\``;
  const map = ck.map(entry.node, what, 'write e.g. `v1: { from: tank, to: cell_a, conductance: 0.9 L/(s*bar), critical-ratio: 0.3, initially: open }`');
  if (!map) return undefined;
  ck.checkKeys(map, keysOf([VALVE, ...VALVE_RATINGS, ...VALVE_OPERATIONS]), what);
  const v = ck.params(map, VALVE.params);
  let from = v.from as string | undefined;
  let to = v.to as string | undefined;
  let ends = true;
  if (ck.get(map, 'in-line')) {
    if (v['in-line'] === undefined) ends = false;
    else {
      const r = readInLine(ck, map, what, v, lines, names, taken);
      if (r.ok) taken.set(v['in-line'] as string, entry.name);
      ({ from, to } = r);
      ends = r.ok;
    }
  } else {
    for (const end of ['from', 'to'] as const) {
      if (!ck.get(map, end)) {
        ck.missing(map, end, `${what} has no \`${end}\``, 'give `from` and `to`, or `in-line: <line>`');
      }
    }
    ends = ck.get(map, 'from') !== undefined && ck.get(map, 'to') !== undefined && readEnds(ck, map, what, from, to, names);
  }
  const rating = readRating(ck, map, what);
  const operation = readOperation(ck, map, what, drivenBy);
  if (!ends || !rating || !operation || from === undefined || to === undefined) return undefined;
  const spec: ValveSpec = { name: entry.name, from, to, rating, operation, pos: ck.sourcePos(entry.where) };
  if (v['in-line'] !== undefined) spec.inLine = v['in-line'] as string;
  return spec;
}

/** `0.5 g/s` (mass flow) or `10 L/min ANR` (standard volume flow, ISO 8778). */
function readRate(ck: Checker, node: YNode, what = '`rate`'): FlowValue | undefined {
  const v = ck.scalar(node, what, RATE_HINT);
  if (v === undefined) return undefined;
  const anr = typeof v === 'string' ? /^(.*?)\s*\bANR\s*$/i.exec(v) : null;
  if (anr) {
    const value = ck.checked(node, parseQuantity(anr[1], 'volume-flow'), what, { ge: 0 }, 'm³/s ANR');
    return value === undefined ? undefined : { kind: 'anr', value };
  }
  const mass = parseQuantity(v, 'mass-flow');
  if (!mass.ok && mass.code === 'unit-dimension' && parseQuantity(v, 'volume-flow').ok) {
    ck.error(node, 'volume-flow-without-anr', `${what} \`${v}\` is a volume flow, whose mass depends on pressure and temperature`, `write \`${String(v).trim()} ANR\` for a standard volume flow (ISO 8778: 20 °C, 100 kPa), or a mass flow such as \`0.5 g/s\``);
    return undefined;
  }
  const value = ck.checked(node, mass, what, { ge: 0 }, 'kg/s');
  return value === undefined ? undefined : { kind: 'mass', value };
}

const CURVE_HINT = 'write e.g. `curve: [[0 bar gauge, 300 L/min ANR], [6 bar gauge, 220 L/min ANR], [8 bar gauge, 0 L/min ANR]]`';

/**
 * A delivery curve: rows [pressure, flow], pressures (gauge or abs) strictly increasing,
 * flows ≥ 0. Delivery must end somewhere: at a last row with zero flow, or at `shut-off`
 * above the last row (the flow falls linearly to zero there). Held at the first row's flow
 * below it.
 */
function readCurve(ck: Checker, node: YNode, shutOff: number | undefined, shutNode: YNode | undefined, what: string): FeedCurve | undefined {
  const seq = ck.seq(node, '`curve`', CURVE_HINT);
  if (!seq) return undefined;
  if (seq.items.length < 1) {
    ck.error(seq, 'too-few-points', 'the delivery curve is empty', CURVE_HINT);
    return undefined;
  }
  const pressure: number[] = [];
  const flow: FlowValue[] = [];
  let ok = true;
  seq.items.forEach((row, i) => {
    if (row.kind !== 'seq' || row.items.length !== 2) {
      ck.error(row, 'wrong-type', `row ${i + 1} of the delivery curve must be a pair [pressure, flow]`, 'write e.g. `[6 bar gauge, 220 L/min ANR]`');
      ok = false;
      return;
    }
    const p = ck.absolutePressure(row.items[0], `the pressure in row ${i + 1}`);
    const q = readRate(ck, row.items[1], `the flow in row ${i + 1}`);
    if (p !== undefined && pressure.length && p <= pressure[pressure.length - 1]) {
      ck.error(row.items[0], 'table-order', `the pressure in row ${i + 1} is not above the previous row's`, 'pressures in a delivery curve must be strictly increasing');
      ok = false;
      return;
    }
    if (p === undefined || q === undefined) { ok = false; return; }
    pressure.push(p);
    flow.push(q);
  });
  if (!ok) return undefined;
  const last = pressure.length - 1;
  if (shutOff !== undefined) {
    if (!(shutOff > pressure[last])) {
      ck.error(shutNode ?? node, 'out-of-range', `\`shut-off\` of ${what} must lie above the curve's last pressure`, 'the delivered flow falls linearly from the last row to zero at the shut-off pressure');
      return undefined;
    }
    return { pressure, flow, shutOff };
  }
  if (flow[last].value !== 0) {
    ck.error(seq.items[last], 'curve-open-end', `the delivery curve of ${what} ends with a non-zero flow and there is no \`shut-off\`: above its last pressure the delivery would be a guess`, 'add `shut-off: <pressure>` where delivery stops, or end the curve with a row at zero flow');
    return undefined;
  }
  return { pressure, flow, shutOff: pressure[last] };
}

export function readFeed(ck: Checker, entry: NameEntry, names: Names): FeedSpec | undefined {
  const what = `feed \`${entry.name}\``;
  const map = ck.map(entry.node, what, 'write e.g. `pump: { into: cell_a, rate: 10 L/min ANR }`');
  if (!map) return undefined;
  ck.checkKeys(map, FEED.params.map((p) => p.name), what);
  const v = ck.params(map, FEED.params);
  const into = v.into as string | undefined;
  const intoOk = into !== undefined && resolve(ck, names, ck.get(map, 'into') as YNode, into, ['chamber', 'port'], `\`into\` of ${what}`);
  const shutNode = ck.get(map, 'shut-off');
  let rate = v.rate ? readRate(ck, v.rate as YNode) : undefined;
  if (rate && rate.value === 0) {
    ck.error(v.rate as YNode, 'out-of-range', '`rate` must be greater than 0', 'give the feed a positive rate, or remove it');
    rate = undefined;
  }
  let curve: FeedCurve | undefined;
  let curveOk = true;
  if (v.curve) {
    if (v.rate) {
      ck.error(ck.keyWhere(map, 'curve'), 'conflicting-keys', `${what} has both \`rate\` and \`curve\``, 'a feed with a delivery curve takes its flow from the curve: remove `rate`');
      curveOk = false;
    }
    curve = readCurve(ck, v.curve as YNode, v['shut-off'] as number | undefined, shutNode, what);
    curveOk &&= curve !== undefined && !(shutNode && v['shut-off'] === undefined);
    if (curve) rate = curve.flow[0];
  } else if (shutNode) {
    ck.error(ck.keyWhere(map, 'shut-off'), 'shut-off-needs-curve', `${what} has a \`shut-off\` but no delivery \`curve\``, 'give `curve: [[pressure, flow], ...]`: the flow falls from its last row to zero at the shut-off pressure');
    curveOk = false;
  } else if (!v.rate) {
    ck.missing(map, 'rate', `${what} has no \`rate\``, 'add `rate: 10 L/min ANR` (or a delivery `curve`)');
  }
  const initially = v.initially ? readOpening(ck, v.initially as YNode, '`initially`') : undefined;
  const steps = v.schedule ? readSchedule(ck, v.schedule as YNode) : [];
  if (!intoOk || !rate || !curveOk || initially === undefined || !steps || into === undefined) return undefined;
  const spec: FeedSpec = { name: entry.name, into, rate, initially, steps, pos: ck.sourcePos(entry.where) };
  if (curve) spec.curve = curve;
  if (v.temperature !== undefined) spec.temperature = v.temperature as number;
  return spec;
}
