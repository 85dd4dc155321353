/**
 * A reservoir's pressure as a function of time: a constant, a time table, or a restricted
 * expression in t.
 *
 * - constant: `"300 kPa gauge"`.
 * - table: `[[0 s, 0 kPa gauge], [1 s, 200 kPa gauge], ...]`, times strictly increasing,
 *   linear in between, held constant outside; the table times are the breakpoints.
 * - expression: a string with a trailing qualifier that applies to the whole expression,
 *   `"300 kPa + 50 kPa * sin(2*pi*t/(1 s)) gauge"`, or a mapping
 *   `{ expr: "300 kPa + 50 kPa * sin(2*pi*t/(1 s))", reference: gauge }` (reference `gauge`
 *   or `abs`). t is the time in seconds; see units/expression.ts for what is allowed.
 */
import { compileExpression } from '../units/expression.js';
import { MAX_GAS_PRESSURE, splitQualifier, type PressureReference } from '../units/pressure.js';
import { readUnit } from '../units/quantity.js';
import type { Checker } from './checker.js';
import type { TimeSeries } from './types.js';
import type { YMap, YNode, YScalar } from './yaml-types.js';

/** Points at which an expression is sampled to catch negative absolute pressure. */
const SAMPLES = 1000;
const FORMS_HINT = 'write `300 kPa gauge`, a table `[[0 s, 0 kPa gauge], [1 s, 200 kPa gauge]]`, or an expression `300 kPa + 50 kPa * sin(2*pi*t/(1 s)) gauge`';

export function constantSeries(value: number, text: string): TimeSeries {
  return { at: () => value, breakpoints: [], constant: true, text };
}

/** Linear interpolation in a table, held constant outside. */
export function tableSeries(times: number[], values: number[], text: string): TimeSeries {
  const n = times.length;
  const at = (t: number): number => {
    if (t <= times[0]) return values[0];
    if (t >= times[n - 1]) return values[n - 1];
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (times[mid] <= t) lo = mid;
      else hi = mid;
    }
    const s = (t - times[lo]) / (times[hi] - times[lo]);
    return values[lo] + s * (values[hi] - values[lo]);
  };
  return { at, breakpoints: times.slice(), constant: n === 1 || values.every((v) => v === values[0]), text };
}

/** How a table reads its values: the quantity's name, a reader (SI or undefined) and an example row. */
interface TableValues {
  noun: string;
  read: (ck: Checker, node: YNode, what: string) => number | undefined;
  row: string;
  hint: string;
}

const PRESSURE_VALUES: TableValues = {
  noun: 'pressure',
  read: (ck, node, what) => ck.absolutePressure(node, what),
  row: '`[1 s, 200 kPa gauge]`',
  hint: FORMS_HINT,
};

function readTable(ck: Checker, node: YNode & { kind: 'seq' }, kind: TableValues = PRESSURE_VALUES): TimeSeries | undefined {
  if (node.items.length === 0) {
    ck.error(node, 'too-few-points', `the ${kind.noun} table is empty`, kind.hint);
    return undefined;
  }
  const times: number[] = [];
  const values: number[] = [];
  const texts: string[] = [];
  let ok = true;
  node.items.forEach((row, i) => {
    if (row.kind !== 'seq' || row.items.length !== 2) {
      ck.error(row, 'wrong-type', `row ${i + 1} of the ${kind.noun} table must be a pair [time, ${kind.noun}]`, `write e.g. ${kind.row}`);
      ok = false;
      return;
    }
    const [tn, pn] = row.items;
    const t = ck.quantity(tn, 'time', `the time in row ${i + 1}`);
    const p = kind.read(ck, pn, `the ${kind.noun} in row ${i + 1}`);
    if (t !== undefined && times.length && t <= times[times.length - 1]) {
      ck.error(tn, 'table-order', `the time in row ${i + 1} (${t} s) is not after the previous row's (${times[times.length - 1]} s)`, 'times in a table must be strictly increasing');
      ok = false;
      return;
    }
    if (t === undefined || p === undefined) {
      ok = false;
      return;
    }
    times.push(t);
    values.push(p);
    texts.push(`[${(tn as YScalar).value}, ${(pn as YScalar).value}]`);
  });
  return ok ? tableSeries(times, values, `[${texts.join(', ')}]`) : undefined;
}

function readExpression(ck: Checker, node: YNode, body: string, reference: PressureReference, text: string, duration?: number): TimeSeries | undefined {
  const compiled = compileExpression(body, 'pressure');
  if (!compiled.ok) {
    ck.valueError(node, compiled);
    return undefined;
  }
  const offset = reference === 'gauge' ? ck.ambientPa : 0;
  const g = compiled.f;
  const at = offset === 0 ? g : (t: number) => g(t) + offset;
  if (duration !== undefined) {
    for (let i = 0; i <= SAMPLES; i++) {
      const t = (duration * i) / SAMPLES;
      const p = at(t);
      if (!(p >= 0)) {
        const why = Number.isFinite(p) ? `goes below vacuum (${p.toPrecision(4)} Pa absolute)` : 'is not a finite number';
        ck.error(node, Number.isFinite(p) ? 'out-of-range' : 'not-finite', `the pressure expression ${why} at t = ${t} s`, 'keep the absolute pressure at or above 0');
        return undefined;
      }
      if (p > MAX_GAS_PRESSURE) {
        ck.error(node, 'out-of-range', `the pressure expression reaches ${p.toPrecision(4)} Pa absolute at t = ${t} s, above ${MAX_GAS_PRESSURE / 1e6} MPa, the highest gas pressure plenum accepts`, 'check the units and exponents of the expression');
        return undefined;
      }
    }
  }
  return { at, breakpoints: [], constant: compiled.constant, text };
}

function readExpressionMap(ck: Checker, map: YMap, duration?: number): TimeSeries | undefined {
  ck.checkKeys(map, ['expr', 'reference'], 'a pressure expression');
  const exprNode = ck.get(map, 'expr');
  const refNode = ck.get(map, 'reference');
  if (!exprNode) ck.error(ck.missingAt(map, 'expr'), 'missing-key', '`expr` is required in a pressure expression', 'add `expr: "300 kPa + 50 kPa * sin(2*pi*t/(1 s))"`');
  if (!refNode) ck.error(ck.missingAt(map, 'reference'), 'missing-key', '`reference` is required in a pressure expression', 'add `reference: gauge` or `reference: abs`');
  const expr = exprNode && ck.text(exprNode, '`expr`', 'write the expression as text');
  const ref = refNode && ck.enumValue(refNode, ['gauge', 'abs', 'absolute'], '`reference`');
  if (expr === undefined || ref === undefined || !exprNode) return undefined;
  const reference: PressureReference = ref === 'gauge' ? 'gauge' : 'abs';
  return readExpression(ck, exprNode, expr, reference, `${expr} ${reference}`, duration);
}

/**
 * Characters that only a formula has (operators, brackets, `t`, and what mathjs would read as
 * an assignment, a call, a string or an object), so that `p = 1 bar` or `f(x) = x` is refused
 * as an expression with its reason rather than read as a strange unit.
 */
const FORMULA = /[-+*/^()=<>!?:;,'"[\]{}]|\bt\b/;

/**
 * True when `body` is a single number with a unit rather than a formula. mathjs's unit
 * parser reads `100 kPa * t` as kPa times tonnes, so a standalone `t` always means a formula.
 */
function isPlainValue(body: string): boolean {
  return !/\bt\b/.test(body) && readUnit(body).ok;
}

/**
 * Reads a reservoir pressure (Pa absolute as a function of t). `duration` (s), when known,
 * is used to check that an expression stays at or above vacuum.
 */
export function readPressureSeries(ck: Checker, node: YNode, duration?: number): TimeSeries | undefined {
  if (node.kind === 'seq') return readTable(ck, node);
  if (node.kind === 'map') return readExpressionMap(ck, node, duration);
  const v = ck.scalar(node, '`pressure`', FORMS_HINT);
  if (v === undefined) return undefined;
  if (typeof v === 'number') return void ck.absolutePressure(node, '`pressure`'); // reports: no unit, no reference
  const { body, reference } = splitQualifier(v);
  if (isPlainValue(body) || !FORMULA.test(body.trim().replace(/^[-+]/, ''))) {
    const abs = ck.absolutePressure(node, '`pressure`');
    return abs === undefined ? undefined : constantSeries(abs, v.trim());
  }
  if (!reference) {
    ck.error(node, 'pressure-reference', 'the pressure expression does not say gauge or absolute', 'end it with `gauge` or `abs` (it applies to the whole expression), or write `{ expr: "...", reference: gauge }`');
    return undefined;
  }
  return readExpression(ck, node, body, reference, v.trim(), duration);
}

const FORCE_HINT = 'write a force `40 N`, a table `[[0 s, 0 N], [1 s, 40 N]]`, or an expression in t such as `40 N + 10 N * sin(2*pi*t/(1 s))`';

const FORCE_VALUES: TableValues = {
  noun: 'force',
  read: (ck, node, what) => ck.quantity(node, 'force', what),
  row: '`[1 s, 40 N]`',
  hint: FORCE_HINT,
};

/**
 * Reads a force as a function of time (N): a constant (`40 N`), a table [[t, F], ...] (linear,
 * held outside, its times breakpoints) or an expression in t. Any sign (a negative load assists).
 */
export function readForceSeries(ck: Checker, node: YNode, what: string): TimeSeries | undefined {
  if (node.kind === 'seq') return readTable(ck, node, FORCE_VALUES);
  const v = ck.scalar(node, what, FORCE_HINT);
  if (v === undefined) return undefined;
  if (typeof v === 'number' || isPlainValue(v) || !FORMULA.test(v.trim().replace(/^[-+]/, ''))) {
    const F = ck.quantity(node, 'force', what);
    return F === undefined ? undefined : constantSeries(F, String(v).trim());
  }
  const compiled = compileExpression(v, 'force');
  if (!compiled.ok) {
    ck.valueError(node, compiled, what);
    return undefined;
  }
  return { at: compiled.f, breakpoints: [], constant: compiled.constant, text: v.trim() };
}
