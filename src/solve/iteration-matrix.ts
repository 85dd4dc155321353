/**
 * The linear algebra of a Rosenbrock step: the jacobian J at the start of the step and the
 * factorisation of the iteration matrix E = c·I − J, c = 1/(hγ), reused by every stage.
 *
 * Two implementations behind one interface, chosen per problem:
 * - dense: J and E as n×n arrays, LU with partial pivoting. J from the problem's dense
 *   jacobian, its sparse one scattered, coloured differences scattered, or plain differences.
 * - sparse: J in the problem's pattern, sparse LU with a minimum degree order and static pivots
 *   (linalg/sparse-lu.ts). J from the problem's sparse jacobian or coloured differences.
 *   Should a static-pivot factorisation be refused (a row without diagonal dominance), E is
 *   factorised densely with partial pivoting when n ≤ DENSE_FALLBACK_MAX; above that the step
 *   is reported singular, so the integrator halves it, which raises c and with it dominance.
 *
 * Size threshold (measured, see docs/dev-performance.md): below SPARSE_MIN_N unknowns dense LU
 * is as fast, and its partial pivoting is the more robust choice.
 *
 * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7 (one LU per step) and §IV.8
 * (exploiting sparse and banded jacobians); Duff, Erisman & Reid, Direct Methods for Sparse
 * Matrices, 2nd ed. 2017, ch. 10.
 */
import { DenseLu } from '../linalg/dense-lu.js';
import { analyseSparse, SparseLu, type SparseSymbolic } from '../linalg/sparse-lu.js';
import { patternSize, scatterDense, type SparsePattern } from '../linalg/sparse-pattern.js';
import { ColouredJacobian, FiniteJacobian } from './finite-jacobian.js';
import { allFinite } from './step-control.js';
import type { IntegrateOptions, OdeProblem, WorkCounts } from './types.js';

/** Unknowns from which a problem with a jacobian pattern is solved with sparse LU. */
export const SPARSE_MIN_N = 16;
/** A pattern denser than this fraction of n² is solved densely whatever its size. */
const SPARSE_MAX_DENSITY = 0.2;
/** Largest n for which a refused sparse factorisation is redone densely with pivoting. */
export const DENSE_FALLBACK_MAX = 600;

export interface IterationMatrix {
  readonly kind: 'dense' | 'sparse';
  /**
   * Computes J at (t, y), given f0 = f(t, y). Returns the rhs evaluations spent (differences)
   * or −1 when J is not finite.
   */
  linearise(t: number, y: Float64Array, f0: Float64Array): number;
  /** Factorises c·I − J; false when singular (or refused, see above). */
  factor(c: number): boolean;
  /** Solves (c·I − J) x = b in place with the last successful factorisation. */
  solve(b: Float64Array): void;
}

// The driver restarts the integrator at every breakpoint and event, and each restart builds a
// new iteration matrix; the analysis of a pattern (ordering, factor structure, colouring) is
// done once and shared through these caches, keyed by the pattern object.
const symbolicCache = new WeakMap<SparsePattern, SparseSymbolic>();
const colouredCache = new WeakMap<SparsePattern, ColouredJacobian>();

function symbolicOf(p: SparsePattern): SparseSymbolic {
  let s = symbolicCache.get(p);
  if (!s) symbolicCache.set(p, (s = analyseSparse(p)));
  return s;
}

/** A coloured difference jacobian for the pattern (its work arrays are shared: single-threaded use). */
function colouredOf(p: SparsePattern): ColouredJacobian {
  let c = colouredCache.get(p);
  if (!c) colouredCache.set(p, (c = new ColouredJacobian(p)));
  return c;
}

class DenseIteration implements IterationMatrix {
  readonly kind = 'dense' as const;
  private readonly J: Float64Array;
  private readonly E: Float64Array;
  private readonly lu: DenseLu;
  private readonly fd: FiniteJacobian;
  private readonly values: Float64Array | null;
  private readonly coloured: ColouredJacobian | null;

  constructor(private readonly p: OdeProblem) {
    const n = p.n;
    this.J = new Float64Array(n * n);
    this.E = new Float64Array(n * n);
    this.lu = new DenseLu(n);
    this.fd = new FiniteJacobian(n);
    const pattern = !p.jacobian ? p.jacobianPattern : undefined;
    this.values = pattern ? new Float64Array(patternSize(pattern)) : null;
    this.coloured = pattern && !p.jacobianSparse ? colouredOf(pattern) : null;
  }

  linearise(t: number, y: Float64Array, f0: Float64Array): number {
    const { p, J, values } = this;
    let used = 0;
    if (p.jacobian) {
      J.fill(0);
      p.jacobian(t, y, J);
    } else if (values && p.jacobianPattern) {
      if (this.coloured) used = this.coloured.jacobian(p, t, y, f0, values);
      else (p.jacobianSparse as NonNullable<OdeProblem['jacobianSparse']>)(t, y, values);
      scatterDense(p.jacobianPattern, values, J);
    } else {
      used = this.fd.jacobian(p, t, y, f0, J);
    }
    return allFinite(J) ? used : -1;
  }

  factor(c: number): boolean {
    const { J, E } = this;
    const n = this.p.n;
    for (let i = 0; i < n * n; i++) E[i] = -J[i];
    for (let i = 0; i < n; i++) E[i * n + i] += c;
    return this.lu.factor(E);
  }

  solve(b: Float64Array): void {
    this.lu.solve(b);
  }
}

class SparseIteration implements IterationMatrix {
  readonly kind = 'sparse' as const;
  private readonly values: Float64Array;
  private readonly lu: SparseLu;
  private readonly coloured: ColouredJacobian | null;
  /** Dense fallback, allocated on first use. */
  private dense: { E: Float64Array; lu: DenseLu } | null = null;
  private usingDense = false;

  constructor(private readonly p: OdeProblem) {
    const pattern = p.jacobianPattern;
    if (!pattern) throw new Error('SparseIteration needs a jacobian pattern');
    this.values = new Float64Array(patternSize(pattern));
    this.lu = new SparseLu(symbolicOf(pattern));
    this.coloured = p.jacobianSparse ? null : colouredOf(pattern);
  }

  linearise(t: number, y: Float64Array, f0: Float64Array): number {
    const { p, values } = this;
    let used = 0;
    if (this.coloured) used = this.coloured.jacobian(p, t, y, f0, values);
    else (p.jacobianSparse as NonNullable<OdeProblem['jacobianSparse']>)(t, y, values);
    return allFinite(values) ? used : -1;
  }

  factor(c: number): boolean {
    this.usingDense = false;
    if (this.lu.factor(this.values, c, -1)) return true;
    const n = this.p.n;
    if (n > DENSE_FALLBACK_MAX) return false;
    this.dense ??= { E: new Float64Array(n * n), lu: new DenseLu(n) };
    const { E, lu } = this.dense;
    scatterDense(this.p.jacobianPattern!, this.values, E);
    for (let i = 0; i < n * n; i++) E[i] = -E[i];
    for (let i = 0; i < n; i++) E[i * n + i] += c;
    this.usingDense = lu.factor(E);
    return this.usingDense;
  }

  solve(b: Float64Array): void {
    if (this.usingDense) this.dense!.lu.solve(b);
    else this.lu.solve(b);
  }
}

/** Which linear algebra a problem gets (see the module comment). */
export function chooseLinearAlgebra(p: OdeProblem, option: IntegrateOptions['linearAlgebra'] = 'auto'): 'dense' | 'sparse' {
  const pattern = p.jacobianPattern;
  if (!pattern || p.jacobian) return 'dense';
  if (option === 'dense' || option === 'sparse') return option;
  if (p.n < SPARSE_MIN_N) return 'dense';
  if (patternSize(pattern) > SPARSE_MAX_DENSITY * p.n * p.n) return 'dense';
  return 'sparse';
}

export function makeIterationMatrix(p: OdeProblem, option?: IntegrateOptions['linearAlgebra']): IterationMatrix {
  return chooseLinearAlgebra(p, option) === 'sparse' ? new SparseIteration(p) : new DenseIteration(p);
}

/**
 * What a linearly implicit one-step method (RODAS, ROS34PW2) keeps of the point it steps from:
 * f0 = f(t, y), the jacobian with its iteration matrix, and ∂f/∂t.
 */
export class Linearisation {
  readonly n: number;
  /** f(t, y) at the current point. */
  f0: Float64Array;
  protected readonly ft: Float64Array;
  protected readonly lu: IterationMatrix;
  private readonly fd: FiniteJacobian;

  constructor(protected readonly p: OdeProblem, linearAlgebra?: IntegrateOptions['linearAlgebra']) {
    this.n = p.n;
    this.f0 = new Float64Array(p.n);
    this.ft = new Float64Array(p.n);
    this.lu = makeIterationMatrix(p, linearAlgebra);
    this.fd = new FiniteJacobian(p.n);
  }

  /** f0 = f(t, y); false when not finite. */
  evalRhs(t: number, y: Float64Array, work: WorkCounts): boolean {
    this.p.rhs(t, y, this.f0);
    work.rhs++;
    return allFinite(this.f0);
  }

  /**
   * J = ∂f/∂y and ft = ∂f/∂t at (t, y), given f0; the ∂f/∂t difference stays short of tLimit.
   * False when either is not finite: no step size can cure that.
   */
  linearise(t: number, y: Float64Array, h: number, tLimit: number, work: WorkCounts): boolean {
    const { p } = this;
    const used = this.lu.linearise(t, y, this.f0);
    work.jacobians++;
    if (used < 0) return false;
    work.rhs += used;
    // ∂f/∂t: zero without differencing where the problem says f does not depend on t.
    const tFar = t + h;
    if (p.timeInvariant?.(Math.min(t, tFar), Math.max(t, tFar))) this.ft.fill(0);
    else work.rhs += this.fd.timeDerivative(p, t, y, this.f0, h, tLimit, this.ft);
    return allFinite(this.ft);
  }
}
