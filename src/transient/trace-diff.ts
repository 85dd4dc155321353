/**
 * Compares two recorded runs (baselines, CSV traces or result summaries) for `plenum diff`.
 *
 * Channels are aligned by name; B is interpolated linearly onto A's time base (exactly
 * A's values where the grids coincide, which they do for two runs of one netlist). A point
 * passes when |a − b| ≤ atol + rtol·max(|a|, |b|), with atol and rtol per channel: a channel's
 * own `--tol`, else its quantity's, else the global `--atol`/`--rtol`, else the defaults below.
 * Summary values (final values, peaks, peak flows, mass balance) are compared the same way;
 * regimes and `choked` must match exactly. Times of peaks are not judged: a flat maximum moves
 * its time under any perturbation, and real shifts show in the trace. A channel present in one
 * run only, a different unit, a different status or end time makes the runs differ.
 */

/** A run as `plenum diff` reads it. Traces are per channel; the summary is flat. */
export interface TraceFile {
  /** What the file was: a baseline, a CSV trace, a result JSON (summary only), or a bench recording. */
  kind: 'baseline' | 'csv' | 'result' | 'measured';
  file: string;
  netlist?: string;
  status?: string;
  /** Simulated end time (s), when known. */
  end?: number;
  channels: { key: string; unit: string }[];
  times: number[];
  /** values[c][k]: channel c at times[k]. */
  values: number[][];
  summary: { key: string; unit: string; value: number | string | boolean }[];
}

export type QuantityClass = 'pressure' | 'volume' | 'mass' | 'temperature' | 'flow' | 'stretch' | 'reynolds' | 'time' | 'dimensionless';

export const QUANTITY_CLASSES: readonly QuantityClass[] = ['pressure', 'volume', 'mass', 'temperature', 'flow', 'stretch', 'reynolds', 'time', 'dimensionless'];

export const DEFAULT_RTOL = 1e-6;

/**
 * Default absolute tolerances (SI): far below what a pressure gauge, a scale or a flow meter
 * resolves, and above the round-off of a stored baseline (9 significant digits), so that a rerun
 * of an unchanged netlist passes and a physical change does not.
 */
export const DEFAULT_ATOL: Record<QuantityClass, number> = {
  pressure: 0.1,        // Pa
  volume: 1e-12,        // m³ (a thousandth of a mm³)
  mass: 1e-12,          // kg (a nanogram)
  temperature: 1e-4,    // K
  flow: 1e-10,          // kg/s
  stretch: 1e-9,        // -
  reynolds: 1e-3,       // -
  time: 1e-6,           // s
  dimensionless: 1e-9,  // -
};

export interface Tolerance { atol: number; rtol: number }

export interface DiffOptions {
  rtol?: number;
  /** One absolute tolerance (SI) for every quantity, replacing the defaults. */
  atol?: number;
  byQuantity?: Partial<Record<QuantityClass, Partial<Tolerance>>>;
  /** Per channel or summary key. */
  byKey?: Record<string, Partial<Tolerance>>;
}

export interface Deviation {
  key: string;
  unit: string;
  where: 'trace' | 'summary';
  /** Time of the largest deviation (trace only). */
  t?: number;
  a: number | string | boolean;
  b: number | string | boolean;
  abs: number;
  rel: number;
  /** The allowed deviation at that point. */
  allowed: number;
  /** abs / allowed: above 1 is outside tolerance. */
  ratio: number;
  passed: boolean;
}

export interface DiffResult {
  /** False when the two files have nothing in common to compare. */
  comparable: boolean;
  passed: boolean;
  /** One entry per channel and per summary value, worst first. */
  deviations: Deviation[];
  /** Structural differences (each makes the runs differ). */
  problems: string[];
  compared: { channels: number; points: number; summary: number };
}

/** The quantity of a channel or summary value, from its unit and name. */
export function quantityOf(key: string, unit: string): QuantityClass {
  switch (unit) {
    case 'Pa': return 'pressure';
    case 'm^3': return 'volume';
    case 'kg': return 'mass';
    case 'K': return 'temperature';
    case 'kg/s': return 'flow';
    case 's': return 'time';
    default:
      if (/stretch$/.test(key)) return 'stretch';
      if (/reynolds$/.test(key)) return 'reynolds';
      return 'dimensionless';
  }
}

function toleranceFor(key: string, unit: string, o: DiffOptions): Tolerance {
  const q = quantityOf(key, unit);
  const own = o.byKey?.[key];
  const byQ = o.byQuantity?.[q];
  return {
    atol: own?.atol ?? byQ?.atol ?? o.atol ?? DEFAULT_ATOL[q],
    rtol: own?.rtol ?? byQ?.rtol ?? o.rtol ?? DEFAULT_RTOL,
  };
}

function compare(a: number, b: number, tol: Tolerance): { abs: number; rel: number; allowed: number; ratio: number } {
  if (Number.isNaN(a) && Number.isNaN(b)) return { abs: 0, rel: 0, allowed: tol.atol, ratio: 0 };
  const abs = a === b ? 0 : Math.abs(a - b);
  const scale = Math.max(Math.abs(a), Math.abs(b));
  const allowed = tol.atol + tol.rtol * scale;
  const ratio = Number.isNaN(abs) ? Infinity : abs === 0 ? 0 : allowed > 0 ? abs / allowed : Infinity;
  return { abs: Number.isNaN(abs) ? Infinity : abs, rel: scale > 0 ? abs / scale : 0, allowed, ratio };
}

/** Linear interpolation of (ts, vs) at t; ts ascending. `hint` carries the search position. */
function interpolate(ts: number[], vs: number[], t: number, hint: { k: number }): number {
  let k = Math.min(hint.k, ts.length - 1);
  while (k > 0 && ts[k] > t) k--;
  while (k + 1 < ts.length && ts[k + 1] <= t) k++;
  hint.k = k;
  if (ts[k] === t || k + 1 >= ts.length) return vs[k];
  const w = (t - ts[k]) / (ts[k + 1] - ts[k]);
  return vs[k] + w * (vs[k + 1] - vs[k]);
}

export function diffTraces(A: TraceFile, B: TraceFile, o: DiffOptions = {}): DiffResult {
  const problems: string[] = [];
  const deviations: Deviation[] = [];
  if (A.status !== undefined && B.status !== undefined && A.status !== B.status) problems.push(`status differs: A ${A.status}, B ${B.status}`);

  // ---- traces
  let channels = 0;
  let points = 0;
  if (A.times.length && B.times.length) {
    const bIndex = new Map(B.channels.map((c, i) => [c.key, i] as const));
    const aKeys = new Set(A.channels.map((c) => c.key));
    const only = (from: TraceFile, other: Set<string> | Map<string, number>): string[] => from.channels.map((c) => c.key).filter((k) => !other.has(k));
    const onlyA = only(A, bIndex);
    const onlyB = only(B, aKeys);
    if (onlyA.length) problems.push(`only in A: ${onlyA.join(', ')}`);
    if (onlyB.length) problems.push(`only in B: ${onlyB.join(', ')}`);
    const aEnd = A.times[A.times.length - 1];
    const bEnd = B.times[B.times.length - 1];
    const tTol = toleranceFor('time', 's', o);
    if (compare(aEnd, bEnd, tTol).ratio > 1) problems.push(`the traces end at different times: A ${aEnd} s, B ${bEnd} s (compared where both have values)`);
    // A's points inside B's time range (with a little slack for rounding of the times)
    const slack = tTol.atol;
    const inside: number[] = [];
    A.times.forEach((t, k) => { if (t >= B.times[0] - slack && t <= bEnd + slack) inside.push(k); });
    points = inside.length;
    A.channels.forEach((ch, ca) => {
      const cb = bIndex.get(ch.key);
      if (cb === undefined) return;
      const unitB = B.channels[cb].unit;
      if (unitB !== ch.unit) {
        problems.push(`${ch.key} has unit ${ch.unit} in A and ${unitB} in B`);
        return;
      }
      channels++;
      const tol = toleranceFor(ch.key, ch.unit, o);
      const va = A.values[ca];
      const vb = B.values[cb];
      const hint = { k: 0 };
      let worst: Deviation | null = null;
      for (const k of inside) {
        const t = Math.min(Math.max(A.times[k], B.times[0]), bEnd);
        const b = interpolate(B.times, vb, t, hint);
        const d = compare(va[k], b, tol);
        if (!worst || d.ratio > worst.ratio) {
          worst = { key: ch.key, unit: ch.unit, where: 'trace', t: A.times[k], a: va[k], b, ...d, passed: d.ratio <= 1 };
        }
      }
      if (worst) deviations.push(worst);
    });
  }

  // ---- summaries
  let summary = 0;
  if (A.summary.length && B.summary.length) {
    const bMap = new Map(B.summary.map((s) => [s.key, s] as const));
    const aKeys = new Set(A.summary.map((s) => s.key));
    const onlyA = A.summary.filter((s) => !bMap.has(s.key)).map((s) => s.key);
    const onlyB = B.summary.filter((s) => !aKeys.has(s.key)).map((s) => s.key);
    if (onlyA.length) problems.push(`summary values only in A: ${onlyA.join(', ')}`);
    if (onlyB.length) problems.push(`summary values only in B: ${onlyB.join(', ')}`);
    for (const sa of A.summary) {
      const sb = bMap.get(sa.key);
      if (!sb || /\.at$/.test(sa.key)) continue;
      summary++;
      if (typeof sa.value === 'number' && typeof sb.value === 'number') {
        const d = compare(sa.value, sb.value, toleranceFor(sa.key, sa.unit, o));
        deviations.push({ key: sa.key, unit: sa.unit, where: 'summary', a: sa.value, b: sb.value, ...d, passed: d.ratio <= 1 });
      } else {
        const same = sa.value === sb.value;
        deviations.push({ key: sa.key, unit: sa.unit, where: 'summary', a: sa.value, b: sb.value, abs: same ? 0 : Infinity, rel: same ? 0 : Infinity, allowed: 0, ratio: same ? 0 : Infinity, passed: same });
      }
    }
  }

  deviations.sort((x, y) => (y.ratio - x.ratio) || (x.key < y.key ? -1 : x.key > y.key ? 1 : 0));
  const comparable = channels + summary > 0;
  return {
    comparable,
    passed: comparable && problems.length === 0 && deviations.every((d) => d.passed),
    deviations, problems, compared: { channels, points, summary },
  };
}
