/**
 * What a study varies: `--vary PATH=VALUES` read into grid axes and random parameters, and
 * the cases they make.
 *
 * VALUES is one of
 *   `1.2 mm,1.5 mm,1.8 mm`   a list (grid axis); a single value is a fixed override
 *   `1 mm:2 mm:5`            a range: 5 points from 1 mm to 2 mm, both ends included
 *   `normal(1.5 mm, 0.05 mm)` normal with mean and standard deviation
 *   `uniform(1.4 mm, 1.6 mm)` uniform between the two values
 *   `1.5 mm±3%`, `1.5 mm±0.05 mm` (also `+-`)   uniform over the tolerance band
 * Values are written as in a netlist (units, `gauge`/`abs` for pressures, `%` for fractions).
 *
 * Cases: the grid is the Cartesian product of the list axes, the first `--vary` varying
 * slowest; each grid point is repeated for `samples` random draws. Case k = g·samples + s
 * draws its random values from caseStream(seed, k), in the order the `--vary`s are given.
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { DIMENSIONS, nameDimension } from '../units/dimensions.js';
import { mathUnit } from '../units/math.js';
import type { PressureReference } from '../units/pressure.js';
import { numberText, readScalar, valueText, type ScalarValue } from '../units/scalar.js';
import { caseStream } from './rng.js';

/** Re-exported: the study's own tests read values through it. */
export { readScalar };

/** Largest number of cases a study may have (memory for results, and sanity). */
export const MAX_CASES = 1_000_000;
/** Largest number of points of a range. */
const MAX_RANGE_POINTS = 100_000;

export type VaryKind = 'list' | 'range' | 'normal' | 'uniform' | 'tolerance';

/** Maps x in one unit to SI: si = offset + factor·x (affine for °C and °F). */
export interface UnitMap { unit: string; reference?: PressureReference; anr?: boolean; offset: number; factor: number; siLabel: string; base: number[] }

export interface Distribution {
  kind: 'normal' | 'uniform';
  /** normal: mean and standard deviation; uniform: lower and upper end; in `map.unit`. */
  a: number;
  b: number;
  map: UnitMap;
}

export interface VarySpec {
  /** The whole argument as given. */
  arg: string;
  path: string;
  kind: VaryKind;
  /** Grid values as netlist text (list and range). */
  values?: string[];
  /** SI values of the grid values (null for values that are not numbers, e.g. `open`). */
  si?: (number | null)[];
  dist?: Distribution;
  /** SI unit of the column, or undefined for text values. */
  siLabel?: string;
}

/** One parameter's value in one case. */
export interface ParamValue {
  path: string;
  /** As set in the netlist. */
  text: string;
  /** SI value, or null when the value is not a number. */
  si: number | null;
}

export interface CaseSpec {
  index: number;
  /** Grid point (0 when there is no grid). */
  group: number;
  params: ParamValue[];
}

export interface StudyPlan {
  vary: VarySpec[];
  grid: VarySpec[];
  random: VarySpec[];
  /** Grid points (1 without a grid). */
  groups: number;
  /** Draws per grid point (1 without random parameters). */
  samples: number;
  seed: number;
  cases: number;
}

const UNIT_HINT = 'write values as in a netlist, e.g. `1.2 mm`, `20 kPa gauge`, `40%`';

function problem(code: string, message: string, hint: string, path: string[] = []): Diagnostic {
  return { code, severity: 'error', message, file: '--vary', line: 0, column: 0, path, hint };
}

/** What follows the unit: `gauge`, `abs`, `ANR` or nothing. */
function qualifier(v: ScalarValue): string {
  return v.anr ? 'ANR' : v.reference ?? '';
}

function sameBase(a: number[], b: number[]): boolean {
  return a.length === b.length && a.every((x, i) => x === b[i]);
}

export function unitMap(v: ScalarValue): UnitMap {
  if (v.unit === '%') return { unit: '%', offset: 0, factor: 0.01, siLabel: '-', base: v.base };
  if (v.unit === '') return { unit: '', offset: 0, factor: 1, siLabel: '-', base: v.base };
  const dim = nameDimension(v.base);
  const siUnit = dim ? DIMENSIONS[dim].si : mathUnit(`1 ${v.unit}`).toSI().formatUnits();
  const at = (x: number): number => mathUnit(`${x} ${v.unit}`).toNumber(siUnit);
  const offset = at(0);
  return { unit: v.unit, reference: v.reference, anr: v.anr, offset, factor: at(1) - offset, siLabel: v.siLabel, base: v.base };
}

/** x (in `map.unit`) → SI. */
function toSi(map: UnitMap, x: number): number {
  return map.offset + map.factor * x;
}

/** Reads b as a number in a's unit: same dimension and the same qualifier (gauge, abs, ANR). */
function inUnitOf(a: ScalarValue, bText: string, what: string, allowRelative: boolean, difference: boolean): { ok: true; x: number } | { ok: false; message: string; hint: string } {
  const t = bText.trim();
  if (allowRelative && /%$/.test(t)) {
    const r = readScalar(t);
    if (!r.ok) return r;
    return { ok: true, x: Math.abs(a.x) * r.value.si };
  }
  const r = readScalar(t);
  if (!r.ok) return r;
  const b = r.value;
  if (a.unit === '%' || b.unit === '%') {
    if (a.unit === '%' && b.unit === '%') return { ok: true, x: b.x };
    if (a.unit === '%' && b.unit === '') return { ok: true, x: b.x * 100 };
    return { ok: false, message: `${what} \`${t}\` is not a fraction like \`${valueText(a.x, a)}\``, hint: 'write both as percentages' };
  }
  if (b.unit === '' && a.unit !== '') return { ok: false, message: `${what} \`${t}\` has no unit`, hint: `write it with a unit, e.g. \`${valueText(b.x, a)}\`` };
  if (!sameBase(a.base, b.base)) return { ok: false, message: `${what} \`${t}\` is not the same kind of quantity as \`${valueText(a.x, a)}\``, hint: UNIT_HINT };
  if (!difference && qualifier(a) !== qualifier(b)) {
    return { ok: false, message: `${what} \`${t}\` and \`${valueText(a.x, a)}\` must carry the same qualifier`, hint: 'write both gauge, both abs (or both ANR)' };
  }
  if (difference && b.reference === 'abs') return { ok: false, message: `${what} \`${t}\` is a difference of pressures and cannot be absolute`, hint: 'write a plain pressure, e.g. `1 kPa`' };
  if (a.unit === '') return { ok: true, x: b.x };
  if (difference) {
    // A spread converts without the offset of °C and °F.
    const z = mathUnit(`0 ${b.unit}`).toNumber(a.unit);
    return { ok: true, x: mathUnit(`${b.x} ${b.unit}`).toNumber(a.unit) - z };
  }
  return { ok: true, x: mathUnit(`${b.x} ${b.unit}`).toNumber(a.unit) };
}

function splitList(text: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let start = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '(') depth++;
    else if (c === ')') depth--;
    else if (c === ',' && depth === 0) {
      out.push(text.slice(start, i));
      start = i + 1;
    }
  }
  out.push(text.slice(start));
  return out.map((s) => s.trim());
}

function readDistribution(arg: string, path: string, body: string): Result<VarySpec> {
  const fn = /^(normal|uniform)\s*\((.*)\)$/i.exec(body);
  const tol = /^(.*?)(?:±|\+-|\+\/-)(.*)$/.exec(body);
  const fail = (message: string, hint: string): Result<VarySpec> => ({ ok: false, diagnostics: [problem('vary-value', `${path}: ${message}`, hint, [path])] });
  if (fn) {
    const kind = fn[1].toLowerCase() as 'normal' | 'uniform';
    const args = splitList(fn[2]);
    if (args.length !== 2 || args.some((x) => x === '')) return fail(`\`${body}\` needs two values`, kind === 'normal' ? 'write `normal(MEAN, SD)`, e.g. `normal(1.5 mm, 0.05 mm)`' : 'write `uniform(LOW, HIGH)`, e.g. `uniform(1.4 mm, 1.6 mm)`');
    const a = readScalar(args[0]);
    if (!a.ok) return fail(a.message, a.hint);
    const b = inUnitOf(a.value, args[1], kind === 'normal' ? 'the standard deviation' : 'the upper end', kind === 'normal', kind === 'normal');
    if (!b.ok) return fail(b.message, b.hint);
    if (!Number.isFinite(a.value.x) || !Number.isFinite(b.x)) return fail('the values must be finite', UNIT_HINT);
    if (kind === 'normal' && !(b.x >= 0)) return fail(`the standard deviation of \`${body}\` is negative`, 'write a standard deviation of zero or more');
    if (kind === 'uniform' && !(b.x >= a.value.x)) return fail(`\`${body}\` has its upper end below its lower end`, 'write `uniform(LOW, HIGH)`');
    const map = unitMap(a.value);
    return { ok: true, value: { arg, path, kind, dist: { kind, a: a.value.x, b: b.x, map }, siLabel: map.siLabel }, warnings: [] };
  }
  if (tol && tol[1].trim() && tol[2].trim()) {
    const a = readScalar(tol[1]);
    if (!a.ok) return fail(a.message, a.hint);
    const d = inUnitOf(a.value, tol[2], 'the tolerance', true, true);
    if (!d.ok) return fail(d.message, d.hint);
    if (!(d.x >= 0) || !Number.isFinite(d.x)) return fail(`the tolerance of \`${body}\` must be zero or more`, 'write e.g. `1.5 mm±3%` or `1.5 mm±0.05 mm`');
    const map = unitMap(a.value);
    return { ok: true, value: { arg, path, kind: 'tolerance', dist: { kind: 'uniform', a: a.value.x - d.x, b: a.value.x + d.x, map }, siLabel: map.siLabel }, warnings: [] };
  }
  return fail(`cannot read \`${body}\``, 'write a list `1.2 mm,1.5 mm`, a range `1 mm:2 mm:5`, `normal(MEAN, SD)`, `uniform(LOW, HIGH)` or `NOMINAL±TOL`');
}

function readRange(arg: string, path: string, body: string): Result<VarySpec> {
  const parts = body.split(':');
  const fail = (message: string, hint: string): Result<VarySpec> => ({ ok: false, diagnostics: [problem('vary-value', `${path}: ${message}`, hint, [path])] });
  if (parts.length !== 3) return fail(`the range \`${body}\` needs three parts`, 'write `FROM:TO:N`, e.g. `1 mm:2 mm:5` (N points, both ends included)');
  const n = Number(parts[2].trim());
  if (!Number.isInteger(n) || n < 1 || n > MAX_RANGE_POINTS) return fail(`the number of points \`${parts[2].trim()}\` is not a whole number 1..${MAX_RANGE_POINTS}`, 'write `FROM:TO:N`, e.g. `1 mm:2 mm:5`');
  const a = readScalar(parts[0]);
  if (!a.ok) return fail(a.message, a.hint);
  const b = inUnitOf(a.value, parts[1], 'the end of the range', false, false);
  if (!b.ok) return fail(b.message, b.hint);
  const map = unitMap(a.value);
  const values: string[] = [];
  const si: number[] = [];
  for (let i = 0; i < n; i++) {
    const x = n === 1 ? a.value.x : a.value.x + ((b.x - a.value.x) * i) / (n - 1);
    const text = valueText(x, map, 12);
    values.push(text);
    si.push(toSi(map, Number(numberText(x, 12))));
  }
  return { ok: true, value: { arg, path, kind: 'range', values, si, siLabel: map.siLabel }, warnings: [] };
}

function readList(arg: string, path: string, body: string): Result<VarySpec> {
  const values = splitList(body);
  if (values.some((v) => v === '')) {
    return { ok: false, diagnostics: [problem('vary-value', `${path}: the list \`${body}\` has an empty item`, 'separate values with single commas, e.g. `1.2 mm,1.5 mm`', [path])] };
  }
  const read = values.map((v) => readScalar(v));
  const numbers = read.filter((r): r is { ok: true; value: ScalarValue } => r.ok).map((r) => r.value);
  // Text values (`open`, `adiabatic`, or a misspelt unit) are passed to the reader as they are.
  if (numbers.length < values.length) return { ok: true, value: { arg, path, kind: 'list', values, si: read.map((r) => (r.ok ? r.value.si : null)) }, warnings: [] };
  const withUnit = numbers.find((v) => v.unit !== '' && v.unit !== '%') ?? numbers[0];
  for (const v of numbers) {
    const bare = v.unit === '' && withUnit.unit !== '';
    if (!bare && (!sameBase(v.base, withUnit.base) || qualifier(v) !== qualifier(withUnit) || (v.unit === '%') !== (withUnit.unit === '%'))) {
      return { ok: false, diagnostics: [problem('vary-value', `${path}: the values of \`${body}\` are not all the same kind of quantity`, 'give every value of one --vary in units of the same dimension (and the same gauge/abs)', [path])] };
    }
  }
  return { ok: true, value: { arg, path, kind: 'list', values, si: numbers.map((v) => v.si), siLabel: withUnit.siLabel }, warnings: [] };
}

/** Reads one `--vary PATH=VALUES`. The path is checked against the netlist elsewhere. */
export function parseVary(arg: string): Result<VarySpec> {
  const eq = arg.indexOf('=');
  if (eq <= 0) {
    return { ok: false, diagnostics: [problem('vary-syntax', `\`${arg}\` is not PATH=VALUES`, 'write e.g. `--vary chambers.cell_a.thickness=1.2 mm,1.5 mm` or `--vary "lines.crossover.diameter=normal(3 mm, 0.1 mm)"`')] };
  }
  const path = arg.slice(0, eq).trim();
  const body = arg.slice(eq + 1).trim();
  if (!body) return { ok: false, diagnostics: [problem('vary-syntax', `\`${arg}\` gives no values`, 'write values after `=`, e.g. `1.2 mm,1.5 mm`', [path])] };
  if (/^(normal|uniform)\s*\(/i.test(body) || /±|\+-|\+\/-/.test(body)) return readDistribution(arg, path, body);
  if (body.includes(':')) return readRange(arg, path, body);
  return readList(arg, path, body);
}

/** Lays out a study: grid axes, random parameters, how many cases. */
export function planStudy(vary: VarySpec[], opts: { samples?: number; seed?: number }): Result<StudyPlan> {
  const grid = vary.filter((v) => v.values);
  const random = vary.filter((v) => v.dist);
  const seen = new Set<string>();
  for (const v of vary) {
    if (seen.has(v.path)) return { ok: false, diagnostics: [problem('vary-twice', `\`${v.path}\` is varied twice`, 'give each path one --vary', [v.path])] };
    seen.add(v.path);
  }
  if (random.length && opts.samples === undefined) {
    return { ok: false, diagnostics: [problem('samples-missing', `\`${random[0].path}\` is random but --samples is not given`, 'add e.g. `--samples 200 --seed 1`', [random[0].path])] };
  }
  if (!random.length && opts.samples !== undefined) {
    return { ok: false, diagnostics: [problem('samples-unused', '--samples is given but nothing is random', 'vary a parameter with `normal(...)`, `uniform(...)` or `NOMINAL±TOL`, or drop --samples')] };
  }
  const samples = random.length ? (opts.samples as number) : 1;
  const groups = grid.reduce((n, v) => n * (v.values as string[]).length, 1);
  const cases = groups * samples;
  if (cases > MAX_CASES) {
    return { ok: false, diagnostics: [problem('too-many-cases', `the study has ${cases} cases, more than ${MAX_CASES}`, 'vary fewer values, or split the study')] };
  }
  return { ok: true, value: { vary, grid, random, groups, samples, seed: opts.seed ?? 1, cases }, warnings: [] };
}

/** The indices of grid point g on each axis, first axis slowest. */
function gridIndices(plan: StudyPlan, g: number): number[] {
  const idx = new Array<number>(plan.grid.length);
  for (let a = plan.grid.length - 1; a >= 0; a--) {
    const n = (plan.grid[a].values as string[]).length;
    idx[a] = g % n;
    g = Math.floor(g / n);
  }
  return idx;
}

/** A draw from a distribution with the case's generator. */
function draw(d: Distribution, rng: ReturnType<typeof caseStream>): number {
  return d.kind === 'normal' ? d.a + d.b * rng.normal() : d.a + (d.b - d.a) * rng.uniform();
}

/** Case k of a study: its grid values and its random draws (from caseStream(seed, k) only). */
export function caseSpec(plan: StudyPlan, k: number): CaseSpec {
  const group = Math.floor(k / plan.samples);
  const idx = gridIndices(plan, group);
  const rng = plan.random.length ? caseStream(plan.seed, k) : undefined;
  const params: ParamValue[] = [];
  const byPath = new Map<string, ParamValue>();
  plan.grid.forEach((v, a) => byPath.set(v.path, { path: v.path, text: (v.values as string[])[idx[a]], si: (v.si as (number | null)[])[idx[a]] }));
  for (const v of plan.random) {
    const d = v.dist as Distribution;
    const x = draw(d, rng as ReturnType<typeof caseStream>);
    byPath.set(v.path, { path: v.path, text: valueText(x, d.map), si: toSi(d.map, x) });
  }
  for (const v of plan.vary) params.push(byPath.get(v.path) as ParamValue);
  return { index: k, group, params };
}

/**
 * Values to check before a study runs: every grid value with the other axes at their first
 * value, and each random parameter at its centre and at the ends of a uniform range.
 */
export function preflightSpecs(plan: StudyPlan): ParamValue[][] {
  const nominal = (v: VarySpec): ParamValue => {
    if (v.values) return { path: v.path, text: v.values[0], si: (v.si as (number | null)[])[0] };
    const d = v.dist as Distribution;
    const x = d.kind === 'normal' ? d.a : 0.5 * (d.a + d.b);
    return { path: v.path, text: valueText(x, d.map), si: toSi(d.map, x) };
  };
  const base = plan.vary.map(nominal);
  const out: ParamValue[][] = [base];
  plan.vary.forEach((v, i) => {
    const alternatives: ParamValue[] = [];
    if (v.values) v.values.slice(1).forEach((text, j) => alternatives.push({ path: v.path, text, si: (v.si as (number | null)[])[j + 1] }));
    else if (v.dist?.kind === 'uniform') for (const x of [v.dist.a, v.dist.b]) alternatives.push({ path: v.path, text: valueText(x, v.dist.map), si: toSi(v.dist.map, x) });
    for (const alt of alternatives) out.push(base.map((p, j) => (j === i ? alt : p)));
  });
  return out;
}
