/**
 * Benchmark parts that run inside this process on the library (no CLI): the work–precision
 * table on a closed-form case, and the dense/sparse LU crossover that sets the solver's
 * SPARSE_MIN_N.
 */
import { performance } from 'node:perf_hooks';
import { NetworkSystem } from '../src/assemble/system.js';
import { loadModel, simulate } from '../src/index.js';
import { DenseLu } from '../src/linalg/dense-lu.js';
import { SparseLu } from '../src/linalg/sparse-lu.js';
import { patternSize, scatterDense } from '../src/linalg/sparse-pattern.js';
import { chainNetlist } from './networks.js';

export interface WorkPrecisionRow {
  method: 'implicit' | 'explicit';
  tolerance: number;
  /** Largest relative error of the tank pressure over the samples against the closed form. */
  error: number;
  steps: number;
  rhs: number;
  ms: number;
}

/**
 * Rigid 1 L tank blowing down through a laminar capillary (D 0.3 mm, L 1 m) from 300 kPa abs,
 * isothermal: dp/dt = −k(p² − pa²), k = πD⁴/(256 μ L V), so
 * p(t) = pa(1 + A e^(−2 pa k t))/(1 − A e^(−2 pa k t)), A = (p0 − pa)/(p0 + pa)
 * (../shared/references.md; test/verification/closed-forms.test.ts checks the same case). The
 * line's volume is lumped half into the tank, so V = 1 L + πD²L/8.
 */
export function workPrecision(tolerances: number[]): WorkPrecisionRow[] {
  const D = 0.3e-3, L = 1, pa = 101325, p0 = 300e3, T = 293.15;
  const V = 1e-3 + (Math.PI * D * D * L) / 8;
  const mu = (1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4)) / (T + 110.4);
  const k = (Math.PI * D ** 4) / (256 * mu * L * V);
  const A = (p0 - pa) / (p0 + pa);
  const closed = (t: number): number => {
    const e = A * Math.exp(-2 * pa * k * t);
    return (pa * (1 + e)) / (1 - e);
  };
  const rows: WorkPrecisionRow[] = [];
  for (const method of ['implicit', 'explicit'] as const) {
    for (const tol of tolerances) {
      const text = `format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 300 kPa abs } }
lines:
  capillary: { from: tank, to: ambient, diameter: 0.3 mm, length: 1 m }
simulate: { duration: 900 s, sample: 1 s, tolerance: ${tol}, method: ${method} }
`;
      const m = loadModel(text, 'work-precision.yaml');
      if (!m.ok) throw new Error('work–precision netlist did not load');
      const t0 = performance.now();
      const r = simulate(m.value);
      const ms = performance.now() - t0;
      const c = r.trace.channels.findIndex((ch) => ch.key === 'tank.pressure');
      let error = 0;
      r.trace.times.forEach((t, i) => { error = Math.max(error, Math.abs(r.trace.values[c][i] / closed(t) - 1)); });
      rows.push({ method, tolerance: tol, error, steps: r.stats.steps, rhs: r.stats.rhs, ms });
    }
  }
  return rows;
}

export interface CrossoverRow { n: number; nnz: number; denseUs: number; sparseUs: number }

/**
 * Time of one factorisation plus one solve of c·I − J for the benchmark chain's jacobian,
 * dense partial pivoting against sparse LU, at sizes around the threshold.
 */
export function luCrossover(sizes: number[]): CrossoverRow[] {
  const rows: CrossoverRow[] = [];
  for (const chambers of sizes) {
    const m = loadModel(chainNetlist(chambers), 'crossover.yaml');
    if (!m.ok) throw new Error('crossover netlist did not load');
    const sys = new NetworkSystem(m.value);
    const y = sys.initialState();
    const pattern = sys.jacobianPattern;
    const values = new Float64Array(patternSize(pattern));
    sys.jacobianSparse(0, y, values);
    const n = sys.n;
    const c = 1e3;
    const b = new Float64Array(n);
    const J = new Float64Array(n * n);
    const E = new Float64Array(n * n);
    scatterDense(pattern, values, J);
    const dense = new DenseLu(n);
    const sparse = new SparseLu(pattern);
    const time = (f: () => void): number => {
      for (let k = 0; k < 20; k++) f(); // warm up the JIT
      let reps = 0;
      const t0 = performance.now();
      while (performance.now() - t0 < 150) { f(); reps++; }
      return ((performance.now() - t0) / reps) * 1000;
    };
    const denseUs = time(() => {
      for (let i = 0; i < n * n; i++) E[i] = -J[i];
      for (let i = 0; i < n; i++) E[i * n + i] += c;
      dense.factor(E);
      b.fill(1);
      dense.solve(b);
    });
    const sparseUs = time(() => {
      sparse.factor(values, c, -1);
      b.fill(1);
      sparse.solve(b);
    });
    rows.push({ n, nnz: values.length, denseUs, sparseUs });
  }
  return rows;
}
