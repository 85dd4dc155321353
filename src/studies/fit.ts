/**
 * Fits a sphere wall law (neo-Hookean, Mooney–Rivlin, Gent) to bench data: gauge pressure
 * against stretch, with the sample's unstretched radius and thickness given.
 *
 * Least squares on the pressure residuals r_i = Δp(λ_i; θ) − p_i (Pa), with Δp from
 * physics/membrane.ts, by Levenberg–Marquardt (fit-lm.ts). Moduli and the Gent limit are
 * fitted as logarithms (so they stay positive); the Mooney–Rivlin C2 may be zero and is kept
 * ≥ 0 by a bound. Starting values come from linear least squares (Δp is linear in μ, C1, C2;
 * for Gent in μ at fixed Jm, which is scanned). Standard errors are the square roots of the
 * diagonal of s²(JᵀJ)⁻¹ with J = ∂r/∂(parameters) at the solution and s² = SSR/(n − p);
 * 95 % confidence intervals are estimate ± t(0.975, n − p)·SE.
 *
 * Hysteresis: the readings are split into monotone runs of size (inflation where the size
 * grows, deflation where it shrinks; a reversal must exceed 1 % of the size range to count,
 * so noise does not split a run), and inflation and deflation are fitted separately.
 *
 * References: Treloar 1975, Ogden 1984, Gent 1996 (the laws, see physics/membrane.ts);
 * Madsen, Nielsen & Tingleff 2004, §3.2 (LM); G. A. F. Seber & C. J. Wild, Nonlinear
 * Regression, Wiley 1989, §2.1–2.2 (asymptotic standard errors and t intervals).
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { gentLockStretch, membranePressure, type Membrane } from '../physics/membrane.js';
import type { BenchData, BenchRow } from './fit-data.js';
import { inverseNormalMatrix, levenbergMarquardt, type LmStatus } from './fit-lm.js';
import { studentQuantile } from './fit-stats.js';

export const FIT_LAWS = ['neo-hookean', 'mooney-rivlin', 'gent'] as const;
export type FitLaw = (typeof FIT_LAWS)[number];

/** A reversal of the size smaller than this fraction of its range is noise, not a new segment. */
export const REVERSAL_FRACTION = 0.01;
/** Gent starting values: Jm as multiples of the least Jm that keeps every reading below the lock. */
const GENT_SCAN = [1.02, 1.1, 1.3, 1.6, 2, 3, 5, 10, 30, 100, 1000];
/** Bins per curve of the `measured` snippet. */
export const MEASURED_BINS = 10;

export interface FitGeometry {
  /** Unstretched radius r0 and thickness t0, m. */
  radius: number;
  thickness: number;
}

export interface FittedParameter {
  /** The netlist's parameter name: `shear-modulus`, `c1`, `c2`, `limit`. */
  name: string;
  value: number;
  /** Standard error (NaN when the fit leaves it undetermined). */
  se: number;
  /** 95 % confidence interval. */
  low: number;
  high: number;
  unit: 'Pa' | '-';
  /** The estimate sits on its bound (C2 = 0): the data prefer a smaller value. */
  atBound: boolean;
}

export interface FitRow {
  line: number;
  stretch: number;
  gauge: number;
  fitted: number;
  residual: number;
}

export type SegmentKind = 'inflation' | 'deflation';

export interface SegmentFit {
  kind: SegmentKind;
  /** Readings fitted, degrees of freedom (n − p). */
  points: number;
  dof: number;
  parameters: FittedParameter[];
  r2: number;
  /** √(SSR/n), Pa. */
  rmse: number;
  /** s = √(SSR/(n − p)), Pa. */
  residualSd: number;
  iterations: number;
  status: LmStatus;
  converged: boolean;
  rows: FitRow[];
  /** Readings left out because they lie below the unstretched size (λ < 1, a slack bag). */
  excluded: number;
}

export interface Segment {
  kind: SegmentKind;
  firstLine: number;
  lastLine: number;
  readings: number;
}

export interface FitReport {
  wall: FitLaw;
  geometry: FitGeometry;
  file: string;
  segments: Segment[];
  inflation?: SegmentFit;
  deflation?: SegmentFit;
  notes: string[];
  /**
   * The law does not describe the readings (low R², or residuals that keep one sign along the
   * curve): its parameters and their intervals then mean little. Each names the other laws
   * with their R² on the same readings.
   */
  warnings: string[];
}

type Transform = { kind: 'log' } | { kind: 'scaled'; scale: number };

interface LawSpec {
  names: string[];
  transforms: Transform[];
  membrane(theta: ArrayLike<number>): Membrane;
}

function fromTheta(t: Transform, th: number): number {
  return t.kind === 'log' ? Math.exp(th) : th * t.scale;
}

function toTheta(t: Transform, p: number): number {
  return t.kind === 'log' ? Math.log(p) : p / t.scale;
}

/** d(parameter)/dθ, to carry the Jacobian from θ to the parameters. */
function dParam(t: Transform, p: number): number {
  return t.kind === 'log' ? p : t.scale;
}

function lawSpec(law: FitLaw, g: FitGeometry, scale: number): LawSpec {
  const { radius: r0, thickness: t0 } = g;
  switch (law) {
    case 'neo-hookean':
      return { names: ['shear-modulus'], transforms: [{ kind: 'log' }], membrane: (th) => ({ kind: 'neo-hookean', r0, t0, mu: Math.exp(th[0]) }) };
    case 'mooney-rivlin': {
      const tr: Transform[] = [{ kind: 'log' }, { kind: 'scaled', scale }];
      return { names: ['c1', 'c2'], transforms: tr, membrane: (th) => ({ kind: 'mooney-rivlin', r0, t0, c1: Math.exp(th[0]), c2: fromTheta(tr[1], th[1]) }) };
    }
    case 'gent':
      return { names: ['shear-modulus', 'limit'], transforms: [{ kind: 'log' }, { kind: 'log' }], membrane: (th) => ({ kind: 'gent', r0, t0, mu: Math.exp(th[0]), jm: Math.exp(th[1]) }) };
  }
}

/** Least-squares factor a minimising Σ(a f_i − p_i)². */
function scaleFit(f: number[], p: number[]): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < f.length; i++) { num += f[i] * p[i]; den += f[i] * f[i]; }
  return den > 0 ? num / den : NaN;
}

function ssr(f: number[], p: number[], a: number): number {
  let s = 0;
  for (let i = 0; i < f.length; i++) s += (a * f[i] - p[i]) ** 2;
  return s;
}

/** Starting points in θ, best guess first. */
function starts(law: FitLaw, g: FitGeometry, rows: BenchRow[]): { theta: number[][]; scale: number } {
  const lam = rows.map((r) => r.stretch);
  const p = rows.map((r) => r.gauge);
  const unitNh = lam.map((l) => membranePressure({ kind: 'neo-hookean', r0: g.radius, t0: g.thickness, mu: 1 }, l).dp);
  const positive = (x: number, fallback: number): number => (Number.isFinite(x) && x > 0 ? x : fallback);
  const typical = positive(scaleFit(unitNh, p), 1e5);
  if (law === 'neo-hookean') return { theta: [[Math.log(typical)]], scale: 1 };
  if (law === 'mooney-rivlin') {
    // Δp = 2·unitNh·(C1 + C2 λ²), since 4(t0/r0)g = 2·(2(t0/r0)g).
    const f1 = unitNh.map((u) => 2 * u);
    const f2 = unitNh.map((u, i) => 2 * u * lam[i] * lam[i]);
    let a11 = 0, a12 = 0, a22 = 0, b1 = 0, b2 = 0;
    for (let i = 0; i < p.length; i++) {
      a11 += f1[i] * f1[i]; a12 += f1[i] * f2[i]; a22 += f2[i] * f2[i];
      b1 += f1[i] * p[i]; b2 += f2[i] * p[i];
    }
    const det = a11 * a22 - a12 * a12;
    let c1 = (b1 * a22 - b2 * a12) / det;
    let c2 = (a11 * b2 - a12 * b1) / det;
    if (!(c2 >= 0) || !(c1 > 0)) { c2 = 0; c1 = scaleFit(f1, p); }
    c1 = positive(c1, typical / 2);
    return { theta: [[Math.log(c1), c2 / c1]], scale: c1 };
  }
  // Gent: μ is linear at fixed Jm; scan Jm above the least value that keeps the data unlocked.
  const lmax = Math.max(...lam);
  const jmMin = Math.max(2 * lmax * lmax + lmax ** -4 - 3, 1e-6);
  const scored = GENT_SCAN.map((k) => {
    const jm = jmMin * k;
    const f = lam.map((l) => membranePressure({ kind: 'gent', r0: g.radius, t0: g.thickness, mu: 1, jm }, l).dp);
    const mu = positive(scaleFit(f, p), typical);
    return { theta: [Math.log(mu), Math.log(jm)], s: ssr(f, p, mu) };
  });
  scored.sort((a, b) => a.s - b.s);
  return { theta: scored.slice(0, 3).map((x) => x.theta), scale: 1 };
}

/** A parameter whose θ-column of J is below this fraction of the largest has no effect on the fit. */
const NO_EFFECT = 1e-8;

/**
 * Diagonal of (JₚᵀJₚ)⁻¹. Parameters that do not affect the residuals (a Gent limit far beyond
 * the readings) are left out of the inversion and get NaN, so the others keep their errors.
 * Columns are compared in θ (logarithmic) units, where they are commensurate.
 */
function parameterVariances(Jtheta: Float64Array, Jp: Float64Array, n: number, np: number): number[] {
  const norms = Array.from({ length: np }, (_, j) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Jtheta[i * np + j] ** 2;
    return Math.sqrt(s);
  });
  const big = Math.max(...norms);
  const keep = norms.flatMap((c, j) => (c > NO_EFFECT * big ? [j] : []));
  const out = new Array<number>(np).fill(NaN);
  if (!keep.length) return out;
  const k = keep.length;
  const sub = new Float64Array(n * k);
  for (let i = 0; i < n; i++) keep.forEach((j, c) => { sub[i * k + c] = Jp[i * np + j]; });
  const inv = inverseNormalMatrix(sub, n, k);
  if (inv) keep.forEach((j, c) => { out[j] = inv[c * k + c]; });
  return out;
}

function fitRows(law: FitLaw, g: FitGeometry, kind: SegmentKind, all: BenchRow[]): SegmentFit | string {
  const rows = all.filter((r) => r.stretch >= 1);
  const excluded = all.length - rows.length;
  const { theta: starting, scale } = starts(law, g, rows);
  const spec = lawSpec(law, g, scale);
  const np = spec.names.length;
  if (rows.length < np + 2) return `${kind}: ${rows.length} reading${rows.length === 1 ? '' : 's'} at or above the unstretched size; a ${law} fit needs at least ${np + 2}`;
  const residuals = (th: Float64Array, r: Float64Array): boolean => {
    const m = spec.membrane(th);
    for (let i = 0; i < rows.length; i++) {
      const dp = membranePressure(m, rows[i].stretch).dp;
      if (!Number.isFinite(dp)) return false;
      r[i] = dp - rows[i].gauge;
    }
    return true;
  };
  const lower = spec.transforms.map((t) => (t.kind === 'scaled' ? 0 : -Infinity));
  let best: ReturnType<typeof levenbergMarquardt> | undefined;
  for (const th0 of starting) {
    const r = levenbergMarquardt({ m: rows.length, n: np, residuals }, th0, { lower });
    if (r.status === 'not-evaluable') continue;
    if (!best || r.cost < best.cost) best = r;
  }
  if (!best) return `${kind}: the ${law} law cannot be evaluated at the starting values (readings beyond its stretch lock?)`;

  const values = spec.transforms.map((t, j) => fromTheta(t, best.x[j]));
  const n = rows.length;
  const dof = n - np;
  const SSR = 2 * best.cost;
  const s2 = SSR / dof;
  // Jacobian with respect to the parameters themselves: J_θ · dθ/dp.
  const Jp = new Float64Array(n * np);
  for (let i = 0; i < n; i++) for (let j = 0; j < np; j++) Jp[i * np + j] = best.J[i * np + j] / dParam(spec.transforms[j], values[j]);
  const variances = parameterVariances(best.J, Jp, n, np).map((v) => s2 * v);
  const tq = studentQuantile(0.975, dof);
  const parameters: FittedParameter[] = spec.names.map((name, j) => {
    const se = Math.sqrt(Math.max(0, variances[j]));
    return {
      name, value: values[j], se, low: values[j] - tq * se, high: values[j] + tq * se,
      unit: name === 'limit' ? '-' : 'Pa',
      atBound: spec.transforms[j].kind === 'scaled' && best.x[j] <= lower[j],
    };
  });
  const mean = rows.reduce((s, r) => s + r.gauge, 0) / n;
  const SST = rows.reduce((s, r) => s + (r.gauge - mean) ** 2, 0);
  return {
    kind, points: n, dof, parameters,
    r2: SST > 0 ? 1 - SSR / SST : NaN,
    rmse: Math.sqrt(SSR / n),
    residualSd: Math.sqrt(s2),
    iterations: best.iterations, status: best.status, converged: best.converged,
    rows: rows.map((r, i) => ({ line: r.line, stretch: r.stretch, gauge: r.gauge, fitted: r.gauge + best.r[i], residual: best.r[i] })),
    excluded,
  };
}

/** x to `digits` significant digits, without trailing zeros. */
export function sig(x: number, digits: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return String(Number(x.toPrecision(digits)));
}

/** R² below which a law is said not to describe the readings. */
const POOR_R2 = 0.9;
/** z of the runs test below which residuals are systematic (a trend the law cannot follow). */
const RUNS_Z = -3;

/**
 * Why a fit does not describe its readings, or undefined when it does: R² below POOR_R2, or
 * residual signs in far fewer runs along the curve than chance gives (Wald–Wolfowitz runs test,
 * z < −3; A. Wald & J. Wolfowitz, Ann. Math. Statist. 11 (1940) 147) while R² < 0.99.
 */
function lawMisfit(f: SegmentFit): string | undefined {
  const signs = f.rows.map((r) => Math.sign(r.residual)).filter((s) => s !== 0);
  const pos = signs.filter((s) => s > 0).length;
  const neg = signs.length - pos;
  let runs = signs.length ? 1 : 0;
  for (let i = 1; i < signs.length; i++) if (signs[i] !== signs[i - 1]) runs++;
  const n = pos + neg;
  const mean = n ? (2 * pos * neg) / n + 1 : 0;
  const variance = n > 1 ? ((mean - 1) * (mean - 2)) / (n - 1) : 0;
  const z = variance > 0 ? (runs - mean) / Math.sqrt(variance) : 0;
  const trend = `the residuals change sign ${runs - 1} times in ${n} readings, where chance gives about ${Math.round(mean - 1)}`;
  if (f.r2 < POOR_R2) return `R² = ${sig(f.r2, 3)}; ${trend}`;
  if (z < RUNS_Z && f.r2 < 0.99) return `R² = ${sig(f.r2, 4)}, but ${trend}`;
  return undefined;
}

/**
 * Splits readings into monotone runs of size: a run ends at its extreme once the size has
 * come back from it by more than REVERSAL_FRACTION of the whole range. The turning reading
 * belongs to the run it ends.
 */
export function splitSegments(rows: readonly BenchRow[]): { kind: SegmentKind; rows: BenchRow[] }[] {
  if (rows.length < 2) return rows.length ? [{ kind: 'inflation', rows: [...rows] }] : [];
  const x = rows.map((r) => r.stretch);
  const delta = REVERSAL_FRACTION * (Math.max(...x) - Math.min(...x));
  const out: { kind: SegmentKind; rows: BenchRow[] }[] = [];
  let start = 0;
  let dir: SegmentKind | undefined;
  let hi = 0;
  let lo = 0;
  let ext = 0;
  for (let i = 1; i < x.length; i++) {
    if (dir === undefined) {
      if (x[i] > x[hi]) hi = i;
      if (x[i] < x[lo]) lo = i;
      if (x[hi] - x[lo] > delta) {
        dir = hi > lo ? 'inflation' : 'deflation';
        ext = dir === 'inflation' ? hi : lo;
        // A dip before the first rise (or a bump before the first fall) is part of the run.
      }
      continue;
    }
    if (dir === 'inflation') {
      if (x[i] >= x[ext]) ext = i;
      else if (x[ext] - x[i] > delta) {
        out.push({ kind: dir, rows: rows.slice(start, ext + 1) });
        start = ext + 1;
        dir = 'deflation';
        ext = i;
      }
    } else {
      if (x[i] <= x[ext]) ext = i;
      else if (x[i] - x[ext] > delta) {
        out.push({ kind: dir, rows: rows.slice(start, ext + 1) });
        start = ext + 1;
        dir = 'inflation';
        ext = i;
      }
    }
  }
  out.push({ kind: dir ?? 'inflation', rows: rows.slice(start) });
  return out.filter((s) => s.rows.length > 0);
}

/** Fits the law to the data, inflation and deflation separately when both are present. */
export function fitWall(data: BenchData, law: FitLaw, geometry: FitGeometry, file: string): Result<FitReport> {
  const fail = (message: string, hint: string): { ok: false; diagnostics: Diagnostic[] } => ({ ok: false, diagnostics: [{ code: 'fit', severity: 'error', message, file, line: 0, column: 0, path: [], hint }] });
  if (!(geometry.thickness < geometry.radius)) return fail('the thickness must be smaller than the radius for a thin-walled sphere', 'check the units of --radius and --thickness');
  const segs = splitSegments(data.rows);
  const segments: Segment[] = segs.map((s) => ({ kind: s.kind, firstLine: s.rows[0].line, lastLine: s.rows[s.rows.length - 1].line, readings: s.rows.length }));
  const report: FitReport = { wall: law, geometry, file, segments, notes: [...data.notes], warnings: [] };
  for (const kind of ['inflation', 'deflation'] as const) {
    const rows = segs.filter((s) => s.kind === kind).flatMap((s) => s.rows);
    if (!rows.length) continue;
    const f = fitRows(law, geometry, kind, rows);
    if (typeof f === 'string') {
      if (kind === 'inflation' || !report.inflation) return fail(f, 'give more readings above the unstretched size');
      report.notes.push(`deflation not fitted: ${f}`);
      continue;
    }
    if (f.excluded) report.notes.push(`${kind}: ${f.excluded} reading${f.excluded === 1 ? '' : 's'} below the unstretched size (stretch < 1) left out: a slack sample has no elastic pressure`);
    if (!f.converged) report.notes.push(`${kind}: the fit did not converge (${f.status}); the values are the best found`);
    for (const p of f.parameters) {
      if (p.se < 0.5 * Math.abs(p.value) || p.atBound) continue;
      const why = law === 'gent' && p.name === 'limit'
        ? 'the readings show no stiffening towards a lock; try --wall neo-hookean, or readings to larger stretch'
        : 'the readings cannot tell it apart from the other parameters; try a simpler law or a wider range of stretch';
      report.notes.push(`${kind}: \`${p.name}\` is not determined by these readings (standard error ${Number.isFinite(p.se) ? `${Math.round((100 * p.se) / Math.abs(p.value))} % of the value` : 'undefined'}): ${why}`);
    }
    const misfit = lawMisfit(f);
    if (misfit) {
      const others = FIT_LAWS.filter((l) => l !== law).map((l) => {
        const o = fitRows(l, geometry, kind, rows);
        return typeof o === 'string' ? `${l}: cannot be fitted` : `${l}: R² = ${sig(o.r2, 4)}`;
      });
      report.warnings.push(`${kind}: the ${law} law does not describe these readings (${misfit}); its parameters and their intervals assume it does and mean little here. The other laws on the same readings: ${others.join(', ')}; fit with the best (--wall), or use the measured wall below`);
    }
    if (law === 'gent') {
      const lock = gentLockStretch(f.parameters[1].value);
      const lmax = Math.max(...f.rows.map((r) => r.stretch));
      report.notes.push(`${kind}: Gent lock at stretch ${lock.toPrecision(4)}; the readings reach ${lmax.toPrecision(4)}`);
    }
    report[kind] = f;
  }
  if (!report.inflation && !report.deflation) return fail('no readings to fit', 'give readings of size and pressure');
  return { ok: true, value: report, warnings: [] };
}

export { chamberSnippet, fitJson, fitResidualCsv, fitText, measuredSnippet, parameterText } from './fit-report.js';
