/**
 * Calibration of a netlist against bench recordings: find the values of free parameters for
 * which the simulated probes match measured time series.
 *
 * Residuals: for every reading of every probe column of every recording inside the simulated
 * time, r_i = (y_sim(t_i) − y_meas,i)/σ_c, the simulated value read from the integrator's dense
 * output at exactly t_i (transient/probe-times.ts). σ_c is one scale per probe (the same
 * sensor in every recording): given by the user (`sigma`), or estimated in two stages
 * (feasible generalised least squares): first the spread of the probe's readings, then, after
 * a first fit, the probe's residual RMS, and the fit repeated from there. With one probe the
 * weights do not matter.
 *
 * Minimisation: Levenberg–Marquardt (fit-lm.ts) in scaled parameters x_j = p_j/s_j (s_j the
 * start value's magnitude), simple bounds kept by projection. The Jacobian comes from central
 * differences with a step of 1e-3 in x (one-sided at a bound): every perturbed simulation, and
 * every recording, runs as its own job on the worker pool. Simulations run at a relative
 * tolerance of at most 1e-8, so that the solver's error (≈ tolerance) stays far below the
 * difference step (truncation O(h²) ≈ 1e-6, noise ≈ 1e-8/1e-3 = 1e-5 relative).
 *
 * Statistics (Seber & Wild, Nonlinear Regression, 1989, §2.1–2.2, §3.2): covariance
 * s²(JᵀJ)⁻¹ with s² = Σr²/(N − n), standard errors, 95 % intervals value ± t(0.975, N − n)·se,
 * the correlation matrix; per probe R² = 1 − SSR/SST and RMSE = √(SSR/N_c) in the probe's SI
 * unit. Identifiability: the eigen-decomposition of the normal matrix with unit columns; an
 * eigenvalue below 1e-8 of the largest (a condition number of the scaled sensitivity matrix
 * above 10⁴) names the parameters that make up its eigenvector, and correlations above 0.98
 * name pairs.
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { NetworkSystem } from '../assemble/system.js';
import { buildModel } from '../model/build.js';
import { checkPath, readWithOverrides, splitPath, overrideValue } from '../netlist/override.js';
import { readNetlist } from '../netlist/read.js';
import type { Dimension } from '../units/dimensions.js';
import { parsePressureDifference } from '../units/pressure.js';
import { parseQuantity } from '../units/quantity.js';
import { symmetricEigen } from '../linalg/symmetric-eigen.js';
import { checkSeries, readMeasuredCsv, type MeasuredSeries } from './bench-series.js';
import { EvalPool } from './eval-pool.js';
import type { EvalExperiment, EvalResult, PathValue } from './evaluate.js';
import { inverseNormalMatrix, levenbergMarquardtAsync, type LmResult } from './fit-lm.js';
import { studentQuantile } from './fit-stats.js';
import { paramText, parseFree, startValue, type FreeParam } from './free-params.js';
import { defaultJobs } from './sweep-pool.js';

/** Central-difference step in scaled parameters. */
const FD_STEP = 1e-3;
/** Simulations of a calibration run at most at this relative tolerance. */
export const CALIBRATION_TOLERANCE = 1e-8;
/** Eigenvalue ratio of the scaled normal matrix below which parameters are not identifiable. */
const SINGULAR_RATIO = 1e-8;
/** Correlations above this are reported. */
const STRONG_CORRELATION = 0.98;
/** Relative disagreement of forward and backward differences above which a response counts as non-smooth. */
const ROUGH = 0.25;
/** Eigenvector components above this name a parameter in an identifiability warning. */
const COMPONENT = 0.3;

export interface CalibrationInput {
  /** The recording as text, its file name, and its own conditions (`PATH=VALUE`). */
  text: string;
  file: string;
  overrides?: string[];
}

export interface CalibrateOptions {
  /** The netlist's text and file name. */
  source: string;
  file: string;
  /** `PATH=LOW..HIGH` or `PATH` (unbounded, from the netlist's value). */
  free: string[];
  data: CalibrationInput[];
  /** Measurement scale per probe, written with a unit (`finger.gauge=0.5 kPa`). */
  sigma?: string[];
  jobs?: number;
  maxIterations?: number;
  /** Called with the number of simulations run so far and the stage. */
  progress?: (simulations: number, what: string) => void;
  /** Worker script (tests). */
  worker?: URL;
}

export interface CalibratedParameter {
  path: string;
  /** SI (pressures absolute). */
  value: number;
  start: number;
  stderr: number;
  low: number;
  high: number;
  lo: number;
  hi: number;
  atBound: 'lower' | 'upper' | null;
  /** The calibrated value as netlist text. */
  text: string;
}

export interface ChannelFit { key: string; readings: number; rmse: number; r2: number; sigma: number; unit: string }

export interface ResidualRow { file: string; line: number; time: number; key: string; measured: number; simulated: number; residual: number }

export interface CalibrationReport {
  status: 'converged' | 'not-converged' | 'failed';
  message: string;
  netlist: string;
  parameters: CalibratedParameter[];
  /** correlation[i][j] (NaN when the covariance could not be formed). */
  correlation: number[][];
  channels: ChannelFit[];
  /** Per recording: file, conditions, readings used, readings outside the simulated time. */
  experiments: { file: string; overrides: PathValue[]; readings: number; outside: number; channels: ChannelFit[] }[];
  warnings: string[];
  readings: number;
  dof: number;
  /** Residual variance of the weighted residuals. */
  s2: number;
  iterations: number;
  simulations: number;
  residuals: ResidualRow[];
  /** Ambient pressure, Pa (to write pressures). */
  ambient: number;
  /** The free parameters as read (units for writing). */
  free: FreeParam[];
}

interface Slot { e: number; c: number; k: number }

/** The dimension of a measurement scale, by the probe's quantity (a pressure scale is a difference). */
const SIGMA_DIMENSION: Record<string, Dimension> = { pressure: 'pressure', gauge: 'pressure', volume: 'volume', mass: 'mass', temperature: 'temperature-difference', flow: 'mass-flow', position: 'length', velocity: 'velocity', force: 'force' };

function fail(file: string, message: string, hint: string, line = 0, column = 0): Diagnostic {
  return { code: 'calibrate', severity: 'error', message, file, line, column, path: [], hint };
}

function unitOf(key: string): string {
  const q = key.slice(key.lastIndexOf('.') + 1);
  return ({ pressure: 'Pa', gauge: 'Pa', volume: 'm^3', mass: 'kg', temperature: 'K', flow: 'kg/s', position: 'm', velocity: 'm/s', force: 'N' } as Record<string, string>)[q] ?? '-';
}

function parseOverride(arg: string, source: string, where: string): { ok: true; value: PathValue } | { ok: false; d: Diagnostic } {
  const eq = arg.indexOf('=');
  if (eq <= 0) return { ok: false, d: fail(where, `\`${arg}\` is not PATH=VALUE`, 'write e.g. `reservoirs.supply.pressure=4 barg`') };
  const path = arg.slice(0, eq).trim();
  const text = arg.slice(eq + 1).trim();
  const c = checkPath(source, path);
  if (!c.ok) return { ok: false, d: fail(where, `${path}: ${c.message}`, c.hint) };
  return { ok: true, value: { path, text } };
}

/** Everything checked before a simulation runs: the netlist, the recordings, the parameters. */
export interface PreparedCalibration {
  free: FreeParam[];
  series: MeasuredSeries[];
  experiments: EvalExperiment[];
  slots: Slot[];
  measured: Float64Array;
  /** Probe key of each residual's scale group. */
  group: Int32Array;
  groups: string[];
  sigmaGiven: (number | undefined)[];
  outside: number[];
  ambient: number;
}

export function prepareCalibration(o: CalibrateOptions): Result<PreparedCalibration> {
  const doc = readNetlist(o.source, o.file);
  if (!doc.ok) return doc;
  const base = buildModel(doc.value);
  if (!base.ok) return base;
  const pa = base.value.pa;
  const errors: Diagnostic[] = [];
  if (!o.free.length) errors.push(fail('--free', 'nothing is free', 'name the parameters to calibrate, e.g. `--free valves.v1.conductance=0.1 L/(s*bar)..2 L/(s*bar)`'));
  if (!o.data.length) errors.push(fail('--data', 'no recording given', 'give a measured CSV with `--data bench.csv`'));
  const free: FreeParam[] = [];
  for (const arg of o.free) {
    const p = parseFree(arg, o.source, pa, true);
    if (!p.ok) { errors.push(fail('--free', p.message, p.hint)); continue; }
    if (free.some((f) => f.path === p.value.path)) { errors.push(fail('--free', `\`${p.value.path}\` is free twice`, 'give each path one --free')); continue; }
    free.push(p.value);
  }
  const series: MeasuredSeries[] = [];
  const experiments: EvalExperiment[] = [];
  const outside: number[] = [];
  for (const d of o.data) {
    const s = readMeasuredCsv(d.text, d.file, pa);
    if (!s.ok) { errors.push(...s.diagnostics); continue; }
    const overrides: PathValue[] = [];
    for (const ov of s.value.overrides) {
      const r = parseOverride(`${ov.path}=${ov.value}`, o.source, d.file);
      if (!r.ok) errors.push({ ...r.d, line: ov.line, column: 1 });
      else overrides.push(r.value);
    }
    for (const arg of d.overrides ?? []) {
      const r = parseOverride(arg, o.source, `--data ${d.file}`);
      if (!r.ok) errors.push(r.d);
      else overrides.push(r.value);
    }
    const clash = overrides.find((ov) => free.some((f) => f.path === ov.path));
    if (clash) errors.push(fail(d.file, `\`${clash.path}\` is free and also set for this recording`, 'a free parameter is fitted to all recordings: drop it from the recording\'s conditions, or do not free it'));
    // the recording's model: its conditions must make a valid netlist, and its probes must exist
    const ovs = overrides.map((v) => ({ path: splitPath(v.path), value: overrideValue(v.text), label: `${v.path} = ${v.text}` }));
    const rd = readWithOverrides(o.source, o.file, ovs);
    const built = rd.ok ? buildModel(rd.value) : rd;
    if (!built.ok) { errors.push(...built.diagnostics); continue; }
    const model = built.value;
    const keys = new NetworkSystem(model).channels().map((c) => c.key);
    const problems = checkSeries(s.value, keys, model.simulate.duration);
    if (problems.length) { errors.push(...problems); continue; }
    const inside = Array.from(s.value.times).filter((t) => t >= 0 && t <= model.simulate.duration);
    outside.push(s.value.times.length - inside.length);
    series.push(s.value);
    experiments.push({ overrides, probe: { times: inside, keys: s.value.columns.map((c) => c.key) } });
  }
  const groups: string[] = [];
  const sigmaGiven: (number | undefined)[] = [];
  for (const s of series) for (const c of s.columns) if (!groups.includes(c.key)) groups.push(c.key);
  for (const arg of o.sigma ?? []) {
    const eq = arg.indexOf('=');
    const key = eq > 0 ? arg.slice(0, eq).trim() : '';
    const gi = groups.indexOf(key);
    if (gi < 0) { errors.push(fail('--sigma', `\`${key || arg}\` is not a probe of the recordings`, `probes: ${groups.join(', ')}`)); continue; }
    const text = arg.slice(eq + 1).trim();
    const q = key.slice(key.lastIndexOf('.') + 1);
    const dim = SIGMA_DIMENSION[q] ?? 'dimensionless';
    const r = dim === 'pressure' ? parsePressureDifference(text) : parseQuantity(text, dim);
    if (!r.ok || !(r.value > 0)) { errors.push(fail('--sigma', `\`${arg}\` is not a positive ${dim.replace('-', ' ')}`, 'write e.g. `--sigma finger.gauge=0.5 kPa`')); continue; }
    const v = r.value;
    sigmaGiven[gi] = v;
  }
  if (errors.length) return { ok: false, diagnostics: errors };

  const slots: Slot[] = [];
  const meas: number[] = [];
  const group: number[] = [];
  series.forEach((s, e) => {
    const times = experiments[e].probe!.times;
    const first = Array.from(s.times).indexOf(times[0]);
    s.columns.forEach((col, c) => {
      for (let k = 0; k < times.length; k++) {
        const v = col.values[first + k];
        if (!Number.isFinite(v)) continue;
        slots.push({ e, c, k });
        meas.push(v);
        group.push(groups.indexOf(col.key));
      }
    });
  });
  if (slots.length <= free.length) {
    return { ok: false, diagnostics: [fail(o.data[0].file, `${slots.length} readings inside the simulated time for ${free.length} free parameters`, 'a calibration needs more readings than parameters')] };
  }
  return { ok: true, value: { free, series, experiments, slots, measured: Float64Array.from(meas), group: Int32Array.from(group), groups, sigmaGiven, outside, ambient: pa }, warnings: [] };
}

/** Runs the calibration. Bad input is a diagnostic; a numerical failure is a status. */
export async function calibrate(o: CalibrateOptions): Promise<Result<CalibrationReport>> {
  const prep = prepareCalibration(o);
  if (!prep.ok) return prep;
  const P = prep.value;
  const { free, experiments, slots, measured, group, groups, ambient: pa } = P;
  const n = free.length;
  const m = slots.length;
  const E = experiments.length;
  const start = free.map(startValue);
  const scale = start.map((v, j) => (v !== 0 ? Math.abs(v) : Number.isFinite(free[j].hi - free[j].lo) ? free[j].hi - free[j].lo : 1));
  const lower = free.map((f, j) => f.lo / scale[j]);
  const upper = free.map((f, j) => f.hi / scale[j]);
  const pool = new EvalPool({ source: o.source, file: o.file, experiments, tolerance: CALIBRATION_TOLERANCE }, {
    jobs: o.jobs ?? defaultJobs(), worker: o.worker, progress: (k) => o.progress?.(k, stage),
  });
  let stage = 'fitting';
  const paramsAt = (x: ArrayLike<number>): PathValue[] => free.map((f, j) => ({ path: f.path, text: paramText(f, x[j] * scale[j], pa) }));
  const sigma = new Float64Array(groups.length);
  // stage-one scales: the spread of each probe's readings
  groups.forEach((_, g) => {
    if (P.sigmaGiven[g] !== undefined) { sigma[g] = P.sigmaGiven[g]!; return; }
    let s = 0, s2 = 0, k = 0;
    for (let i = 0; i < m; i++) if (group[i] === g) { s += measured[i]; s2 += measured[i] ** 2; k++; }
    const sd = Math.sqrt(Math.max(0, s2 / k - (s / k) ** 2));
    sigma[g] = sd > 0 ? sd : Math.abs(s / k) || 1;
  });
  const simulated = new Float64Array(m);
  let lastFailure = '';

  /** Simulated values at many points at once: one job per (point, recording). */
  const simulateAt = async (xs: Float64Array[]): Promise<(Float64Array | null)[]> => {
    const jobs = xs.flatMap((x) => experiments.map((_, e) => ({ experiment: e, params: paramsAt(x) })));
    const res: EvalResult[] = await pool.map(jobs);
    return xs.map((_, p) => {
      const out = new Float64Array(m);
      for (let e = 0; e < E; e++) {
        const r = res[p * E + e];
        if (r.status !== 'completed' || !r.probed) { lastFailure = r.message; return null; }
      }
      for (let i = 0; i < m; i++) {
        const s = slots[i];
        out[i] = res[p * E + s.e].probed![s.c][s.k];
        if (!Number.isFinite(out[i])) { lastFailure = 'a simulated value is not finite'; return null; }
      }
      return out;
    });
  };
  const weigh = (sim: Float64Array, r: Float64Array): void => {
    for (let i = 0; i < m; i++) r[i] = (sim[i] - measured[i]) / sigma[group[i]];
  };
  /** Per parameter at the last Jacobian: ‖D⁺ − D⁻‖/max(‖D⁺‖, ‖D⁻‖) of the one-sided differences. */
  const roughness = new Float64Array(n);
  let cacheX: Float64Array | null = null;
  let cacheSim: Float64Array | null = null;
  const cachedAt = (x: ArrayLike<number>): boolean => cacheX !== null && cacheX.every((v, j) => v === x[j]);
  const problem = {
    m, n,
    residuals: async (x: Float64Array, r: Float64Array): Promise<boolean> => {
      const [sim] = await simulateAt([x]);
      if (!sim) return false;
      cacheX = Float64Array.from(x);
      cacheSim = sim;
      weigh(sim, r);
      return true;
    },
    jacobian: async (x: Float64Array, J: Float64Array): Promise<boolean> => {
      const pts: Float64Array[] = [];
      const hs: { plus: number; minus: number }[] = [];
      for (let j = 0; j < n; j++) {
        const h = FD_STEP * Math.max(Math.abs(x[j]), 1e-2);
        const plus = x[j] + h <= upper[j] ? h : 0;
        const minus = x[j] - h >= lower[j] ? h : 0;
        hs.push({ plus, minus: plus === 0 && minus === 0 ? 0 : minus });
        if (plus) { const p = Float64Array.from(x); p[j] += plus; pts.push(p); }
        if (minus) { const p = Float64Array.from(x); p[j] -= minus; pts.push(p); }
      }
      const needCentre = !cachedAt(x);
      if (needCentre) pts.push(Float64Array.from(x));
      const sims = await simulateAt(pts);
      if (sims.some((s) => !s)) return false;
      const centre = needCentre ? sims[sims.length - 1]! : cacheSim!;
      let at = 0;
      for (let j = 0; j < n; j++) {
        const { plus, minus } = hs[j];
        const sp = plus ? sims[at++]! : centre;
        const sm = minus ? sims[at++]! : centre;
        const d = plus + minus;
        for (let i = 0; i < m; i++) J[i * n + j] = d > 0 ? (sp[i] - sm[i]) / d / sigma[group[i]] : 0;
        // a smooth response has nearly equal forward and backward differences (they differ by
        // about h·f''); a large difference means a jump (a valve that pops or not) within the step
        roughness[j] = 0;
        if (plus && minus) {
          let dd = 0, fp = 0, fm = 0;
          for (let i = 0; i < m; i++) {
            const a = (sp[i] - centre[i]) / plus / sigma[group[i]];
            const b = (centre[i] - sm[i]) / minus / sigma[group[i]];
            dd += (a - b) ** 2; fp += a * a; fm += b * b;
          }
          const big = Math.sqrt(Math.max(fp, fm));
          roughness[j] = big > 0 ? Math.sqrt(dd) / big : 0;
        }
      }
      return true;
    },
  };
  const x0 = start.map((v, j) => v / scale[j]);
  const lmOptions = { maxIterations: o.maxIterations ?? 100, gtol: 1e-8, xtol: 1e-10, ftol: 1e-12, lower, upper };
  let fit: LmResult;
  try {
    fit = await levenbergMarquardtAsync(problem, x0, lmOptions);
    const reweigh = groups.length > 1 && P.sigmaGiven.some((s) => s === undefined) && fit.status !== 'not-evaluable';
    if (reweigh) {
      stage = 'refitting with the probes weighted by their residuals';
      const sim = cacheSim!;
      groups.forEach((_, g) => {
        if (P.sigmaGiven[g] !== undefined) return;
        let s = 0, k = 0;
        for (let i = 0; i < m; i++) if (group[i] === g) { s += (sim[i] - measured[i]) ** 2; k++; }
        const rms = Math.sqrt(s / Math.max(1, k - (n * k) / m));
        if (rms > 0) sigma[g] = rms;
      });
      cacheX = null;
      fit = await levenbergMarquardtAsync(problem, fit.x, lmOptions);
    }
    if (fit.status !== 'not-evaluable' && !cachedAt(fit.x)) {
      const [sim] = await simulateAt([fit.x]);
      if (sim) { cacheSim = sim; cacheX = Float64Array.from(fit.x); }
    }
    if (cacheSim) simulated.set(cacheSim);
  } finally {
    await pool.close();
  }

  const evaluable = fit.status !== 'not-evaluable';
  const dof = m - n;
  const ssr = 2 * fit.cost;
  const s2 = dof > 0 ? ssr / dof : Number.NaN;
  const inv = evaluable ? inverseNormalMatrix(fit.J, m, n) : undefined;
  const tq = dof > 0 ? studentQuantile(0.975, dof) : Number.NaN;
  const warnings: string[] = [];
  const parameters: CalibratedParameter[] = free.map((f, j) => {
    const value = fit.x[j] * scale[j];
    const se = inv ? Math.sqrt(Math.max(0, s2 * inv[j * n + j])) * scale[j] : Number.NaN;
    const atBound = fit.x[j] <= lower[j] * (1 + 1e-12) && Number.isFinite(lower[j]) ? 'lower' : fit.x[j] >= upper[j] * (1 - 1e-12) && Number.isFinite(upper[j]) ? 'upper' : null;
    if (atBound) warnings.push(`${f.path} ended at its ${atBound} bound (${paramText(f, atBound === 'lower' ? f.lo : f.hi, pa, 6)}): the data pull it further; its interval assumes an interior optimum, so widen the bounds or question the model`);
    const digits = Number.isFinite(se) && se > 0 ? Math.min(12, Math.max(3, Math.ceil(Math.log10(Math.abs(value) / se)) + 2)) : 6;
    return { path: f.path, value, start: start[j], stderr: se, low: value - tq * se, high: value + tq * se, lo: f.lo, hi: f.hi, atBound, text: paramText(f, value, pa, digits) };
  });
  const correlation = free.map((_, i) => free.map((__, j) => (inv ? inv[i * n + j] / Math.sqrt(inv[i * n + i] * inv[j * n + j]) : Number.NaN)));
  if (evaluable) warnings.push(...identifiability(fit.J, m, n, free.map((f) => f.path), correlation));
  for (const p of parameters) if (Number.isFinite(p.stderr) && Math.abs(p.stderr) > Math.abs(p.value)) warnings.push(`${p.path} is poorly determined: its standard error exceeds its value`);
  free.forEach((f, j) => {
    if (roughness[j] > ROUGH) warnings.push(`the simulated probes respond to ${f.path} non-smoothly near the fitted value (forward and backward differences differ by ${(100 * roughness[j]).toFixed(0)} %): a valve that switches or not, a wall that snaps through; the fit may sit in a local minimum and its standard error and interval are not reliable`);
  });

  const channelFit = (keep: (i: number) => boolean): ChannelFit[] => groups.map((key, g) => {
    let ss = 0, sum = 0, k = 0;
    for (let i = 0; i < m; i++) if (group[i] === g && keep(i)) { ss += (simulated[i] - measured[i]) ** 2; sum += measured[i]; k++; }
    const mean = sum / k;
    let st = 0;
    for (let i = 0; i < m; i++) if (group[i] === g && keep(i)) st += (measured[i] - mean) ** 2;
    return { key, readings: k, rmse: Math.sqrt(ss / k), r2: st > 0 ? 1 - ss / st : Number.NaN, sigma: sigma[g], unit: unitOf(key) };
  }).filter((c) => c.readings > 0);
  const residuals: ResidualRow[] = slots.map((s, i) => {
    const ser = P.series[s.e];
    const t = experiments[s.e].probe!.times[s.k];
    const row = Array.from(ser.times).indexOf(t);
    return { file: ser.file, line: ser.lines[row], time: t, key: ser.columns[s.c].key, measured: measured[i], simulated: simulated[i], residual: simulated[i] - measured[i] };
  });
  const status: CalibrationReport['status'] = !evaluable ? 'failed' : fit.converged ? 'converged' : 'not-converged';
  const message = !evaluable
    ? `the model could not be evaluated at the start values: ${lastFailure}`
    : fit.converged ? `converged in ${fit.iterations} iterations (${fit.status})` : `did not converge in ${fit.iterations} iterations; the best values found are reported`;
  return {
    ok: true,
    value: {
      status, message, netlist: o.file, parameters, correlation,
      channels: channelFit(() => true),
      experiments: P.series.map((s, e) => ({ file: s.file, overrides: experiments[e].overrides, readings: slots.filter((x) => x.e === e).length, outside: P.outside[e], channels: channelFit((i) => slots[i].e === e) })),
      warnings, readings: m, dof, s2, iterations: fit.iterations, simulations: pool.count, residuals, ambient: pa, free,
    },
    warnings: [],
  };
}

/** Warnings naming parameters the data cannot tell apart. */
export function identifiability(J: Float64Array, m: number, n: number, names: string[], correlation: number[][]): string[] {
  const out: string[] = [];
  const norms = new Float64Array(n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) norms[j] += J[i * n + j] ** 2;
  const biggest = Math.max(...norms);
  const dead = names.filter((_, j) => !(norms[j] > 1e-16 * biggest));
  for (const d of dead) out.push(`${d} has no visible effect on the measured probes: it cannot be calibrated from these recordings`);
  const A = new Float64Array(n * n);
  for (let i = 0; i < m; i++) for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) {
    if (norms[a] > 0 && norms[b] > 0) A[a * n + b] += (J[i * n + a] / Math.sqrt(norms[a])) * (J[i * n + b] / Math.sqrt(norms[b]));
  }
  const { values, vectors } = symmetricEigen(A, n);
  const top = values[n - 1];
  for (let k = 0; k < n; k++) {
    if (!(values[k] < SINGULAR_RATIO * top)) continue;
    const parts = names.map((name, j) => ({ name, v: vectors[j * n + k] })).filter((p) => Math.abs(p.v) >= COMPONENT && !dead.includes(p.name));
    if (parts.length >= 2) {
      out.push(`${parts.map((p) => p.name).join(' and ')} cannot be told apart by these recordings (the sensitivity matrix is near-singular, condition ${Math.sqrt(top / Math.max(values[k], 1e-300)).toExponential(1)}): fix all but one, or record an experiment that separates them`);
    }
  }
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
    const r = correlation[i][j];
    if (Math.abs(r) > STRONG_CORRELATION) out.push(`${names[i]} and ${names[j]} are strongly correlated (r = ${r.toFixed(3)}): the data determine mainly a combination of the two`);
  }
  return out;
}
