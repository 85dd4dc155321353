/**
 * Model → System: the state layout, the right-hand side, the jacobian, events and observables,
 * assembled by looping over the model's elements (elements/contract.ts); nothing here knows an
 * element kind by name (elements/registry.ts makes them).
 *
 * State vector: each element's slots, in element order (a chamber's m [, T] [, h]; a
 * reservoir's or a feed's store: the mass that boundary has given, with a minus sign). Every
 * flow enters through the node table's `transfer` (elements/nodes.ts), which subtracts at one
 * slot and adds the same number at another, so the sum of the mass slots is an exact
 * invariant of the rhs: mass is conserved by construction, and the integrators
 * (linear-invariant preserving) conserve it to round-off.
 *
 * Performance: nothing allocates in `evaluate`, `rhs` or the jacobian; `evaluate` remembers its
 * last (t, y) and the elements' modes, so the rhs, event functions and observers at the same
 * point share one set of chamber solves; the jacobian is assembled element by element into a
 * pattern reserved once (jacobian.ts), so the stiff integrator can use sparse LU.
 */
import type { Gas } from '../physics/gas.js';
import type { EventfulProblem } from '../solve/driver.js';
import type { Model } from '../model/types.js';
import type { SparsePattern } from '../linalg/sparse-pattern.js';
import { EventLog } from './event-log.js';
import type { Assembly, Channel, Element, ElementEvent, LoggedEvent, StateSlot } from '../elements/contract.js';
import { K, Nodes } from '../elements/nodes.js';
import { createElements } from '../elements/registry.js';
import { BranchElement } from '../elements/branch-element.js';
import { WaveLineElement } from '../elements/wave-line.js';
import type { BranchFlow, BranchState } from '../elements/branch.js';
import { NetworkJacobian } from './jacobian.js';
import { patternFromEntries } from '../linalg/sparse-pattern.js';

export type { Channel, LoggedEvent };

/** Elements that implement a method, in element order (the passes call only those). */
function having<M extends keyof Element>(els: Element[], m: M): Element[] {
  return els.filter((e) => typeof e[m] === 'function');
}

export class NetworkSystem implements EventfulProblem {
  readonly n: number;
  rtol: number;
  atol: Float64Array;
  readonly gas: Gas;
  readonly pa: number;
  readonly Ta: number;
  readonly elements: Element[];
  readonly nodes: Nodes;
  /** The state layout: slot k's declaration. */
  readonly slots: StateSlot[] = [];
  readonly breakpoints: number[];
  readonly events: ElementEvent[];
  readonly log = new EventLog();
  /**
   * Gas nodes with states (chambers, in order): the slot of their mass, temperature and third
   * column (−1 absent). Analyses of rest states and fault diagnosis read chambers through them.
   */
  readonly nc: number;
  readonly mIdx: Int32Array;
  readonly TIdx: Int32Array;
  readonly hIdx: Int32Array;
  /** Node index of each of those gas nodes. */
  readonly gasNodes: Int32Array;
  private readonly held: Int32Array;
  private readonly stores: Int32Array;
  private readonly evaluators: Element[];
  private readonly loaders: Element[];
  private readonly settlers: Element[];
  private readonly moded: Element[];
  /** Memo of `evaluate`: the (t, y) and element modes it last ran for. */
  private memoValid = false;
  private memoT = 0;
  private readonly memoY: Float64Array;
  private readonly memoMode: Float64Array;
  /** Element-wise jacobian, built on first use. */
  private jac: NetworkJacobian | null = null;

  constructor(readonly model: Model) {
    this.gas = model.gas;
    this.pa = model.pa;
    this.Ta = model.Ta;
    this.rtol = model.simulate.tolerance;
    const nodes = (this.nodes = new Nodes());
    const slots = this.slots;
    const tolerances: Assembly['tolerances'] = { rtol: this.rtol, atol: new Float64Array(0) };
    const asm: Assembly = {
      model, gas: model.gas, pa: model.pa, Ta: model.Ta, nodes, tolerances,
      // each element reserves its slots while it is constructed, in element order
      slots: (list) => {
        const first = slots.length;
        slots.push(...list);
        return first;
      },
    };
    const made = (this.elements = createElements(model, asm));
    this.n = slots.length;
    nodes.allocate();
    for (const e of made) e.expose?.();

    // layout by conservation role, and tolerances: masses relative to the largest held mass
    const y0 = this.initialState();
    const held: number[] = [], stores: number[] = [];
    let mScale = 1e-12;
    slots.forEach((s, k) => {
      if (s.mass === 'held') { held.push(k); if (y0[k] > mScale) mScale = y0[k]; }
      if (s.mass === 'store') stores.push(k);
    });
    this.held = Int32Array.from(held);
    this.stores = Int32Array.from(stores);
    this.atol = new Float64Array(this.n);
    for (let k = 0; k < this.n; k++) {
      const sc = slots[k].scale;
      this.atol[k] = sc === 'mass' ? this.rtol * mScale * 1e-3 : this.rtol * sc;
    }
    tolerances.atol = this.atol;

    // gas nodes with states, for the analyses of chambers
    const gasNodes: number[] = [];
    for (let i = 0; i < nodes.count; i++) if (nodes.hasState(i)) gasNodes.push(i);
    this.nc = gasNodes.length;
    this.gasNodes = Int32Array.from(gasNodes);
    this.mIdx = Int32Array.from(gasNodes, (i) => nodes.cols[i * K]);
    this.TIdx = Int32Array.from(gasNodes, (i) => nodes.cols[i * K + 1]);
    this.hIdx = Int32Array.from(gasNodes, (i) => nodes.cols[i * K + 2]);

    this.evaluators = having(made, 'evaluate');
    this.loaders = having(made, 'load');
    this.settlers = having(made, 'settle');
    this.moded = having(made, 'mode');
    this.memoY = new Float64Array(this.n);
    this.memoMode = new Float64Array(this.moded.length);

    const bps = new Set<number>();
    for (const e of made) e.breakpoints?.().forEach((t) => bps.add(t));
    this.breakpoints = [...bps].sort((a, b) => a - b);
    this.events = made.flatMap((e) => e.events?.() ?? []);
    if (made.some((e) => e.differenced)) {
      // an element without jacobian entries of its own: the solver differences the whole rhs
      Object.defineProperty(this, 'jacobianSparse', { value: undefined });
      this.differenced = true;
    }
    else if (made.some((e) => e.numericJacobian)) {
      // an element that reserves its pattern but loads no values (a wave line): the integrators
      // difference the reserved pattern
      Object.defineProperty(this, 'jacobianSparse', { value: undefined });
    }
  }

  /** True when the jacobian is left to differences of the whole rhs (see Element.differenced). */
  readonly differenced: boolean = false;
  private densePattern: SparsePattern | null = null;

  get nEvents(): number { return this.events.length; }

  /** Node pressures (Pa abs), temperatures (K) and volumes (m³) at the evaluated point. */
  get p(): Float64Array { return this.nodes.p; }
  get T(): Float64Array { return this.nodes.T; }
  get V(): Float64Array { return this.nodes.V; }
  /** The first element whose state left its law's range during the last evaluation. */
  get fault(): string | null { return this.nodes.fault; }

  /**
   * Lines and valves by model branch index, their states and flows at the evaluated point: the
   * equilibria set a relief valve's mode and solve steady flows through them, and fault
   * diagnosis looks for the branch that is fastest or not finite.
   */
  get branches(): BranchState[] {
    return this.branchElements();
  }

  get flows(): BranchFlow[] {
    return this.branchElements().map((e) => e.current);
  }

  private branchList: (BranchElement | WaveLineElement)[] | null = null;
  /** In model branch order (a wave line has a flow but no BranchState: the equilibria refuse it). */
  private branchElements(): BranchElement[] {
    return (this.branchList ??= this.elements.filter((e): e is BranchElement | WaveLineElement => e instanceof BranchElement || e instanceof WaveLineElement)) as BranchElement[];
  }

  initialState(): Float64Array {
    const y = new Float64Array(this.n);
    for (const e of this.elements) e.initial?.(y);
    return y;
  }

  /**
   * Fills node pressures, temperatures, volumes and all flows for (t, y). Shared by the rhs,
   * events and observers so that they all see the same numbers.
   */
  evaluate(t: number, y: Float64Array): void {
    if (this.memoHit(t, y)) return;
    this.nodes.fault = null;
    const els = this.evaluators;
    for (let k = 0; k < els.length; k++) els[k].evaluate!(t, y);
    this.memoT = t;
    this.memoY.set(y);
    for (let k = 0; k < this.moded.length; k++) this.memoMode[k] = this.moded[k].mode!();
    this.memoValid = true;
  }

  /** Whether the scratch already holds `evaluate(t, y)` (same t, same y, same modes). */
  private memoHit(t: number, y: Float64Array): boolean {
    if (!this.memoValid || t !== this.memoT) return false;
    const m = this.memoY;
    for (let k = 0; k < m.length; k++) if (y[k] !== m[k]) return false;
    for (let k = 0; k < this.moded.length; k++) if (this.moded[k].mode!() !== this.memoMode[k]) return false;
    return true;
  }

  /** Forgets the memo of `evaluate` (after anything that changes the rhs other than t and y). */
  invalidate(): void {
    this.memoValid = false;
  }

  rhs(t: number, y: Float64Array, dydt: Float64Array): void {
    this.evaluate(t, y);
    dydt.fill(0);
    this.nodes.clearInflows();
    const ld = this.loaders;
    for (let k = 0; k < ld.length; k++) ld[k].load!(dydt);
    const st = this.settlers;
    for (let k = 0; k < st.length; k++) st[k].settle!(y, dydt);
  }

  /**
   * Net mass inflow (kg/s) into each gas node from `elements` alone, with the gas nodes at
   * pressures p (Pa abs) and temperatures T (K), indexed like mIdx; scale gets Σ|flow| per
   * node. Rest analyses solve their steady flow with it (equilibria/steady.ts).
   */
  restInflow(t: number, elements: Element[], p: ArrayLike<number>, T: ArrayLike<number>, out: Float64Array, scale: Float64Array): void {
    const nodes = this.nodes;
    for (let i = 0; i < this.nc; i++) { nodes.p[this.gasNodes[i]] = p[i]; nodes.T[this.gasNodes[i]] = T[i]; }
    const y = new Float64Array(this.n);
    const dydt = new Float64Array(this.n);
    for (const e of elements) e.evaluate?.(t, y);
    nodes.clearInflows();
    for (const e of elements) e.load?.(dydt);
    for (let i = 0; i < this.nc; i++) {
      out[i] = dydt[this.mIdx[i]];
      scale[i] = nodes.mIn[this.gasNodes[i]] + nodes.mOut[this.gasNodes[i]];
    }
    this.invalidate();
  }

  // ---- jacobian -----------------------------------------------------------------------

  /** Where ∂f/∂y may be nonzero (see jacobian.ts); reserved on first use. */
  get jacobianPattern(): SparsePattern {
    if (this.differenced) return (this.densePattern ??= denseEntries(this.n));
    this.jac ??= new NetworkJacobian(this);
    return this.jac.pattern;
  }

  /** ∂f/∂y at (t, y) in the order of `jacobianPattern`. */
  jacobianSparse(t: number, y: Float64Array, values: Float64Array): void {
    this.jac ??= new NetworkJacobian(this);
    this.jac.compute(t, y, values);
  }

  /**
   * True when nothing in the rhs depends on t explicitly over [t0, t1]: no valve or feed ramp
   * under way and every reservoir pressure constant. Then ∂f/∂t = 0 needs no differencing.
   */
  timeInvariant(t0: number, t1: number): boolean {
    for (const e of this.elements) if (e.timeInvariant && !e.timeInvariant(t0, t1)) return false;
    return true;
  }

  // ---- events -------------------------------------------------------------------------

  eventValues(t: number, y: Float64Array, out: Float64Array): void {
    this.evaluate(t, y);
    const ev = this.events;
    for (let k = 0; k < ev.length; k++) out[k] = ev[k].value();
  }

  /** An event that only logs (an extremum passed, a limit exceeded): it never changes the rhs. */
  eventLogsOnly(k: number): boolean {
    return this.events[k].logsOnly === true;
  }

  eventDirection(k: number): number {
    return this.events[k].direction();
  }

  fireEvent(k: number, t: number, y: Float64Array, rising: boolean): boolean {
    this.invalidate();
    return this.events[k].fire(t, rising, this.log, y);
  }

  atBreakpoint(t: number, y: Float64Array): void {
    // elements that act at a breakpoint (a sampled controller) read the state there
    this.evaluate(t, y);
    for (const e of this.elements) e.atBreakpoint?.(t, this.log);
    this.invalidate();
  }

  /** Events that hold at the start (a relief valve already above its set point). */
  settleInitialModes(t: number, y: Float64Array): void {
    this.evaluate(t, y);
    for (const e of this.events) e.settle?.(t, this.log);
    this.invalidate();
  }

  // ---- observables ----------------------------------------------------------------------

  channels(): Channel[] {
    const ch: Channel[] = [];
    for (const e of this.elements) if (e.channels) ch.push(...e.channels());
    ch.push({ key: 'total.mass', unit: 'kg' });
    return ch;
  }

  /** Values of `channels()` for (t, y), in the same order. */
  observe(t: number, y: Float64Array, out: Float64Array): void {
    this.evaluate(t, y);
    let k = 0;
    const els = this.elements;
    for (let i = 0; i < els.length; i++) {
      const e = els[i];
      if (e.observe) k = e.observe(y, out, k);
    }
    out[k++] = this.totalMass(y);
  }

  /** Mass the boundaries have given to the network so far (kg). */
  boundaryInflow(y: Float64Array): number {
    let s = 0;
    for (const k of this.stores) s -= y[k];
    return s;
  }

  /** Gas the network holds (kg): the sum of its held mass slots. */
  totalMass(y: Float64Array): number {
    let s = 0;
    for (const k of this.held) s += y[k];
    return s;
  }
}

/** Every entry of an n×n matrix, as a sparsity pattern. */
function denseEntries(n: number): SparsePattern {
  const ri = new Int32Array(n * n);
  const ci = new Int32Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) { ri[i * n + j] = i; ci[i * n + j] = j; }
  return patternFromEntries(n, ri, ci);
}
