/**
 * `plenum diff A B`: compares two runs (baselines from `run --baseline`, CSV traces from
 * `run --csv`, or result JSON from `run --json`), prints the largest deviations and exits 0
 * within tolerance, 1 outside, 2 when a file cannot be read or the two have nothing in common.
 */
import { readInputFile } from './netlist-file.js';
import { alignToMeasured, diffTraces, formatDiagnostic, measuredTrace, readTrace, type DiffOptions, type TraceFile } from '../index.js';
import { DEFAULT_RTOL, QUANTITY_CLASSES, type Deviation, type QuantityClass, type Tolerance } from '../transient/trace-diff.js';
import { didYouMean } from '../diag/did-you-mean.js';
import type { Dimension } from '../units/dimensions.js';
import { parsePressureDifference } from '../units/pressure.js';
import { parseFraction, parseQuantity, type QuantityResult } from '../units/quantity.js';
import { UsageError } from './io.js';

export interface DiffCliOptions { rtol?: string; atol?: string; tol?: string[]; top?: string }

const DEFAULT_TOP = 10;

const UNIT_OF_CLASS: Record<QuantityClass, string> = {
  pressure: 'Pa', volume: 'm^3', mass: 'kg', temperature: 'K', flow: 'kg/s', stretch: '-', reynolds: '-', time: 's', dimensionless: '-',
};

const DIMENSION_OF_UNIT: Record<string, Dimension> = {
  'm^3': 'volume', kg: 'mass', K: 'temperature-difference', 'kg/s': 'mass-flow', s: 'time',
};

function load(file: string): TraceFile {
  const text = readInputFile(file, 'the trace');
  const r = readTrace(text, file);
  if (r.ok && !(r.value.kind === 'csv' && r.value.channels.some((c) => !SI_UNITS.has(c.unit)))) return r.value;
  // not plenum's own trace: a bench recording (units of its own, comments, gaps)
  if (!text.replace(/^\uFEFF/, '').trimStart().startsWith('{')) {
    const m = measuredTrace(text, file, STANDARD_AMBIENT);
    if (m.ok) return m.value;
    if (!r.ok) throw new UsageError(`${m.diagnostics.map(formatDiagnostic).join('\n')}\n${file}: neither a plenum trace nor a readable bench recording`);
  }
  if (!r.ok) throw new UsageError(r.message);
  return r.value;
}

/** Units plenum writes in its CSV trace. */
const SI_UNITS = new Set(['Pa', 'm^3', 'kg', 'K', 'kg/s', '-', 'm', 'm/s', 's']);
/** Ambient pressure used to read `.pressure [... gauge]` columns of a recording (ISO 2533 sea level). */
const STANDARD_AMBIENT = 101325;

function nonNegative(text: string, what: string): number {
  const x = Number(text);
  if (text.trim() === '' || !Number.isFinite(x) || x < 0) throw new UsageError(`${what} must be a number ≥ 0, not \`${text}\``);
  return x;
}

/** An absolute tolerance in the unit of a quantity (`50 Pa`, `0.1 kPa`, `1 mg`; a bare number is SI). */
function absolute(text: string, unit: string): QuantityResult {
  if (unit === 'Pa') return parsePressureDifference(text);
  const dim = Object.hasOwn(DIMENSION_OF_UNIT, unit) ? DIMENSION_OF_UNIT[unit] : undefined;
  return parseQuantity(text, dim ?? 'dimensionless');
}

function parseTolerances(entries: string[], A: TraceFile, B: TraceFile, o: DiffOptions): void {
  const units = new Map<string, string>();
  for (const f of [A, B]) {
    for (const c of f.channels) units.set(c.key, c.unit);
    for (const s of f.summary) units.set(s.key, s.unit);
  }
  for (const entry of entries) {
    const eq = entry.indexOf('=');
    if (eq <= 0) throw new UsageError(`--tol takes QUANTITY=VALUE or CHANNEL=VALUE, e.g. \`pressure=50 Pa\` or \`cell_a.gauge=0.1%\`, not \`${entry}\``);
    const key = entry.slice(0, eq).trim();
    const value = entry.slice(eq + 1).trim();
    const isClass = (QUANTITY_CLASSES as readonly string[]).includes(key);
    const unit = isClass ? UNIT_OF_CLASS[key as QuantityClass] : units.get(key);
    if (unit === undefined) {
      const close = didYouMean(key, [...QUANTITY_CLASSES, ...units.keys()]);
      throw new UsageError(`--tol: \`${key}\` is neither a quantity (${QUANTITY_CLASSES.join(', ')}) nor a channel of the traces${close ? `; ${close}` : ''}`);
    }
    const tol: Partial<Tolerance> = {};
    if (value.endsWith('%')) {
      const r = parseFraction(value);
      if (!r.ok) throw new UsageError(`--tol ${key}: ${r.message}`);
      tol.rtol = r.value;
    } else {
      const r = absolute(value, unit);
      if (!r.ok) throw new UsageError(`--tol ${key}: ${r.message} (${r.hint})`);
      if (r.value < 0) throw new UsageError(`--tol ${key}: a tolerance cannot be negative`);
      tol.atol = r.value;
    }
    if (isClass) {
      o.byQuantity ??= {};
      o.byQuantity[key as QuantityClass] = { ...o.byQuantity[key as QuantityClass], ...tol };
    } else {
      o.byKey ??= {};
      o.byKey[key] = { ...o.byKey[key], ...tol };
    }
  }
}

function g(x: number | string | boolean, digits = 7): string {
  if (typeof x !== 'number') return String(x);
  if (Number.isNaN(x)) return 'NaN';
  if (!Number.isFinite(x)) return x > 0 ? 'inf' : '-inf';
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e7 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1);
}

function describe(f: TraceFile): string {
  const what = f.kind === 'baseline' ? 'baseline' : f.kind === 'csv' ? 'CSV trace' : f.kind === 'measured' ? 'bench recording' : 'result summary';
  const parts = [what];
  if (f.netlist) parts.push(`of ${f.netlist}`);
  if (f.times.length) parts.push(`${f.times.length} samples, ${f.channels.length} channels`);
  if (f.summary.length) parts.push(`${f.summary.length} summary values`);
  return parts.join(', ');
}

function table(rows: string[][]): string[] {
  const w = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(w[c]) : cell.padStart(w[c]))).join('  ').trimEnd());
}

export function diffCommand(a: string, b: string, opts: DiffCliOptions): number {
  let A = load(a);
  let B = load(b);
  // a recording is compared where and what it measured: the other trace at its reading times
  if (B.kind === 'measured' && A.kind !== 'measured' && A.times.length) ({ sim: A, measured: B } = alignToMeasured(A, B));
  else if (A.kind === 'measured' && B.kind !== 'measured' && B.times.length) ({ sim: B, measured: A } = alignToMeasured(B, A));
  const o: DiffOptions = {};
  if (opts.rtol !== undefined) o.rtol = nonNegative(opts.rtol, '--rtol');
  if (opts.atol !== undefined) o.atol = nonNegative(opts.atol, '--atol');
  parseTolerances(opts.tol ?? [], A, B, o);
  const top = opts.top === undefined ? DEFAULT_TOP : Number(opts.top);
  if (!Number.isInteger(top) || top < 0) throw new UsageError(`--top must be a whole number ≥ 0, not \`${opts.top}\``);

  const r = diffTraces(A, B, o);
  const out: string[] = [`A: ${a} (${describe(A)})`, `B: ${b} (${describe(B)})`];
  if (!r.comparable) {
    throw new UsageError(`${out.join('\n')}\nnothing to compare: the two files share no channels and no summary values${r.problems.length ? ` (${r.problems.join('; ')})` : ''}`);
  }
  const tolText = `rtol ${g(o.rtol ?? DEFAULT_RTOL, 3)}, atol ${o.atol !== undefined ? `${g(o.atol, 3)} (SI, every quantity)` : 'per quantity'}${opts.tol?.length ? `, ${opts.tol.join(', ')}` : ''}`;
  const c = r.compared;
  out.push(`compared ${c.channels} channels at ${c.points} times and ${c.summary} summary values (${tolText})`);
  const shown: Deviation[] = r.deviations.filter((d) => d.abs > 0).slice(0, top);
  if (shown.length) {
    out.push('', `largest deviations (ratio = |A − B| / allowed; above 1 is outside tolerance):`);
    const rows = [['value', 'unit', 't [s]', 'A', 'B', '|A − B|', 'relative', 'allowed', 'ratio', '']];
    for (const d of shown) {
      rows.push([d.where === 'trace' ? d.key : `summary ${d.key}`, d.unit || '-', d.t === undefined ? '' : g(d.t, 6), g(d.a), g(d.b),
        g(d.abs, 3), g(d.rel, 3), g(d.allowed, 3), g(d.ratio, 3), d.passed ? 'ok' : 'OUTSIDE']);
    }
    out.push(...table(rows).map((l) => `  ${l}`));
  } else {
    out.push('', 'no deviations: the compared values are identical');
  }
  if (r.problems.length) out.push('', 'differences in structure:', ...r.problems.map((p) => `  ${p}`));
  const outside = r.deviations.filter((d) => !d.passed).length;
  const total = r.deviations.length;
  out.push('', r.passed
    ? `diff: within tolerance (${total} values compared)`
    : `diff: outside tolerance: ${outside} of ${total} values${r.problems.length ? `, ${r.problems.length} structural difference${r.problems.length === 1 ? '' : 's'}` : ''}`);
  process.stdout.write(out.join('\n') + '\n');
  return r.passed ? 0 : 1;
}
