/**
 * A wave line (`model: wave`): a line cut into N segments, each holding its gas (mass and
 * temperature at its centre) and joined by faces that carry momentum, so pressure waves travel
 * at the speed of sound, reflect at closed ends and decay by friction.
 *
 * Staggered grid, Δx = L/N, A = πD²/4: cells j = 1..N (volume A·Δx) and faces k = 0..N; face 0
 * joins the `from` node to cell 1 and face N cell N to the `to` node (length Δx/2 each), the
 * others join neighbouring cells (length Δx). Per face (one-dimensional momentum, convective
 * acceleration neglected, friction by the Darcy factor of physics/tube.ts):
 *   dq/dt = (A/ℓ)·(p_left − p_right) − (A/ℓ)·Δp_f,   Δp_f = (f·Re)·μ·ℓ·q / (2 D² ρ̄ A)
 * (f·Re = 64 laminar: the Hagen–Poiseuille drop of the segment; ρ̄ the mean of its two sides).
 * Per cell (mass and energy of a rigid volume, ideal gas p = m R T / V):
 *   dm/dt = q_in − q_out,   m c_v dT/dt = Σ_in q (c_p T_up − c_v T) − Σ_out q R T + hA (T_a − T)
 * with the wall exchange of fully developed laminar flow, Nu = 3.66 (Incropera & DeWitt,
 * Fundamentals of Heat and Mass Transfer, §8.4, from memory), h·A = Nu·k·π·Δx and the gas's
 * conductivity k = μ (c_p + 5R/4) (modified Eucken relation, from memory). Waves in a wide line
 * are therefore adiabatic (c = √(γ R T)); the gas of a thin line relaxes towards the wall
 * temperature within about ρ c_v D²/(4 Nu k) (40 ms for a 4 mm line at 1 bar), which slows and
 * damps its waves, as in real tubing.
 * In the limit of small amplitude and no loss this is the lumped transmission line of
 * linear acoustics (Kinsler, Frey, Coppens & Sanders, Fundamentals of Acoustics, 4th ed., ch. 5
 * and 10): waves at c, doubling at a closed end, the quarter-wave resonance c/(4L).
 *
 * Limits: no choking and no convective acceleration, so the law is meant for Mach numbers well
 * below 1; a run warns above 0.3 (use a lumped line for a hose that chokes). The end nodes get
 * no tubing volume: the line's gas is in its cells. Mass moves only through the node table's
 * transfer (faces 0 and N) and between the line's own mass slots (interior faces), so it is
 * conserved to round-off. The jacobian of a network with a wave line is taken by coloured
 * differences over the pattern the line reserves (`numericJacobian`).
 */
import type { BranchModel, Model } from '../model/types.js';
import { frictionFactor } from '../physics/tube.js';
import type { Assembly, Channel, Element, ElementSummary, JacobianReserve } from './contract.js';
import { K, type Nodes } from './nodes.js';
import { emptyBranchFlow, type BranchFlow } from './branch.js';

/** Nusselt number of fully developed laminar tube flow at constant wall temperature (from memory). */
const NUSSELT = 3.66;
/** A wave line warns above this Mach number (the law neglects convective acceleration). */
const MACH_WARN = 0.3;

/** Pressure (Pa abs) of a node at the start, from the model (chambers: ideal gas over their volume). */
function startPressure(model: Model, ref: BranchModel['from']): number {
  if (ref.kind === 'reservoir') return model.reservoirs[ref.index].pressure.at(0);
  if (ref.kind === 'port') throw new Error('a wave line at a cylinder port: model/build.ts refuses it');
  const c = model.chambers[ref.index];
  return (c.m0 * model.gas.R * c.T0) / (c.V0 + c.deadVolume);
}

export class WaveLineElement implements Element {
  readonly kind = 'line';
  readonly name: string;
  readonly numericJacobian = true;
  readonly N: number;
  private readonly A: number;
  private readonly dx: number;
  private readonly D: number;
  private readonly rel: number;
  /** First slots: flows q_0..q_N, masses m_1..m_N, temperatures T_1..T_N. */
  private readonly q0: number;
  private readonly m0: number;
  private readonly t0: number;
  private readonly nodes: Nodes;
  // evaluated point (cells 0..N−1)
  private readonly p: Float64Array;
  private readonly T: Float64Array;
  private readonly rho: Float64Array;
  private readonly q: Float64Array;
  /** The flow at the from end, for the system's per-branch views (fault diagnosis). */
  readonly current: BranchFlow = emptyBranchFlow();

  constructor(readonly b: BranchModel, private readonly asm: Assembly, readonly from: number, readonly to: number) {
    const l = b.line!;
    this.name = b.name;
    this.N = l.wave!.segments;
    this.D = l.diameter;
    this.A = (Math.PI / 4) * l.diameter * l.diameter;
    this.dx = l.length / this.N;
    this.rel = l.roughness / l.diameter;
    this.nodes = asm.nodes;
    const N = this.N;
    const rhoA = asm.pa / (asm.gas.R * asm.Ta);
    const qScale = 1e-3 * rhoA * Math.sqrt(asm.gas.gamma * asm.gas.R * asm.Ta) * this.A;
    const slots = [];
    for (let k = 0; k <= N; k++) slots.push({ name: `q${k}`, unit: 'kg/s', scale: qScale });
    for (let j = 1; j <= N; j++) slots.push({ name: `m${j}`, unit: 'kg', scale: 'mass' as const, mass: 'held' as const });
    for (let j = 1; j <= N; j++) slots.push({ name: `T${j}`, unit: 'K', scale: 300 });
    this.q0 = asm.slots(slots);
    this.m0 = this.q0 + N + 1;
    this.t0 = this.m0 + N;
    this.p = new Float64Array(N);
    this.T = new Float64Array(N);
    this.rho = new Float64Array(N);
    this.q = new Float64Array(N + 1);
  }

  /** Gas mass the line holds at the start (kg): the mass balance counts it. */
  initial(y: Float64Array): void {
    const { asm, N } = this;
    const pA = startPressure(asm.model, this.b.from);
    const pB = startPressure(asm.model, this.b.to);
    const V = this.A * this.dx;
    for (let j = 0; j < N; j++) {
      const x = (j + 0.5) / N;
      const p = pA + (pB - pA) * x;
      y[this.q0 + j] = 0;
      y[this.m0 + j] = (p * V) / (asm.gas.R * asm.Ta);
      y[this.t0 + j] = asm.Ta;
    }
    y[this.q0 + N] = 0;
  }

  evaluate(_t: number, y: Float64Array): void {
    const { N, asm } = this;
    const V = this.A * this.dx;
    for (let j = 0; j < N; j++) {
      const m = y[this.m0 + j];
      const T = y[this.t0 + j];
      this.T[j] = T;
      this.rho[j] = m / V;
      this.p[j] = (m * asm.gas.R * T) / V;
      if (!(this.p[j] > 0) && this.nodes.fault === null) this.nodes.fault = this.name;
    }
    for (let k = 0; k <= N; k++) this.q[k] = y[this.q0 + k];
    this.current.mdot = this.q[0];
  }

  /** Pressure, temperature and density on the left (k) or right (k + 1) of face k. */
  private side(k: number, right: boolean, out: { p: number; T: number; rho: number }): void {
    const n = this.nodes;
    const j = right ? k : k - 1; // cell index 0..N−1, or −1 / N for the end nodes
    if (j < 0 || j >= this.N) {
      const node = j < 0 ? this.from : this.to;
      out.p = n.p[node];
      out.T = n.T[node];
      out.rho = n.p[node] / (this.asm.gas.R * n.T[node]);
    } else {
      out.p = this.p[j];
      out.T = this.T[j];
      out.rho = this.rho[j];
    }
  }

  private readonly L = { p: 0, T: 0, rho: 0 };
  private readonly R = { p: 0, T: 0, rho: 0 };

  load(dydt: Float64Array): void {
    const { N, A, dx, D, asm } = this;
    const gas = asm.gas;
    const n = this.nodes;
    const cp = gas.cp, cv = gas.cv;
    const L = this.L, R = this.R;
    // energy accumulators per cell: Σ_in q (cp T_up − cv T) − Σ_out q R T
    for (let k = 0; k <= N; k++) {
      this.side(k, false, L);
      this.side(k, true, R);
      const q = this.q[k];
      const ell = k === 0 || k === N ? 0.5 * dx : dx;
      const rhoBar = 0.5 * (L.rho + R.rho);
      const Tbar = 0.5 * (L.T + R.T);
      const mu = gas.viscosity(Tbar);
      const Re = (Math.abs(q) * D) / (A * mu);
      const fRe = Re > 0 ? frictionFactor(Re, this.rel) * Re : 64;
      const dpf = (fRe * mu * ell * q) / (2 * D * D * rhoBar * A);
      dydt[this.q0 + k] = (A / ell) * (L.p - R.p - dpf);
      // mass: face k moves q from its left to its right
      const Tup = q >= 0 ? L.T : R.T;
      if (k === 0) {
        n.transfer(dydt, n.rows[this.from * K], n.hasState(this.from) ? this.from : -1, this.m0, -1, q, Tup);
      } else if (k === N) {
        n.transfer(dydt, this.m0 + N - 1, -1, n.rows[this.to * K], n.hasState(this.to) ? this.to : -1, q, Tup);
      } else {
        dydt[this.m0 + k - 1] -= q;
        dydt[this.m0 + k] += q;
      }
      // energy of the cells on either side (rows hold m·cv·dT/dt until divided below)
      if (k > 0) { // cell k−1 is on the left
        const T = this.T[k - 1];
        dydt[this.t0 + k - 1] += q >= 0 ? -q * gas.R * T : -q * (cp * R.T - cv * T);
      }
      if (k < N) { // cell k is on the right
        const T = this.T[k];
        dydt[this.t0 + k] += q >= 0 ? q * (cp * L.T - cv * T) : q * gas.R * T;
      }
    }
    const V = A * dx;
    for (let j = 0; j < N; j++) {
      const T = this.T[j];
      const k = gas.viscosity(T) * (cp + 1.25 * gas.R);
      const hA = NUSSELT * k * Math.PI * dx;
      const m = this.rho[j] * V;
      dydt[this.t0 + j] = (dydt[this.t0 + j] + hA * (asm.Ta - T)) / (m * cv);
    }
  }

  reserveJacobian(r: JacobianReserve): void {
    const { N } = this;
    const n = this.nodes;
    const own = (j: number): number[] => [this.m0 + j, this.t0 + j];
    const nodeCols = (node: number): number[] => [0, 1, 2].map((c) => n.cols[node * K + c]).filter((c) => c >= 0);
    const nodeRows = (node: number): number[] => [0, 1, 2].map((c) => n.rows[node * K + c]).filter((c) => c >= 0);
    for (let k = 0; k <= N; k++) {
      const row = this.q0 + k;
      r.entry(row, row);
      const cols = [...(k > 0 ? own(k - 1) : nodeCols(this.from)), ...(k < N ? own(k) : nodeCols(this.to))];
      for (const c of cols) r.entry(row, c);
    }
    for (let j = 0; j < N; j++) {
      const rows = own(j);
      const cols = [this.q0 + j, this.q0 + j + 1, ...own(j)];
      if (j > 0) cols.push(...own(j - 1)); else cols.push(...nodeCols(this.from));
      if (j < N - 1) cols.push(...own(j + 1)); else cols.push(...nodeCols(this.to));
      for (const row of rows) for (const c of cols) r.entry(row, c);
    }
    // the end nodes' rows respond to the end faces' flows and the temperature they carry
    for (const [node, k, j] of [[this.from, 0, 0], [this.to, N, N - 1]] as const) {
      for (const row of nodeRows(node)) for (const c of [this.q0 + k, ...own(j)]) r.entry(row, c);
    }
  }

  channels(): Channel[] {
    return [{ key: `${this.name}.flow`, unit: 'kg/s' }, { key: `${this.name}.reynolds`, unit: '-' }];
  }

  observe(_y: Float64Array, out: Float64Array, k: number): number {
    const q = this.q[0];
    const T = this.N > 0 ? this.T[0] : this.asm.Ta;
    out[k++] = q;
    out[k++] = (Math.abs(q) * this.D) / (this.A * this.asm.gas.viscosity(T));
    return k;
  }

  summaries(): ElementSummary[] {
    const pk = { flow: 0, re: 0, mach: 0, tMach: 0 };
    const { N, A, D, asm } = this;
    const L = this.L, R = this.R;
    const track = (t: number): void => {
      if (Math.abs(this.q[0]) > Math.abs(pk.flow)) pk.flow = this.q[0];
      for (let k = 0; k <= N; k++) {
        this.side(k, false, L);
        this.side(k, true, R);
        const q = this.q[k];
        const Tbar = 0.5 * (L.T + R.T);
        const Re = (Math.abs(q) * D) / (A * asm.gas.viscosity(Tbar));
        if (Re > pk.re) pk.re = Re;
        const mach = Math.abs(q) / (0.5 * (L.rho + R.rho) * A * Math.sqrt(asm.gas.gamma * asm.gas.R * Tbar));
        if (mach > pk.mach) { pk.mach = mach; pk.tMach = t; }
      }
    };
    return [{
      section: 'lines', name: this.name, track,
      result: () => ({
        peak_flow: pk.flow, peak_reynolds: pk.re, regime: pk.re < 2300 ? 'laminar' : pk.re > 4000 ? 'turbulent' : 'transitional',
        choked: false, peak_mach: pk.mach, segments: N,
      }),
      warnings: () => (pk.mach > MACH_WARN
        ? [`wave line ${this.name} reached Mach ${pk.mach.toFixed(2)} at t = ${+pk.tMach.toPrecision(4)} s: the wave model neglects convective acceleration and does not choke, it is meant for Mach numbers well below 1; use \`model: lumped\` (which chokes) for such flows`]
        : []),
    }];
  }
}
