/**
 * The jacobian ∂f/∂y of a network's right-hand side, assembled element by element into a
 * sparsity pattern reserved once at assembly, in O(chambers + branches) work whatever the
 * topology (a star around a tank costs no more than a chain).
 *
 * Structure of the rhs (assemble/system.ts). Chamber i has states y_i = (m [, T] [, h]); its
 * pressure p_i(y_i) comes from its wall law; branch b joins nodes a → c and carries
 * q_b(p_a, p_c, T_a, T_c, t). The rates are
 *   ṁ_i = Σ_b s_ib·q_b + feeds                                  (s = −1 at `from`, +1 at `to`)
 *   Ṫ_i = Φ_T(y_i; ṁ_i, ṁin_i, ṁout_i, Hin_i),   ḣ_i = Φ_h(h_i; ṁ_i),
 * where the aggregates ṁin, ṁout, Hin = Σ ṁ·T_up sum the branch flows by direction. Hence
 *   ∂f/∂y = ∂Φ/∂y|_aggregates  (chamber-local)  +  Σ_b (∂Φ/∂aggregates)(∂aggregates/∂q_b)(∂q_b/∂y),
 * and ∂q_b/∂y involves only the states of the branch's two ends, through
 *   ∂q/∂m = (∂q/∂p)·(∂p/∂m), ∂q/∂T = (∂q/∂p)·(∂p/∂T) + ∂q/∂T|_p, ∂q/∂h = (∂q/∂p)·(∂p/∂h).
 * Pressure partials are analytic (ChamberState.pressurePartials, from p(V)(V + Vd) = m·R·T);
 * the flow partials ∂q/∂p, ∂q/∂T are one-sided differences of the scalar flow law of that one
 * branch (BranchState.partials): cheap, local and generic over tubes, valves and valves in
 * lines. The chamber-local part of Φ_T (which involves the wall's curvature through κ) is a
 * difference quotient of that chamber alone, re-solved at a perturbed state.
 *
 * Why not coloured differences of the whole rhs: a tank joined to every other chamber makes a
 * dense row, and a column colouring then needs one rhs evaluation per chamber (O(n²) work per
 * jacobian); the element-wise assembly stays O(n) and costs less than one rhs evaluation.
 *
 * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7–8 (Rosenbrock methods need
 * the jacobian at every step; exploit its structure); Curtis, Powell & Reid, J. Inst. Maths
 * Applics 13 (1974) 117 (the colouring alternative and its limits).
 */
import type { BranchFlow, BranchPartials, BranchState } from '../elements/branch.js';
import type { ChamberState, PressurePartials } from '../elements/chamber.js';
import type { Gas } from '../physics/gas.js';
import type { Model } from '../model/types.js';
import { patternFromEntries, patternIndex, type SparsePattern } from '../linalg/sparse-pattern.js';

/** What the jacobian reads of the system (assemble/system.ts implements it). */
export interface JacobianHost {
  readonly model: Model;
  readonly n: number;
  readonly nc: number;
  readonly gas: Gas;
  readonly isothermal: boolean;
  readonly rtol: number;
  readonly atol: Float64Array;
  readonly mIdx: Int32Array;
  readonly TIdx: Int32Array;
  readonly hIdx: Int32Array;
  readonly resIdx: Int32Array;
  readonly feedIdx: Int32Array;
  readonly feeds: readonly { into: number; T: number }[];
  readonly chambers: ChamberState[];
  readonly branches: BranchState[];
  readonly p: Float64Array;
  readonly T: Float64Array;
  readonly V: Float64Array;
  readonly kappa: Float64Array;
  readonly flows: BranchFlow[];
  rhs(t: number, y: Float64Array, dydt: Float64Array): void;
  temperatureRate(i: number, m: number, T: number, p: number, kap: number, mdot: number): number;
  /** ∂q/∂p of feed f (a delivery curve) at the last evaluation, into out[0]. */
  feedSlope(f: number, t: number, out: Float64Array): void;
}

const SQRT_EPS = Math.sqrt(2.220446049250313e-16);

/** Slots per branch end: rows (mass or store, T, h) and columns (m, T, h). */
const K = 3;
/** Slots per branch: two ends. */
const B = 2 * K;

/** A forward-difference increment about √eps·scale, exactly representable at x. */
function increment(x: number, scale: number): number {
  return (x + SQRT_EPS * scale) - x;
}

export class NetworkJacobian {
  readonly pattern: SparsePattern;
  /** Per branch, the state rows of its ends: [from: mass|store, T, h, to: mass|store, T, h], −1 absent. */
  private readonly rows: Int32Array;
  /** Per branch, the state columns of its ends: [from: m, T, h, to: m, T, h], −1 absent. */
  private readonly cols: Int32Array;
  /** Per branch, value positions of (row r, column k): pos[b·36 + r·6 + k], −1 absent. */
  private readonly pos: Int32Array;
  /** Per chamber, value positions of its own block (rows m, T, h × columns m, T, h). */
  private readonly own: Int32Array;
  /** Chamber index of each branch end, −1 for a reservoir. */
  private readonly endChamber: Int32Array;
  /** Node index (chambers, then reservoirs) of each branch end. */
  private readonly endNode: Int32Array;
  // per-chamber scratch
  private readonly dpdm: Float64Array;
  private readonly dpdT: Float64Array;
  private readonly dpdh: Float64Array;
  /** ∂Ṫ/∂ṁ, ∂Ṫ/∂ṁin, ∂Ṫ/∂ṁout, ∂Ṫ/∂Hin of chambers with a temperature state. */
  private readonly cM: Float64Array;
  private readonly cIn: Float64Array;
  private readonly cOut: Float64Array;
  private readonly cH: Float64Array;
  /** ∂ḣ/∂ṁ of chambers with a hysteresis state. */
  private readonly cHyst: Float64Array;
  private readonly f: Float64Array;
  private readonly pp: PressurePartials = { dm: 0, dT: 0, dh: 0 };
  private readonly bp: BranchPartials = { q: 0, dp1: 0, dp2: 0, dT1: 0, dT2: 0 };
  private readonly rc = new Float64Array(B);
  private readonly cd = new Float64Array(B);
  private readonly aside = { p: 0, V: 0, kappa: 0 };
  /** Feeds with a delivery curve, and the value positions of rows (store, T of the chamber, m of the chamber) × columns (m, T, h). */
  private readonly curveFeeds: Int32Array;
  private readonly feedPos: Int32Array;
  private readonly slope = new Float64Array(1);

  constructor(private readonly sys: JacobianHost) {
    const { model, nc, mIdx, TIdx, hIdx, resIdx } = sys;
    const nb = model.branches.length;
    // Plain loops over typed arrays: this runs once, before the JIT has warmed up, and must
    // stay cheap for ten thousand elements.
    const rows = (this.rows = new Int32Array(nb * B).fill(-1));
    const cols = (this.cols = new Int32Array(nb * B).fill(-1));
    const endChamber = (this.endChamber = new Int32Array(nb * 2).fill(-1));
    const endNode = (this.endNode = new Int32Array(nb * 2));
    const states = (i: number, k: number): number => (k === 0 ? mIdx[i] : k === 1 ? TIdx[i] : hIdx[i]);
    let count = 0;
    for (let i = 0; i < nc; i++) {
      const s = 1 + (TIdx[i] >= 0 ? 1 : 0) + (hIdx[i] >= 0 ? 1 : 0);
      count += s * s;
    }
    for (let b = 0; b < nb; b++) {
      const bm = model.branches[b];
      for (let e = 0; e < 2; e++) {
        const node = e === 0 ? bm.from : bm.to;
        const o = b * B + e * K;
        if (node.kind === 'chamber') {
          const i = node.index;
          endChamber[b * 2 + e] = i;
          endNode[b * 2 + e] = i;
          for (let k = 0; k < K; k++) { rows[o + k] = states(i, k); cols[o + k] = states(i, k); }
        } else {
          endNode[b * 2 + e] = nc + node.index;
          rows[o] = resIdx[node.index];
        }
      }
      let nr = 0, nk = 0;
      for (let r = 0; r < B; r++) { if (rows[b * B + r] >= 0) nr++; if (cols[b * B + r] >= 0) nk++; }
      count += nr * nk;
    }
    // a feed with a delivery curve: its flow depends on the state of the chamber it fills
    const curveFeeds = model.feeds.map((fd, k) => (fd.curve ? k : -1)).filter((k) => k >= 0);
    this.curveFeeds = Int32Array.from(curveFeeds);
    count += curveFeeds.length * K * K;
    const ri = new Int32Array(count);
    const ci = new Int32Array(count);
    let at = 0;
    const feedRows = (k: number, r: number): number => (r === 0 ? sys.feedIdx[k] : r === 1 ? TIdx[model.feeds[k].into] : -1);
    for (const k of curveFeeds) {
      const i = model.feeds[k].into;
      for (let r = 0; r < K; r++) {
        const row = r === 2 ? mIdx[i] : feedRows(k, r);
        if (row < 0) continue;
        for (let c = 0; c < K; c++) {
          const col = states(i, c);
          if (col >= 0) { ri[at] = row; ci[at] = col; at++; }
        }
      }
    }
    for (let i = 0; i < nc; i++) {
      for (let r = 0; r < K; r++) {
        const row = states(i, r);
        if (row < 0) continue;
        for (let k = 0; k < K; k++) {
          const col = states(i, k);
          if (col >= 0) { ri[at] = row; ci[at] = col; at++; }
        }
      }
    }
    for (let b = 0; b < nb; b++) {
      for (let r = 0; r < B; r++) {
        const row = rows[b * B + r];
        if (row < 0) continue;
        for (let k = 0; k < B; k++) {
          const col = cols[b * B + k];
          if (col >= 0) { ri[at] = row; ci[at] = col; at++; }
        }
      }
    }
    const pattern = (this.pattern = patternFromEntries(sys.n, ri.subarray(0, at), ci.subarray(0, at)));
    this.feedPos = new Int32Array(curveFeeds.length * K * K).fill(-1);
    curveFeeds.forEach((k, j) => {
      const i = model.feeds[k].into;
      for (let r = 0; r < K; r++) {
        const row = r === 2 ? mIdx[i] : feedRows(k, r);
        if (row < 0) continue;
        for (let c = 0; c < K; c++) {
          const col = states(i, c);
          if (col >= 0) this.feedPos[j * K * K + r * K + c] = patternIndex(pattern, row, col);
        }
      }
    });
    const pos = (this.pos = new Int32Array(nb * B * B).fill(-1));
    for (let b = 0; b < nb; b++) {
      for (let r = 0; r < B; r++) {
        const row = rows[b * B + r];
        if (row < 0) continue;
        for (let k = 0; k < B; k++) {
          const col = cols[b * B + k];
          if (col >= 0) pos[b * B * B + r * B + k] = patternIndex(pattern, row, col);
        }
      }
    }
    const own = (this.own = new Int32Array(nc * K * K).fill(-1));
    for (let i = 0; i < nc; i++) {
      for (let r = 0; r < K; r++) {
        const row = states(i, r);
        if (row < 0) continue;
        for (let k = 0; k < K; k++) {
          const col = states(i, k);
          if (col >= 0) own[i * K * K + r * K + k] = patternIndex(pattern, row, col);
        }
      }
    }
    this.dpdm = new Float64Array(nc);
    this.dpdT = new Float64Array(nc);
    this.dpdh = new Float64Array(nc);
    this.cM = new Float64Array(nc);
    this.cIn = new Float64Array(nc);
    this.cOut = new Float64Array(nc);
    this.cH = new Float64Array(nc);
    this.cHyst = new Float64Array(nc);
    this.f = new Float64Array(sys.n);
  }

  /** Writes ∂f/∂y at (t, y) into values (pattern order). */
  compute(t: number, y: Float64Array, values: Float64Array): void {
    const sys = this.sys;
    const { nc, mIdx, TIdx, hIdx, chambers, gas } = sys;
    const { R, cv, cp } = gas;
    const f = this.f;
    // The rhs at (t, y) leaves p, T, V, κ, the flows and the aggregates in the system.
    sys.rhs(t, y, f);
    values.fill(0);
    const { pp, own } = this;
    for (let i = 0; i < nc; i++) {
      const m = y[mIdx[i]];
      const T = sys.T[i];
      const h = hIdx[i] >= 0 ? y[hIdx[i]] : 1;
      chambers[i].pressurePartials(m, T, h, sys.V[i], sys.p[i], sys.kappa[i], pp);
      this.dpdm[i] = pp.dm;
      this.dpdT[i] = pp.dT;
      this.dpdh[i] = pp.dh;
      if (TIdx[i] >= 0) {
        const p = sys.p[i], kap = sys.kappa[i];
        const D = m * cv + p * kap * m * R;
        this.cM[i] = (-p * kap * R * T) / D;
        this.cIn[i] = (-cv * T) / D;
        this.cOut[i] = (-R * T) / D;
        this.cH[i] = cp / D;
      }
      if (hIdx[i] >= 0) {
        const mdot = f[mIdx[i]];
        const dm = chambers[i].dmHyst;
        const target = mdot > 0 ? 1 : 0;
        this.cHyst[i] = (Math.sign(mdot) * (target - h)) / dm;
        values[own[i * K * K + 2 * K + 2]] += -Math.abs(mdot) / dm;
      }
    }
    this.branchTerms(t, values);
    this.feedTerms(t, values);
    for (let i = 0; i < nc; i++) if (TIdx[i] >= 0) this.temperatureOwn(i, y, values);
  }

  /** A curve feed's q(p_i): −∂q/∂y in its store row, +∂q/∂y in the chamber's mass row, and its inflow in the energy row. */
  private feedTerms(t: number, values: Float64Array): void {
    const sys = this.sys;
    for (let j = 0; j < this.curveFeeds.length; j++) {
      const k = this.curveFeeds[j];
      const fd = sys.feeds[k];
      sys.feedSlope(k, t, this.slope);
      const i = fd.into;
      const dq = [this.slope[0] * this.dpdm[i], this.slope[0] * this.dpdT[i], this.slope[0] * this.dpdh[i]];
      const w = [-1, sys.TIdx[i] >= 0 ? this.cIn[i] + this.cH[i] * fd.T : 0, 1];
      for (let r = 0; r < K; r++) {
        for (let c = 0; c < K; c++) {
          const at = this.feedPos[j * K * K + r * K + c];
          if (at >= 0) values[at] += w[r] * dq[c];
        }
      }
    }
  }

  /** Σ_b (∂rows/∂q_b)(∂q_b/∂columns), plus the upstream temperature carried into Hin. */
  private branchTerms(t: number, values: Float64Array): void {
    const sys = this.sys;
    const withT = !sys.isothermal;
    const { rows, cols, pos, endChamber, endNode, rc, cd, bp } = this;
    const nb = sys.branches.length;
    for (let b = 0; b < nb; b++) {
      const a = endNode[2 * b], c = endNode[2 * b + 1];
      const ca = endChamber[2 * b], cc = endChamber[2 * b + 1];
      const Ta = sys.T[a], Tc = sys.T[c];
      // sys.flows[b] is this branch's flow at these end states (from the rhs above)
      sys.branches[b].partials(t, sys.p[a], sys.p[c], Ta, Tc, withT, bp, sys.flows[b]);
      const q = bp.q;
      cd.fill(0);
      if (ca >= 0) {
        cd[0] = bp.dp1 * this.dpdm[ca];
        cd[1] = bp.dp1 * this.dpdT[ca] + bp.dT1;
        cd[2] = bp.dp1 * this.dpdh[ca];
      }
      if (cc >= 0) {
        cd[K] = bp.dp2 * this.dpdm[cc];
        cd[K + 1] = bp.dp2 * this.dpdT[cc] + bp.dT2;
        cd[K + 2] = bp.dp2 * this.dpdh[cc];
      }
      rc.fill(0);
      rc[0] = -1;
      rc[K] = 1;
      // Energy rows: gas enters the downstream end at the upstream temperature and leaves the
      // upstream end at its own (the rhs's convention: q ≥ 0 counts as from → to).
      if (ca >= 0 && rows[b * B + 1] >= 0) {
        rc[1] = -(this.cM[ca] + (q < 0 ? this.cIn[ca] + this.cH[ca] * Tc : -this.cOut[ca]));
      }
      if (cc >= 0 && rows[b * B + K + 1] >= 0) {
        rc[K + 1] = this.cM[cc] + (q >= 0 ? this.cIn[cc] + this.cH[cc] * Ta : -this.cOut[cc]);
      }
      if (ca >= 0 && rows[b * B + 2] >= 0) rc[2] = -this.cHyst[ca];
      if (cc >= 0 && rows[b * B + K + 2] >= 0) rc[K + 2] = this.cHyst[cc];
      const base = b * B * B;
      for (let r = 0; r < B; r++) {
        const w = rc[r];
        if (w === 0) continue;
        for (let k = 0; k < B; k++) {
          const at = pos[base + r * B + k];
          if (at >= 0) values[at] += w * cd[k];
        }
      }
      if (q >= 0) {
        const at = pos[base + (K + 1) * B + 1]; // Ṫ of `to` in T of `from`
        if (at >= 0 && cols[b * B + 1] >= 0) values[at] += this.cH[cc] * q;
      } else {
        const at = pos[base + 1 * B + K + 1]; // Ṫ of `from` in T of `to`
        if (at >= 0 && cols[b * B + K + 1] >= 0) values[at] += this.cH[ca] * -q;
      }
    }
  }

  /** ∂Ṫ_i/∂(m_i, T_i, h_i) at fixed aggregates, by differences of chamber i alone. */
  private temperatureOwn(i: number, y: Float64Array, values: Float64Array): void {
    const sys = this.sys;
    const { mIdx, TIdx, hIdx } = sys;
    const ch = sys.chambers[i];
    const m = y[mIdx[i]], T = y[TIdx[i]];
    const h = hIdx[i] >= 0 ? y[hIdx[i]] : 1;
    const mdot = this.f[mIdx[i]];
    const base = sys.temperatureRate(i, m, T, sys.p[i], sys.kappa[i], mdot);
    const s = this.aside;
    const rowT = i * K * K + 1 * K;
    const dm = increment(m, Math.max(Math.abs(m), sys.atol[mIdx[i]] / sys.rtol));
    ch.solveAside(m + dm, T, h, s);
    values[this.own[rowT + 0]] += (sys.temperatureRate(i, m + dm, T, s.p, s.kappa, mdot) - base) / dm;
    const dT = increment(T, T);
    ch.solveAside(m, T + dT, h, s);
    values[this.own[rowT + 1]] += (sys.temperatureRate(i, m, T + dT, s.p, s.kappa, mdot) - base) / dT;
    if (hIdx[i] >= 0) {
      // h lives in [0, 1] and the wall clamps it there: difference inwards.
      const dh = h + SQRT_EPS > 1 ? (h - SQRT_EPS) - h : increment(h, 1);
      ch.solveAside(m, T, h + dh, s);
      values[this.own[rowT + 2]] += (sys.temperatureRate(i, m, T, s.p, s.kappa, mdot) - base) / dh;
    }
  }
}
