/**
 * A chamber on the element contract (contract.ts): a gas node with states m [, T] [, h]
 * (chamber.ts has the physics: volume from mass, the energy equation, hysteresis). Its rows
 * beyond the mass balance (temperature, hysteresis) are settled after every transfer, from the
 * direction-split inflows the node table keeps. Events: its wall's pressure extrema (logged)
 * and its declared pressure and stretch limits (logged, and warned about by the run).
 */
import type { ChamberModel } from '../model/types.js';
import { ChamberState, type PressurePartials } from './chamber.js';
import type { Assembly, Channel, Element, ElementEvent, ElementSummary, JacobianReserve, EventSink, StateSlot } from './contract.js';
import { K, type Nodes } from './nodes.js';
import { display } from '../units/display.js';

const SQRT_EPS = Math.sqrt(2.220446049250313e-16);

/** A forward-difference increment about √eps·scale, exactly representable at x. */
function increment(x: number, scale: number): number {
  return (x + SQRT_EPS * scale) - x;
}

export class ChamberElement extends ChamberState implements Element {
  readonly kind = 'chamber';
  readonly name: string;
  /** Node index and slots (−1 absent). */
  readonly node: number;
  readonly m: number;
  readonly T: number;
  readonly h: number;
  /** κ = ∂V/∂(pV_gas) at the evaluated point. */
  kappa = Number.NaN;
  private readonly nodes: Nodes;
  private readonly solved = { p: 0, V: 0, kappa: 0 };
  private readonly aside = { p: 0, V: 0, kappa: 0 };
  private readonly pp: PressurePartials = { dm: 0, dT: 0, dh: 0 };
  /** Positions of its own block (rows m, T, h × columns m, T, h) in the jacobian values. */
  private readonly own = new Int32Array(K * K).fill(-1);

  constructor(c: ChamberModel, private readonly asm: Assembly) {
    super(c, asm.gas, asm.pa);
    this.name = c.name;
    const slots: StateSlot[] = [{ name: 'm', unit: 'kg', scale: 'mass', mass: 'held' }];
    const withT = asm.model.heat !== 'isothermal';
    if (withT) slots.push({ name: 'T', unit: 'K', scale: 300 });
    if (c.deflation) slots.push({ name: 'h', unit: '-', scale: 1 });
    const first = asm.slots(slots);
    this.m = first;
    this.T = withT ? first + 1 : -1;
    this.h = c.deflation ? first + slots.length - 1 : -1;
    this.nodes = asm.nodes;
    this.node = asm.nodes.add(c.name);
    this.settle = this.T >= 0 || this.h >= 0 ? (y, dydt) => this.settleRows(y, dydt) : undefined;
  }

  /** Called once the node table is allocated. */
  expose(): void {
    this.nodes.expose(this.node, [this.m, this.T, this.h], [this.m, this.T, this.h]);
  }

  initial(y: Float64Array): void {
    y[this.m] = this.c.m0;
    if (this.T >= 0) y[this.T] = this.c.T0;
    if (this.h >= 0) y[this.h] = 1;
  }

  evaluate(_t: number, y: Float64Array): void {
    const T = this.T >= 0 ? y[this.T] : this.c.T0;
    this.inM = y[this.m];
    this.inT = T;
    this.inH = this.h >= 0 ? y[this.h] : 1;
    const s = this.solved;
    this.solveInputs(s);
    const nodes = this.nodes, i = this.node;
    nodes.p[i] = s.p;
    nodes.V[i] = s.V;
    this.kappa = s.kappa;
    nodes.T[i] = T;
    if (!(s.p >= 0) && nodes.fault === null) nodes.fault = this.name;
  }

  /** Its energy and hysteresis rows, when it has them (others skip the pass altogether). */
  readonly settle: ((y: Float64Array, dydt: Float64Array) => void) | undefined;

  private settleRows(y: Float64Array, dydt: Float64Array): void {
    const mdot = dydt[this.m];
    const i = this.node;
    if (this.T >= 0) {
      dydt[this.T] = this.temperatureRate(y[this.m], this.nodes.T[i], this.nodes.p[i], this.kappa, mdot);
    }
    if (this.h >= 0) {
      const h = y[this.h];
      const target = mdot > 0 ? 1 : 0;
      dydt[this.h] = (Math.abs(mdot) / this.dmHyst) * (target - h);
    }
  }

  /**
   * Ṫ (K/s) at mass m, temperature T, pressure p and κ, given its net inflow mdot and the
   * direction-split inflows of the last rhs: the energy equation of chamber.ts.
   */
  temperatureRate(m: number, T: number, p: number, kap: number, mdot: number): number {
    const { R, cv, cp } = this.asm.gas;
    const i = this.node, n = this.nodes;
    const A = cp * n.hIn[i] - cv * T * n.mIn[i] - R * T * n.mOut[i] + this.c.heatTransfer * (this.asm.Ta - T);
    return (A - p * kap * R * T * mdot) / (m * cv + p * kap * m * R);
  }

  // ---- jacobian ---------------------------------------------------------------------------

  reserveJacobian(r: JacobianReserve): void {
    const s = [this.m, this.T, this.h];
    for (let a = 0; a < K; a++) {
      if (s[a] < 0) continue;
      for (let b = 0; b < K; b++) if (s[b] >= 0) this.own[a * K + b] = r.entry(s[a], s[b]);
    }
  }

  /** Pressure partials and the weights of its energy and hysteresis rows, into the node table. */
  prepareJacobian(y: Float64Array, f: Float64Array, values: Float64Array): void {
    const n = this.nodes, i = this.node, pp = this.pp;
    const m = y[this.m];
    const T = n.T[i];
    const h = this.h >= 0 ? y[this.h] : 1;
    this.pressurePartials(m, T, h, n.V[i], n.p[i], this.kappa, pp);
    n.dp[i * K] = pp.dm;
    n.dp[i * K + 1] = pp.dT;
    n.dp[i * K + 2] = pp.dh;
    if (this.T >= 0) {
      const { R, cv, cp } = this.asm.gas;
      const p = n.p[i], kap = this.kappa;
      const D = m * cv + p * kap * m * R;
      n.cM[i] = (-p * kap * R * T) / D;
      n.cIn[i] = (-cv * T) / D;
      n.cOut[i] = (-R * T) / D;
      n.cH[i] = cp / D;
    }
    if (this.h >= 0) {
      const mdot = f[this.m];
      const dm = this.dmHyst;
      const target = mdot > 0 ? 1 : 0;
      n.cThird[i] = (Math.sign(mdot) * (target - h)) / dm;
      values[this.own[2 * K + 2]] += -Math.abs(mdot) / dm;
    }
  }

  /** ∂Ṫ/∂(m, T, h) at fixed inflows, by differences of this chamber alone. */
  settleJacobian(y: Float64Array, f: Float64Array, values: Float64Array): void {
    if (this.T < 0) return;
    const ch = this, n = this.nodes, i = this.node;
    const m = y[this.m], T = y[this.T];
    const h = this.h >= 0 ? y[this.h] : 1;
    const mdot = f[this.m];
    const base = this.temperatureRate(m, T, n.p[i], this.kappa, mdot);
    const s = this.aside;
    const rowT = 1 * K;
    const tol = this.asm.tolerances;
    const dm = increment(m, Math.max(Math.abs(m), tol.atol[this.m] / tol.rtol));
    ch.solveAside(m + dm, T, h, s);
    values[this.own[rowT + 0]] += (this.temperatureRate(m + dm, T, s.p, s.kappa, mdot) - base) / dm;
    const dT = increment(T, T);
    ch.solveAside(m, T + dT, h, s);
    values[this.own[rowT + 1]] += (this.temperatureRate(m, T + dT, s.p, s.kappa, mdot) - base) / dT;
    if (this.h >= 0) {
      // h lives in [0, 1] and the wall clamps it there: difference inwards.
      const dh = h + SQRT_EPS > 1 ? (h - SQRT_EPS) - h : increment(h, 1);
      ch.solveAside(m, T, h + dh, s);
      values[this.own[rowT + 2]] += (this.temperatureRate(m, T, s.p, s.kappa, mdot) - base) / dh;
    }
  }

  // ---- events -----------------------------------------------------------------------------

  events(): ElementEvent[] {
    const c = this.c, n = this.nodes, i = this.node, name = this.name, pa = this.asm.pa;
    const out: ElementEvent[] = [];
    const note = (log: EventSink, t: number, kind: string, what: string, warning?: boolean): void => {
      log.push(warning ? { t, what, kind, element: name, warning } : { t, what, kind, element: name });
    };
    for (const x of c.wall.extrema) {
      const word = x.kind === 'max' ? 'maximum' : 'minimum';
      const where = `${(x.p / 1000).toPrecision(4)} kPa gauge`;
      out.push({
        kind: 'extremum', element: name, logsOnly: true,
        value: () => n.V[i] - x.V,
        direction: () => 0,
        fire: (t, rising, log) => {
          note(log, t, 'extremum', rising
            ? `${name} passes its pressure ${word} (${where})${x.kind === 'max' ? ': past it the chamber gets easier to inflate' : ''}`
            : `${name} shrinks back through its pressure ${word} (${where})`);
          return false;
        },
      });
    }
    const pLimit = c.limits.pressure;
    if (pLimit !== undefined) {
      out.push({
        kind: 'limit-pressure', element: name, logsOnly: true,
        value: () => n.p[i] - pLimit,
        direction: () => 1,
        fire: (t, _r, log) => {
          note(log, t, 'limit-pressure', `${name} exceeds its pressure limit of ${((pLimit - pa) / 1000).toPrecision(4)} kPa gauge`, true);
          return false;
        },
      });
    }
    const sLimit = c.limits.stretch;
    if (sLimit !== undefined && c.wall.sphere) {
      out.push({
        kind: 'limit-stretch', element: name, logsOnly: true,
        value: () => this.c.wall.stretch(n.V[i]) - sLimit,
        direction: () => 1,
        fire: (t, _r, log) => { note(log, t, 'limit-stretch', `${name} exceeds its stretch limit of ${sLimit}`, true); return false; },
      });
    }
    return out;
  }

  // ---- observables ------------------------------------------------------------------------

  channels(): Channel[] {
    const n = this.name;
    const ch: Channel[] = [{ key: `${n}.pressure`, unit: 'Pa' }, { key: `${n}.gauge`, unit: 'Pa' },
      { key: `${n}.volume`, unit: 'm^3' }, { key: `${n}.mass`, unit: 'kg' }, { key: `${n}.temperature`, unit: 'K' }];
    if (this.c.wall.sphere) ch.push({ key: `${n}.stretch`, unit: '-' });
    return ch;
  }

  observe(y: Float64Array, out: Float64Array, k: number): number {
    const n = this.nodes, i = this.node;
    out[k++] = n.p[i];
    out[k++] = n.p[i] - this.asm.pa;
    out[k++] = n.V[i];
    out[k++] = y[this.m];
    out[k++] = n.T[i];
    const wall = this.c.wall;
    if (wall.sphere) out[k++] = wall.stretch(n.V[i]);
    return k;
  }

  summaries(column: (key: string) => number): ElementSummary[] {
    const name = this.name, sphere = this.c.wall.sphere, pa = this.asm.pa;
    const col = (q: string): number => column(`${name}.${q}`);
    const gauge = col('gauge');
    const pk = { max: -Infinity, tMax: 0, min: Infinity, tMin: 0 };
    return [{
      section: 'chambers', name,
      track: (t, row) => {
        const g = row[gauge];
        if (g > pk.max) { pk.max = g; pk.tMax = t; }
        if (g < pk.min) { pk.min = g; pk.tMin = t; }
      },
      result: (end) => {
        const fin: Record<string, number> = {
          pressure: end[col('pressure')], gauge: end[gauge], volume: end[col('volume')], mass: end[col('mass')], temperature: end[col('temperature')],
        };
        if (sphere) fin.stretch = end[col('stretch')];
        return { final: fin, peak: { gauge: pk.max, at: pk.tMax }, least: { gauge: pk.min, at: pk.tMin } };
      },
      warnings: () => (pk.min + pa < 0.05 * pa ? [`${name} fell to ${display(pk.min + pa, 'pressure')}, near vacuum`] : []),
    }];
  }
}
