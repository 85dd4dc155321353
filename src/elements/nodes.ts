/**
 * The node table and the one conserving transfer helper.
 *
 * A gas node (a chamber, a reservoir, tomorrow a cylinder's chamber) is a gas volume with
 * pressure p (Pa abs), temperature T (K) and volume V (m³), written by its element in
 * `evaluate` and read by the elements between nodes. A node exposes up to K = 3 state rows and
 * columns to what joins it, by position:
 *   rows:    0 the slot where mass arrives (its gas mass, or a boundary's store),
 *            1 its energy row (temperature), 2 a row driven by the net inflow (hysteresis);
 *   columns: 0 its mass, 1 its temperature, 2 a third state its pressure depends on;
 * −1 where absent. A node with no state columns (a reservoir) is a boundary.
 *
 * `transfer` is the only way mass moves: q (kg/s) leaves one slot and enters another, so Σ of
 * all mass slots is an exact invariant of the rhs; it also keeps, per node, the
 * direction-split inflows that energy balances need (ṁin, ṁout, Hin = Σ ṁ·T_up).
 *
 * `transferJacobian` is the chain rule of one transfer into the reserved entries: with
 * s = −1 at `from` and +1 at `to`, the rows of both ends respond to q through their row
 * weights (mass ±1; energy ∂Ṫ/∂ṁ, ∂Ṫ/∂ṁin, ∂Ṫ/∂ṁout, ∂Ṫ/∂Hin; third ∂ḣ/∂ṁ), and q depends on
 * the columns of both ends through ∂q/∂p·∂p/∂y (+ ∂q/∂T|p on the temperature column):
 *   ∂f_rows/∂y_cols += (∂rows/∂q)(∂q/∂cols),  plus the upstream temperature carried into Hin.
 * See assemble/jacobian.ts for the whole structure and its references.
 */

/** Rows and columns a node exposes to what joins it. */
export const K = 3;
/** Slots of a transfer's block: two ends. */
const B = 2 * K;

/** A flow q (kg/s) and its partial derivatives in the end pressures (Pa) and temperatures (K). */
export interface FlowPartials { q: number; dp1: number; dp2: number; dT1: number; dT2: number }

export class Nodes {
  readonly names: string[] = [];
  /** Pressure (Pa abs), temperature (K), volume (m³; 0 for a boundary) at the evaluated point. */
  p = new Float64Array(0);
  T = new Float64Array(0);
  V = new Float64Array(0);
  /** Direction-split inflows of the last rhs: ṁin, ṁout (kg/s), Hin = Σ ṁ·T_up (kg·K/s). */
  mIn = new Float64Array(0);
  mOut = new Float64Array(0);
  hIn = new Float64Array(0);
  /** Per node, K rows and K columns (see the file comment), −1 absent. */
  rows = new Int32Array(0);
  cols = new Int32Array(0);
  /** ∂p/∂(column k) at the evaluated point, per node (prepareJacobian). */
  dp = new Float64Array(0);
  /** Energy row weights ∂Ṫ/∂ṁ, ∂Ṫ/∂ṁin, ∂Ṫ/∂ṁout, ∂Ṫ/∂Hin; third row ∂(row 2)/∂ṁ. */
  cM = new Float64Array(0);
  cIn = new Float64Array(0);
  cOut = new Float64Array(0);
  cH = new Float64Array(0);
  cThird = new Float64Array(0);
  /** The first element whose state left its law's range during the last evaluation. */
  fault: string | null = null;
  // transfer blocks (reserved by `link`)
  private linkEnds: number[] = [];
  private lRows = new Int32Array(0);
  private lCols = new Int32Array(0);
  private lPos = new Int32Array(0);
  private readonly rc = new Float64Array(B);
  private readonly cd = new Float64Array(B);

  /** Registers a node; returns its index. */
  add(name: string): number {
    this.names.push(name);
    return this.names.length - 1;
  }

  get count(): number { return this.names.length; }

  /** Allocates the table once every node is registered. */
  allocate(): void {
    const nn = this.names.length;
    this.p = new Float64Array(nn);
    this.T = new Float64Array(nn);
    this.V = new Float64Array(nn);
    this.mIn = new Float64Array(nn);
    this.mOut = new Float64Array(nn);
    this.hIn = new Float64Array(nn);
    this.rows = new Int32Array(nn * K).fill(-1);
    this.cols = new Int32Array(nn * K).fill(-1);
    this.dp = new Float64Array(nn * K);
    this.cM = new Float64Array(nn);
    this.cIn = new Float64Array(nn);
    this.cOut = new Float64Array(nn);
    this.cH = new Float64Array(nn);
    this.cThird = new Float64Array(nn);
  }

  /** Sets the rows and columns node i exposes (−1 absent). */
  expose(i: number, rows: number[], cols: number[]): void {
    for (let k = 0; k < K; k++) {
      this.rows[i * K + k] = rows[k] ?? -1;
      this.cols[i * K + k] = cols[k] ?? -1;
    }
  }

  /** Whether node i has state columns (a gas volume rather than a boundary). */
  hasState(i: number): boolean {
    return this.cols[i * K] >= 0;
  }

  /** Clears the inflow aggregates (start of an rhs). */
  clearInflows(): void {
    this.mIn.fill(0);
    this.mOut.fill(0);
    this.hIn.fill(0);
  }

  /**
   * The one way flows enter the balance: q (kg/s) leaves slot `a` and enters slot `b`; na and
   * nb are the nodes at the two ends whose inflow aggregates follow (−1 for none), Tup the
   * temperature the gas carries.
   */
  transfer(dydt: Float64Array, a: number, na: number, b: number, nb: number, q: number, Tup: number): void {
    dydt[a] -= q;
    dydt[b] += q;
    if (q >= 0) {
      if (na >= 0) this.mOut[na] += q;
      if (nb >= 0) { this.mIn[nb] += q; this.hIn[nb] += q * Tup; }
    } else {
      if (nb >= 0) this.mOut[nb] -= q;
      if (na >= 0) { this.mIn[na] -= q; this.hIn[na] -= q * Tup; }
    }
  }

  /**
   * A transfer of f.mdot from node `from` to node `to`, the gas carrying the upstream
   * temperature (the flow is passed in its object: a double argument would be boxed).
   */
  between(dydt: Float64Array, from: number, to: number, f: { mdot: number }): void {
    const q = f.mdot;
    const Tup = q >= 0 ? this.T[from] : this.T[to];
    const cols = this.cols;
    this.transfer(dydt, this.rows[from * K], cols[from * K] >= 0 ? from : -1, this.rows[to * K], cols[to * K] >= 0 ? to : -1, q, Tup);
  }

  // ---- jacobian of transfers ---------------------------------------------------------------

  /** Collects (pass 1, positions −1) or places (pass 2) the block of a transfer from → to. */
  link(from: number, to: number, entry: (row: number, col: number) => number, placing: boolean): number {
    if (!placing) {
      const h = this.linkEnds.length / 2;
      this.linkEnds.push(from, to);
      for (let r = 0; r < B; r++) {
        const row = this.rows[(r < K ? from : to) * K + (r % K)];
        if (row < 0) continue;
        for (let k = 0; k < B; k++) {
          const col = this.cols[(k < K ? from : to) * K + (k % K)];
          if (col >= 0) entry(row, col);
        }
      }
      return h;
    }
    if (this.lPos.length === 0 && this.linkEnds.length > 0) {
      const nl = this.linkEnds.length / 2;
      this.lRows = new Int32Array(nl * B).fill(-1);
      this.lCols = new Int32Array(nl * B).fill(-1);
      this.lPos = new Int32Array(nl * B * B).fill(-1);
      this.placed = 0;
    }
    const h = this.placed++;
    const rows = this.lRows, cols = this.lCols;
    for (let e = 0; e < 2; e++) {
      const node = e === 0 ? from : to;
      const o = h * B + e * K;
      const state = this.hasState(node);
      for (let k = 0; k < K; k++) {
        rows[o + k] = k === 0 || state ? this.rows[node * K + k] : -1;
        cols[o + k] = this.cols[node * K + k];
      }
    }
    for (let r = 0; r < B; r++) {
      const row = rows[h * B + r];
      if (row < 0) continue;
      for (let k = 0; k < B; k++) {
        const col = cols[h * B + k];
        if (col >= 0) this.lPos[h * B * B + r * B + k] = entry(row, col);
      }
    }
    return h;
  }

  private placed = 0;

  /**
   * Adds the chain rule of transfer `h` (from node a to node c, flow partials fp) into values:
   * Σ (∂rows/∂q)(∂q/∂columns), plus the upstream temperature carried into Hin.
   */
  transferJacobian(h: number, a: number, c: number, fp: FlowPartials, values: Float64Array): void {
    const { lRows: rows, lCols: cols, lPos: pos, rc, cd, dp } = this;
    const sa = this.cols[a * K] >= 0, sc = this.cols[c * K] >= 0;
    const Ta = this.T[a], Tc = this.T[c];
    const q = fp.q;
    cd.fill(0);
    if (sa) {
      cd[0] = fp.dp1 * dp[a * K];
      cd[1] = fp.dp1 * dp[a * K + 1] + fp.dT1;
      cd[2] = fp.dp1 * dp[a * K + 2];
    }
    if (sc) {
      cd[K] = fp.dp2 * dp[c * K];
      cd[K + 1] = fp.dp2 * dp[c * K + 1] + fp.dT2;
      cd[K + 2] = fp.dp2 * dp[c * K + 2];
    }
    rc.fill(0);
    rc[0] = -1;
    rc[K] = 1;
    // Energy rows: gas enters the downstream end at the upstream temperature and leaves the
    // upstream end at its own (the rhs's convention: q ≥ 0 counts as from → to).
    if (sa && rows[h * B + 1] >= 0) {
      rc[1] = -(this.cM[a] + (q < 0 ? this.cIn[a] + this.cH[a] * Tc : -this.cOut[a]));
    }
    if (sc && rows[h * B + K + 1] >= 0) {
      rc[K + 1] = this.cM[c] + (q >= 0 ? this.cIn[c] + this.cH[c] * Ta : -this.cOut[c]);
    }
    if (sa && rows[h * B + 2] >= 0) rc[2] = -this.cThird[a];
    if (sc && rows[h * B + K + 2] >= 0) rc[K + 2] = this.cThird[c];
    const base = h * B * B;
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
      if (at >= 0 && cols[h * B + 1] >= 0) values[at] += this.cH[c] * q;
    } else {
      const at = pos[base + 1 * B + K + 1]; // Ṫ of `from` in T of `to`
      if (at >= 0 && cols[h * B + K + 1] >= 0) values[at] += this.cH[a] * -q;
    }
  }
}
