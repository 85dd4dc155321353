/**
 * Pseudo-arclength continuation of one branch (Keller 1977; Allgower & Georg 2003, ch. 2, §6.1,
 * §8.1): predictor–corrector with the augmented system, step control, and location of folds,
 * branch points and stability changes by bisection along the arc (see continuation.ts).
 */
import { DenseLu } from '../linalg/dense-lu.js';
import { SparseLu } from '../linalg/sparse-lu.js';
import { patternFromEntries, type SparsePattern } from '../linalg/sparse-pattern.js';
import { SPARSE_STABILITY_MIN } from './rightmost.js';
import { GroupProblem } from './trace-problem.js';
import type { TracePoint } from './trace-types.js';

const H_MIN = 1e-7;
const NEWTON_MAX = 8;
const TOL = 1e-10;
/** Largest turning angle (cosine) between successive tangents. */
const COS_MAX_TURN = 0.95;
/** Bisections locating a special point along the arc (a fold's parameter error is second order in the arc). */
const BISECTIONS = 24;
const FOLD_BISECTIONS = 14;
/**
 * A branch is followed no further once a sphere stretches beyond this (rubber bursts long
 * before; on a falling branch the stretch grows without bound as the pressure nears ambient)
 * or a chamber holds this many times the group's gas scale.
 */
const MAX_STRETCH = 20;
const MAX_U = 1000;

// ---- linear algebra of the augmented system ----------------------------------------------

/** Solves [J Fl; tᵀ] z = rhs; returns the sign of the determinant (0 when singular). */
function augmented(n: number, J: Float64Array, Fl: Float64Array, t: Float64Array, rhs: Float64Array, lu: DenseLu): number {
  const N = n + 1;
  const A = new Float64Array(N * N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) A[i * N + j] = J[i * n + j];
    A[i * N + n] = Fl[i];
  }
  for (let j = 0; j < N; j++) A[n * N + j] = t[j];
  if (!lu.factor(A)) return 0;
  let sign = 1;
  for (let k = 0; k < N; k++) {
    if (lu.pivots[k] !== k) sign = -sign;
    if (A[k * N + k] < 0) sign = -sign;
  }
  lu.solve(rhs);
  return sign;
}

/**
 * The augmented system of a large group by sparse LU: the equations' jacobian has at most a full
 * first row (the gas balance), a full first column (the pressure of the first chamber) and the
 * diagonal (trace-problem.ts), bordered by ∂F/∂ℓ and the tangent. The minimum-degree order puts
 * the two full rows last; pivots are static (sparse-lu.ts), and when one is too small the dense
 * factorisation with partial pivoting takes over. The determinant's sign is that of the product
 * of the pivots (a symmetric permutation leaves the determinant unchanged).
 */
class SparseAugmented {
  private readonly pattern: SparsePattern;
  private readonly values: Float64Array;
  private readonly lu: SparseLu;

  constructor(readonly n: number) {
    const N = n + 1;
    const rows: number[] = [];
    const cols: number[] = [];
    for (let j = 0; j < N; j++) { rows.push(0, n); cols.push(j, j); }
    for (let i = 1; i < n; i++) { rows.push(i, i, i); cols.push(0, i, n); }
    this.pattern = patternFromEntries(N, rows, cols);
    this.values = new Float64Array(this.pattern.rowPtr[N]);
    this.lu = new SparseLu(this.pattern);
  }

  /** As `augmented`; null when the static pivots fail (the caller then factorises densely). */
  solve(J: Float64Array, Fl: Float64Array, t: Float64Array, rhs: Float64Array): number | null {
    const n = this.n;
    const v = this.values;
    const { rowPtr, colIdx } = this.pattern;
    for (let i = 0; i <= n; i++) {
      for (let a = rowPtr[i]; a < rowPtr[i + 1]; a++) {
        const j = colIdx[a];
        v[a] = i === n ? t[j] : j === n ? Fl[i] : J[i * n + j];
      }
    }
    // entries of J outside the pattern must be zero, or the sparse solve would be of another matrix
    for (let i = 1; i < n; i++) {
      for (let j = 1; j < n; j++) if (j !== i && J[i * n + j] !== 0) return null;
    }
    if (!this.lu.factor(v)) return null;
    this.lu.solve(rhs);
    return this.lu.negativePivots() % 2 === 0 ? 1 : -1;
  }
}

function norm(v: Float64Array): number {
  return Math.sqrt(v.reduce((a, x) => a + x * x, 0));
}

interface Node { x: Float64Array; t: Float64Array; det: number; growth: number }

export class Tracer {
  readonly n: number;
  private readonly lu: DenseLu;
  private readonly J: Float64Array;
  private readonly F: Float64Array;
  private readonly Fl: Float64Array;
  private start: { x: Float64Array; point: TracePoint | null } | null = null;
  private readonly sparse: SparseAugmented | null;
  private work: { Fl: Float64Array; F: Float64Array; J: Float64Array } | null = null;
  private luN: DenseLu | null = null;

  /** Set when the deadline stopped a branch. */
  timedOut = false;

  constructor(readonly prob: GroupProblem, readonly maxStep: number, readonly maxPoints: number, readonly deadline = Infinity) {
    this.n = prob.n;
    this.lu = new DenseLu(this.n + 1);
    this.J = new Float64Array(this.n * this.n);
    this.F = new Float64Array(this.n);
    this.Fl = new Float64Array(this.n);
    this.sparse = this.n + 1 >= SPARSE_STABILITY_MIN ? new SparseAugmented(this.n) : null;
  }

  /** Solves the augmented system (sparse for large groups, else or when that fails dense); the determinant's sign. */
  private augmented(J: Float64Array, Fl: Float64Array, t: Float64Array, rhs: Float64Array): number {
    const s = this.sparse?.solve(J, Fl, t, rhs);
    return s ?? augmented(this.n, J, Fl, t, rhs, this.lu);
  }

  /** Tangent at a solution x, oriented along `prev` (or with ℓ increasing × sign); det sign too. */
  tangent(x: Float64Array, prev: Float64Array | null, sign: number): { t: Float64Array; det: number } | null {
    const n = this.n;
    if (!this.prob.eval(x, this.F, this.J) || !this.prob.dl(x, this.F, this.Fl)) return null;
    const c = prev ?? (() => { const e = new Float64Array(n + 1); e[n] = 1; return e; })();
    const z = new Float64Array(n + 1);
    z[n] = 1;
    let det = this.augmented(this.J, this.Fl, c, z);
    if (det === 0) {
      // at a fold the ℓ direction is tangent-orthogonal: orient by a fixed generic vector
      const g = new Float64Array(n + 1).map((_, i) => 1 + 0.1 * i);
      z.fill(0); z[n] = 1;
      det = this.augmented(this.J, this.Fl, g, z);
      if (det === 0) return null;
    }
    const s = norm(z);
    for (let i = 0; i <= n; i++) z[i] /= s;
    if (!prev && z[n] * sign < 0) for (let i = 0; i <= n; i++) z[i] = -z[i];
    // the determinant with the tangent itself as the last row
    const w = new Float64Array(n + 1);
    const dsign = this.augmented(this.J, this.Fl, z, w);
    return { t: z, det: dsign };
  }

  /** Corrector from x + h·t onto F = 0 with tᵀ(x − x_pred) = 0. */
  correct(x: Float64Array, t: Float64Array, h: number): { x: Float64Array; its: number } | null {
    const n = this.n;
    const N = n + 1;
    const y = new Float64Array(N);
    for (let i = 0; i < N; i++) y[i] = x[i] + h * t[i];
    const pred = Float64Array.from(y);
    // the corrector's own buffers (n² doubles: kept, not allocated at every call)
    const { Fl, F, J } = (this.work ??= { Fl: new Float64Array(n), F: new Float64Array(n), J: new Float64Array(n * n) });
    if (!this.prob.eval(y, F, J) || !this.prob.dl(y, F, Fl)) return null;
    for (let it = 1; it <= NEWTON_MAX; it++) {
      const rhs = new Float64Array(N);
      for (let i = 0; i < n; i++) rhs[i] = -F[i];
      let c = 0;
      for (let i = 0; i < N; i++) c += t[i] * (y[i] - pred[i]);
      rhs[n] = -c;
      if (this.augmented(J, Fl, t, rhs) === 0) return null;
      for (let i = 0; i < N; i++) y[i] += rhs[i];
      if (!this.prob.eval(y, F, J)) return null;
      const r = F.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
      const d = rhs.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
      if (r < TOL && d < 1e-8) return { x: y, its: it };
    }
    return null;
  }

  /** Newton at fixed ℓ from a guess (to land exactly on a value of the parameter). */
  atParameter(guess: Float64Array, l: number): Float64Array | null {
    const n = this.n;
    const y = Float64Array.from(guess);
    y[n] = l;
    const { F, J } = (this.work ??= { Fl: new Float64Array(n), F: new Float64Array(n), J: new Float64Array(n * n) });
    const lu = (this.luN ??= new DenseLu(n));
    for (let it = 0; it < 30; it++) {
      if (!this.prob.eval(y, F, J)) return null;
      const r = F.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
      if (r < TOL) return y;
      if (!lu.factor(J)) return null;
      const d = F.map((v) => -v);
      lu.solve(d);
      for (let i = 0; i < n; i++) y[i] += d[i];
    }
    return null;
  }

  /** Bisection for a sign change of `indicator` along the arc from node a over step h. */
  locate(a: Node, h: number, indicator: (x: Float64Array, t: Float64Array) => number, steps = BISECTIONS): Float64Array | null {
    const s0 = indicator(a.x, a.t);
    let lo = 0, hi = h;
    let best: Float64Array | null = null;
    for (let k = 0; k < steps; k++) {
      const mid = 0.5 * (lo + hi);
      const c = this.correct(a.x, a.t, mid);
      if (!c) break;
      const tt = this.tangent(c.x, a.t, 1);
      if (!tt) break;
      const v = indicator(c.x, tt.t);
      if (!Number.isFinite(v)) break;
      best = c.x;
      if ((v > 0) === (s0 > 0)) lo = mid; else hi = mid;
    }
    return best;
  }

  /** Follows the branch from x0 in direction `sign` (of ℓ); returns the points and why it stopped. */
  run(x0: Float64Array, sign: number): { points: TracePoint[]; nodes: Float64Array[]; why: string } {
    const n = this.n;
    const points: TracePoint[] = [];
    const nodes: Float64Array[] = [];
    const first = this.tangent(x0, null, sign);
    if (!first) return { points, nodes, why: 'no tangent at the start (singular equations)' };
    // a branch is followed both ways from one start: its stability is taken once
    const p0 = this.start?.x === x0 ? this.start.point : this.prob.point(x0, undefined, Number.NaN);
    this.start = { x: x0, point: p0 };
    if (!p0) return { points, nodes, why: 'the start is outside the model' };
    let cur: Node = { x: x0, t: first.t, det: first.det, growth: p0.growth_rate ?? Number.NaN };
    points.push(p0);
    nodes.push(x0);
    let h = Math.min(this.maxStep, 0.01);
    let why = `reached ${this.maxPoints} points`;
    while (points.length < this.maxPoints) {
      if (performance.now() > this.deadline) { this.timedOut = true; why = 'the time budget ran out (--max-wall)'; break; }
      const c = this.correct(cur.x, cur.t, h);
      const tn = c ? this.tangent(c.x, cur.t, 1) : null;
      const turn = tn ? tn.t.reduce((a, v, i) => a + v * cur.t[i], 0) : -1;
      if (!c || !tn || turn < COS_MAX_TURN) {
        h *= 0.5;
        if (h < H_MIN) { why = 'the step size collapsed (the branch leaves the range of a wall law, or ends)'; break; }
        continue;
      }
      const l = c.x[n];
      if (l < -1e-9 || l > 1 + 1e-9) {
        // land exactly on the end of the range
        const lb = l < 0 ? 0 : 1;
        const w = (lb - cur.x[n]) / (l - cur.x[n]);
        const guess = cur.x.map((v, i) => v + w * (c.x[i] - v));
        const end = this.atParameter(guess, lb);
        const pt = end ? this.prob.point(end, 'end', cur.growth) : null;
        if (pt && end && Math.abs(cur.x[n] - lb) > 1e-12) { points.push(pt); nodes.push(end); }
        why = `reached ${this.prob.param.vary} = ${+this.prob.param.value(lb).toPrecision(6)}${this.prob.param.unit ? ` ${this.prob.param.unit}` : ''}`;
        break;
      }
      const pt = this.prob.point(c.x, undefined, cur.growth);
      if (!pt) { h *= 0.5; if (h < H_MIN) { why = 'the netlist is not valid beyond this value'; break; } continue; }
      if (Object.values(pt.chambers).some((ch) => (ch.stretch ?? 0) > MAX_STRETCH) || c.x.some((v, i) => i < n && v > Math.log(MAX_U))) {
        points.push(pt);
        nodes.push(c.x);
        why = `a chamber inflates without bound (stretch above ${MAX_STRETCH} or more than ${MAX_U} times the gas scale)`;
        break;
      }
      const next: Node = { x: c.x, t: tn.t, det: tn.det, growth: pt.growth_rate ?? Number.NaN };
      // special points between cur and next, located along the arc from cur
      const fold = cur.t[n] !== 0 && next.t[n] !== 0 && (cur.t[n] > 0) !== (next.t[n] > 0);
      const specials: { x: Float64Array; kind: TracePoint['special'] }[] = [];
      let singular: Float64Array | null = null;
      if (fold) {
        singular = this.locate(cur, h, (_x, t) => t[n], FOLD_BISECTIONS);
        if (singular) specials.push({ x: singular, kind: 'fold' });
      } else if (cur.det !== next.det) {
        singular = this.locate(cur, h, (x) => {
          const tt = this.tangent(x, cur.t, 1);
          return tt ? tt.det * cur.det : Number.NaN;
        });
        if (singular) specials.push({ x: singular, kind: 'branch-point' });
      }
      if (Number.isFinite(cur.growth) && Number.isFinite(next.growth) && (cur.growth > 0) !== (next.growth > 0)) {
        // at a fold or branch point the equations' jacobian is singular, which for these networks
        // is exactly a zero eigenvalue of the dynamics: the stability changes there
        const at = singular ?? this.locate(cur, h, (x) => this.prob.growth(x));
        if (at) specials.push({ x: at, kind: 'stability-change' });
      }
      specials.sort((a, b) => Math.abs(a.x[n] - cur.x[n]) - Math.abs(b.x[n] - cur.x[n]));
      for (const s of specials) {
        const sp = this.prob.point(s.x, s.kind);
        if (sp) { points.push(sp); nodes.push(s.x); }
      }
      points.push(pt);
      nodes.push(c.x);
      // a closed loop (an isola) ends where it began
      if (nodes.length > 8) {
        let d = 0;
        for (let i = 0; i <= n; i++) d += (c.x[i] - x0[i]) ** 2;
        if (Math.sqrt(d) < 0.5 * h) { why = 'the branch closes on itself'; break; }
      }
      cur = next;
      h = c.its <= 2 ? Math.min(h * 1.6, this.maxStep) : c.its >= 5 ? h * 0.6 : h;
    }
    return { points, nodes, why };
  }
}
