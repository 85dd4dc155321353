/**
 * Controllers: `controllers.<name>` with `kind: pid`, `measure: <probe>`, `target`, gains,
 * `drives: <valve>`, output limits, anti-windup, derivative filter and sample period.
 *
 * The control error is e = target − measure in the measured quantity's SI unit; the output is
 * the driven valve's opening u = kp·e + I + D, held within the limits. The gains therefore
 * carry units: kp an opening per unit of the measure (`2 %/kPa`, or 1/Pa as a bare number),
 * ki per unit and second, kd seconds per unit; a gain of another dimension is an error, by
 * name. A valve driven by a controller has no way of opening of its own (no schedule, check,
 * relief or regulator), and one controller drives it at most.
 */
import { DIMENSIONS, dimensionVector, nameDimension, type Dimension } from '../units/dimensions.js';
import { compileExpression } from '../units/expression.js';
import { readUnit } from '../units/quantity.js';
import type { Checker } from './checker.js';
import { QUANTITY_DIMENSION, readProbe, type ExpectContext } from './expect.js';
import { CONTROLLER, CONTROLLER_KINDS, OUTPUT_LIMITS, VALVE_OPERATIONS } from './kinds.js';
import { resolve, SECTIONS, type NameEntry, type Names } from './names.js';
import { readOpening } from './schedule.js';
import { readPressureSeries, tableSeries, constantSeries } from './time-series.js';
import type { ControllerSpec, Probe, TimeSeries } from './types.js';
import type { YMap, YNode } from './yaml-types.js';

const TIME = 2; // index of the time base dimension (mathjs order: mass, length, time, ...)
/** Filter time constant of a derivative term as a fraction of kd/kp (N = 10, common practice). */
const DERIVATIVE_N = 10;

/**
 * The controllers' `drives:` as written, valve name → controller name (the first that names
 * it), read before the valves so that a driven valve needs no way of opening of its own.
 */
export function drivenValves(ck: Checker, root: YMap): Map<string, string> {
  const out = new Map<string, string>();
  const section = ck.get(root, SECTIONS.controller);
  if (section?.kind !== 'map') return out;
  for (const c of section.entries) {
    if (c.value.kind !== 'map') continue;
    const d = c.value.entries.find((e) => e.key === 'drives')?.value;
    if (d?.kind === 'scalar' && typeof d.value === 'string' && !out.has(d.value.trim())) out.set(d.value.trim(), c.key);
  }
  return out;
}

/** The measure's dimension and a word for it ("a pressure"). */
function measureDimension(m: Probe): Dimension {
  return m.quantity === 'output' || m.quantity === 'error' ? 'dimensionless' : QUANTITY_DIMENSION[m.quantity];
}

const GAIN_FORM: Record<'kp' | 'ki' | 'kd', { shift: number; per: string; example: (unit: string) => string }> = {
  kp: { shift: 0, per: 'an opening per unit of the measure', example: (u) => `2 %/${u}` },
  ki: { shift: -1, per: 'an opening per unit of the measure and second', example: (u) => `5 %/(${u}*s)` },
  kd: { shift: 1, per: 'an opening·second per unit of the measure', example: (u) => `0.1 %*s/${u}` },
};

/** A unit people write for a dimension in gains. */
function gainUnit(d: Dimension): string {
  return d === 'pressure' ? 'kPa' : d === 'mass-flow' ? '(g/s)' : d === 'volume' ? 'L' : d === 'mass' ? 'g' : d === 'temperature' ? 'K' : '1';
}

/**
 * A gain: `2 %/kPa`, `0.02 /kPa`, `5 %/(kPa*s)`, `0.1 %*s/kPa`, or a bare number in SI.
 * Checked against 1/[measure] · s^shift.
 */
function readGain(ck: Checker, node: YNode, which: 'kp' | 'ki' | 'kd', measure: Dimension, owner: string): number | undefined {
  const form = GAIN_FORM[which];
  const unit = gainUnit(measure);
  const hint = `write ${form.per}, e.g. \`${form.example(unit)}\` (a bare number is SI)`;
  const v = ck.scalar(node, `\`${which}\``, hint);
  if (v === undefined) return undefined;
  let value: number;
  let dims: number[];
  if (typeof v === 'number') {
    value = v;
    dims = [];
  } else {
    // `%` is a factor 1/100 on the number (mathjs has no percent unit)
    const m = /^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*\*?\s*(.*)$/.exec(v);
    if (!m) {
      ck.error(node, 'unit-syntax', `cannot read \`${which}: ${v}\` as a gain`, hint);
      return undefined;
    }
    const scale = Number(m[1]) * (m[2] ? 0.01 : 1);
    if (m[3].trim() === '') {
      value = scale;
      dims = [];
    } else {
      const r = readUnit(`1 ${m[3].trim()}`);
      if (!r.ok) {
        ck.valueError(node, r, `\`${which}\``);
        return undefined;
      }
      value = scale * (r.unit.value as number);
      dims = r.unit.dimensions.slice();
    }
  }
  const want = dimensionVector(measure).map((e, i) => -e + (i === TIME ? form.shift : 0));
  const given = want.map((_, i) => dims[i] ?? 0);
  if (typeof v === 'string' && !given.every((e, i) => Math.abs(e - want[i]) < 1e-12)) {
    const got = nameDimension(given);
    ck.error(node, 'unit-dimension', `\`${which}\` of ${owner} must be ${form.per} (${DIMENSIONS[measure].noun} is measured), got ${got ? DIMENSIONS[got].noun : `\`${v.trim()}\``}`, hint);
    return undefined;
  }
  if (!Number.isFinite(value)) {
    ck.error(node, 'not-finite', `\`${which}\` is not a finite number`, hint);
    return undefined;
  }
  return value;
}

/** A set point in a dimension other than pressure: a constant, a table [[t, v], ...] or an expression in t. */
function readQuantitySeries(ck: Checker, node: YNode, dim: Dimension): TimeSeries | undefined {
  if (node.kind === 'seq') {
    const times: number[] = [];
    const values: number[] = [];
    for (const [i, row] of node.items.entries()) {
      if (row.kind !== 'seq' || row.items.length !== 2) {
        ck.error(row, 'wrong-type', `row ${i + 1} of the target table must be a pair [time, value]`, `write e.g. \`[1 s, ${DIMENSIONS[dim].example}]\``);
        return undefined;
      }
      const t = ck.quantity(row.items[0], 'time', `the time in row ${i + 1}`);
      const x = ck.quantity(row.items[1], dim, `the value in row ${i + 1}`);
      if (t === undefined || x === undefined) return undefined;
      if (times.length && t <= times[times.length - 1]) {
        ck.error(row.items[0], 'table-order', `the time in row ${i + 1} is not after the previous row's`, 'times in a table must be strictly increasing');
        return undefined;
      }
      times.push(t);
      values.push(x);
    }
    if (!times.length) {
      ck.error(node, 'too-few-points', 'the target table is empty', 'write at least one row [time, value]');
      return undefined;
    }
    return tableSeries(times, values, 'table');
  }
  const v = ck.scalar(node, '`target`', `write ${DIMENSIONS[dim].noun}, e.g. \`${DIMENSIONS[dim].example}\``);
  if (v === undefined) return undefined;
  if (typeof v === 'string' && /\bt\b|[()^]/.test(v)) {
    const c = compileExpression(v, dim);
    if (!c.ok) {
      ck.valueError(node, c, '`target`');
      return undefined;
    }
    return { at: c.f, breakpoints: [], constant: c.constant, text: v };
  }
  const x = ck.quantity(node, dim, '`target`');
  return x === undefined ? undefined : constantSeries(x, String(v));
}

/** Checks `drives`: a valve, driven by this controller only, with no way of opening of its own. */
function checkDriven(ck: Checker, map: YMap, name: string, valve: string, names: Names, driven: Map<string, string>): boolean {
  const node = ck.get(map, 'drives') as YNode;
  if (!resolve(ck, names, node, valve, ['valve'], `\`drives\` of controller \`${name}\``)) return false;
  const first = driven.get(valve);
  if (first !== undefined && first !== name) {
    ck.error(node, 'conflicting-keys', `valve \`${valve}\` is already driven by controller \`${first}\``, 'one controller drives a valve; cascade controllers by measuring, not by sharing a valve');
    return false;
  }
  const vmap = names.get(valve)?.node;
  if (vmap?.kind !== 'map') return true;
  for (const t of VALVE_OPERATIONS) {
    for (const p of t.params) {
      const e = vmap.entries.find((x) => x.key === p.name);
      if (!e) continue;
      ck.error(node, 'driven-valve-operated', `controller \`${name}\` drives valve \`${valve}\`, which also has \`${p.name}\` (line ${e.keyPos.line})`,
        `remove \`${p.name}\` from valve \`${valve}\`: a controlled valve opens as its controller says (its start opening is the controller's \`initially\`)`);
      return false;
    }
  }
  return true;
}

function readLimits(ck: Checker, node: YNode | undefined, map: YMap): { min: number; max: number } | undefined {
  if (!node) {
    ck.defaulted.push([...map.path, 'limits'].join('.'));
    return { min: 0, max: 1 };
  }
  const m = ck.map(node, '`limits`', 'write e.g. `limits: { min: 5%, max: 100% }`');
  if (!m) return undefined;
  ck.checkKeys(m, OUTPUT_LIMITS.params.map((p) => p.name), '`limits`');
  const v = ck.params(m, OUTPUT_LIMITS.params);
  const min = v.min as number | undefined;
  const max = v.max as number | undefined;
  if (min === undefined || max === undefined) return undefined;
  if (!(min < max)) {
    ck.error(ck.get(m, 'max') ?? m, 'out-of-range', '`max` of the output limits must be above `min`', 'write e.g. `limits: { min: 0%, max: 100% }`');
    return undefined;
  }
  return { min, max };
}

/**
 * `carriesDriven`: names whose flow is a driven valve's (the valves, and the lines that host
 * them). Measuring one closes an algebraic loop (the output sets the flow it measures at the
 * same instant), which is refused.
 */
export function readController(ck: Checker, entry: NameEntry, names: Names, driven: Map<string, string>, cx: ExpectContext, carriesDriven: Set<string>): ControllerSpec | undefined {
  const what = `controller \`${entry.name}\``;
  const map = ck.map(entry.node, what, 'write e.g. `hold: { kind: pid, measure: cell.gauge, target: 30 kPa gauge, kp: 2 %/kPa, ki: 5 %/(kPa*s), drives: fill }`');
  if (!map) return undefined;
  ck.checkKeys(map, CONTROLLER.params.map((p) => p.name), what);
  const scalars = CONTROLLER.params.filter((p) => p.dimension !== 'structure');
  const v = ck.params(map, scalars);
  const measureNode = ck.get(map, 'measure');
  const measure = measureNode && v.measure !== undefined ? readProbe(ck, measureNode, cx, true) : undefined;
  if (measure && carriesDriven.has(measure.element)) {
    ck.error(measureNode as YNode, 'algebraic-loop', `${what} measures \`${measure.text}\`, the flow of a valve a controller drives: the output would set the very flow it measures`, 'measure a chamber pressure, or the flow in a line before or after the valve');
    return undefined;
  }
  const dim = measure ? measureDimension(measure) : undefined;
  const targetNode = ck.get(map, 'target');
  let target: TimeSeries | undefined;
  if (!targetNode) ck.missing(map, 'target', `${what} has no \`target\``, 'add `target: 30 kPa gauge` (in the dimension of what it measures)');
  else if (dim === 'pressure') target = readPressureSeries(ck, targetNode, cx.duration);
  else if (dim) target = readQuantitySeries(ck, targetNode, dim);
  const gains: Record<'kp' | 'ki' | 'kd', number | undefined> = { kp: undefined, ki: 0, kd: 0 };
  for (const k of ['kp', 'ki', 'kd'] as const) {
    const node = ck.get(map, k);
    if (!node) {
      if (k === 'kp') ck.missing(map, 'kp', `${what} has no \`kp\``, 'add `kp:` (proportional gain, e.g. `2 %/kPa`; `kp: 0` for a pure integral controller)');
      else ck.defaulted.push([...map.path, k].join('.'));
      continue;
    }
    gains[k] = dim ? readGain(ck, node, k, dim, what) : undefined;
  }
  const valve = v.drives as string | undefined;
  const drivesOk = valve !== undefined && checkDriven(ck, map, entry.name, valve, names, driven);
  const limits = readLimits(ck, ck.get(map, 'limits'), map);
  const initNode = ck.get(map, 'initially');
  const initially = initNode ? readOpening(ck, initNode, '`initially`') : limits?.min;
  const { kp, ki, kd } = gains;
  if (!measure || !target || kp === undefined || ki === undefined || kd === undefined || !drivesOk || !limits || initially === undefined || v.kind === undefined || v['anti-windup'] === undefined) return undefined;
  if (initially < limits.min || initially > limits.max) {
    ck.error(initNode ?? map, 'out-of-range', `\`initially\` of ${what} lies outside its output limits`, `choose a start integral between ${limits.min * 100} % and ${limits.max * 100} %`);
    return undefined;
  }
  if ([kp, ki, kd].some((g) => g !== 0) && [kp, ki, kd].some((g) => g * (kp || ki || kd) < 0)) {
    ck.warn(map, 'mixed-gain-signs', `the gains of ${what} have different signs`, 'a reverse-acting controller has all its gains negative; mixed signs fight each other');
  }
  const filter = (v['derivative-filter'] as number | undefined) ?? (kd !== 0 && kp !== 0 ? Math.abs(kd / kp) / DERIVATIVE_N : 1e-3);
  const Ti = ki !== 0 ? Math.abs(kp / ki) : Number.POSITIVE_INFINITY;
  const Td = kp !== 0 ? Math.abs(kd / kp) : 0;
  const tracking = (v['tracking-time'] as number | undefined) ?? (Td > 0 && Number.isFinite(Ti) ? Math.sqrt(Ti * Td) : Number.isFinite(Ti) && Ti > 0 ? Ti : 1);
  if (v['anti-windup'] === 'back-calculation' && ki === 0) {
    ck.warn(ck.get(map, 'anti-windup') ?? map, 'no-integral', `${what} has back-calculation anti-windup but no integral action (ki = 0)`, 'anti-windup matters only with `ki`');
  }
  const spec: ControllerSpec = {
    name: entry.name,
    kind: v.kind as (typeof CONTROLLER_KINDS)[number],
    measure,
    target,
    drives: valve as string,
    kp, ki, kd, filter,
    limits,
    antiWindup: v['anti-windup'] as ControllerSpec['antiWindup'],
    tracking,
    initially,
    pos: ck.sourcePos(entry.where),
  };
  if (v.sample !== undefined) spec.sample = v.sample as number;
  return spec;
}
