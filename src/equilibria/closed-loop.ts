/**
 * Rest states of a network with controllers or lagged regulators, and their stability.
 *
 * A controller's integral state, its derivative filter and a regulator's lag are states of the
 * network like the chambers' masses, and a driven valve's opening is not a fixed number but the
 * controller's output. So the rest states are found on the whole state vector at once: the
 * unknowns are every chamber mass (and the controller and regulator states), the equations
 * f(y) = 0 of the same right-hand side the integrators use (assemble/system.ts), with a closed
 * group's mass balance replaced by the gas it holds. Newton's method with a difference
 * jacobian and a backtracking line search (after pseudo-transient continuation when Newton
 * alone fails: it finds the stable rest states), from the start state (a controller starts
 * at its `initially`) and from the transient's end state; solutions are told apart by their masses.
 * A controller with integral action rests where its error is zero; one held at an output limit
 * rests anywhere its integral keeps it there (clamping), which the result notes.
 *
 * Stability: the eigenvalues of ∂f/∂y over the same unknowns (stability.ts), closed groups'
 * conservation zero modes removed. This is the linearisation through the regulators'
 * proportional bands and the controllers' gains: a PI loop around a chamber past its pressure
 * maximum shows here as an eigenvalue with a positive real part (the growth rate).
 *
 * References: Dennis & Schnabel, Numerical Methods for Unconstrained Optimization and
 * Nonlinear Equations, 1983, §6.3 (backtracking line search; from memory); Hirsch, Smale &
 * Devaney 2004, ch. 8 (linearisation at an equilibrium).
 */
import type { NetworkSystem } from '../assemble/system.js';
import { ControllerElement } from '../elements/controller-element.js';
import { DenseLu } from '../linalg/dense-lu.js';
import type { Model } from '../model/types.js';
import type { RunResult } from '../transient/results.js';
import { restOf, restSetup, segmentOfVolume, type RestSetup } from './rest.js';
import { stabilityAt, type Stability } from './stability.js';
import type { ChamberRest, GroupResult, NetworkEquilibrium, ValveState } from './types.js';

const NEWTON_MAX = 60;
const TOL = 1e-11;
const FD = 1e-7;

/** Whether the rest states need the whole-state treatment. */
export function hasLoopStates(model: Model): boolean {
  return model.controllers.length > 0 || model.branches.some((b) => b.valve?.operation.kind === 'regulator');
}

export interface LoopRest {
  equilibrium: NetworkEquilibrium;
  /** The full state at rest. */
  y: Float64Array;
}

interface Problem {
  sys: NetworkSystem;
  setup: RestSetup;
  t: number;
  /** Unknown slots and their typical sizes. */
  slots: number[];
  scales: number[];
  /** Per closed group: positions (into slots) of its masses, and the gas it holds. */
  closed: { pos: number[]; M: number }[];
}

function problemOf(model: Model, valves: ValveState, masses: ArrayLike<number>): Problem {
  const setup = restSetup(model, valves);
  const sys = setup.sys;
  const slots: number[] = [];
  const scales: number[] = [];
  const mScale = Math.max(...Array.from(masses), 1e-12);
  for (let i = 0; i < sys.nc; i++) { slots.push(sys.mIdx[i]); scales.push(Math.max(masses[i], 1e-3 * mScale)); }
  // every other state but boundary stores, temperatures and hysteresis blends (which rest
  // anywhere once the gas is still): a controller's I and yf, a regulator's lag
  const skip = new Set<number>([...sys.mIdx, ...sys.TIdx, ...sys.hIdx]);
  const y0 = sys.initialState();
  sys.slots.forEach((sl, k) => {
    if (skip.has(k) || sl.mass === 'store') return;
    slots.push(k);
    scales.push(Math.max(Math.abs(y0[k]), typeof sl.scale === 'number' ? sl.scale * 1e3 : 1));
  });
  const closed = setup.groups.filter((g) => g.kind === 'closed').map((g) => ({
    pos: g.chambers.map((c) => c),
    M: g.chambers.reduce((a, c) => a + masses[c], 0),
  }));
  return { sys, setup, t: setup.t, slots, scales, closed };
}

/** Scaled residual: f on the unknown slots (× scale⁻¹·τ, τ a time unit of 1 s) with closed groups' balance rows. */
function residual(P: Problem, y: Float64Array, f: Float64Array, out: Float64Array): void {
  P.sys.rhs(P.t, y, f);
  P.slots.forEach((k, i) => { out[i] = f[k] / P.scales[i]; });
  for (const g of P.closed) {
    let s = 0;
    for (const i of g.pos) s += y[P.slots[i]];
    out[g.pos[0]] = (s - g.M) / g.M;
  }
}

/** Newton from y (modified in place); true when it converged. */
function newton(P: Problem, y: Float64Array): boolean {
  const n = P.slots.length;
  const f = new Float64Array(P.sys.n);
  const F = new Float64Array(n);
  const Fp = new Float64Array(n);
  const J = new Float64Array(n * n);
  const trial = new Float64Array(P.sys.n);
  const norm = (v: Float64Array): number => Math.hypot(...v);
  residual(P, y, f, F);
  let r = norm(F);
  for (let it = 0; it < NEWTON_MAX; it++) {
    if (!Number.isFinite(r)) return false;
    for (let j = 0; j < n; j++) {
      const k = P.slots[j];
      const h = FD * Math.max(Math.abs(y[k]), P.scales[j]);
      const y0 = y[k];
      y[k] = y0 + h;
      residual(P, y, f, Fp);
      y[k] = y0;
      for (let i = 0; i < n; i++) J[i * n + j] = (Fp[i] - F[i]) / h;
    }
    const lu = new DenseLu(n);
    if (!lu.factor(J)) return false;
    const dx = Float64Array.from(F, (v) => -v);
    lu.solve(dx);
    let step = 1;
    let accepted = false;
    for (let ls = 0; ls < 30; ls++) {
      trial.set(y);
      P.slots.forEach((k, i) => { trial[k] = y[k] + step * dx[i]; });
      // masses stay positive
      if (P.slots.slice(0, P.sys.nc).some((k) => !(trial[k] > 0))) { step /= 2; continue; }
      residual(P, trial, f, Fp);
      const rn = norm(Fp);
      if (Number.isFinite(rn) && rn < (1 - 1e-4 * step) * r) { accepted = true; r = rn; F.set(Fp); y.set(trial); break; }
      step /= 2;
    }
    const size = Math.max(...Array.from(dx, (v, i) => Math.abs(v * step) / P.scales[i]));
    if (!accepted) return r < TOL;
    if (size < TOL || r < TOL) return true;
  }
  return r < 1e3 * TOL;
}

/**
 * Pseudo-transient continuation towards a stable rest state (y modified in place): implicit
 * Euler steps (I/Δt − J)·Δy = f on the scaled state with Δt growing as the residual falls
 * (switched evolution relaxation). It follows the dynamics where Newton's method alone is lost
 * among the kinks of clamps and tables, and conserves a closed group's gas as the dynamics do.
 * Reference: Kelley & Keyes, SIAM J. Numer. Anal. 35 (1998) 508 (Ψtc; from memory).
 */
function pseudoTransient(P: Problem, y: Float64Array): void {
  const n = P.slots.length;
  const f = new Float64Array(P.sys.n);
  const fs = new Float64Array(n);
  const fp = new Float64Array(n);
  const A = new Float64Array(n * n);
  const lu = new DenseLu(n);
  const scaled = (yy: Float64Array, out: Float64Array): number => {
    P.sys.rhs(P.t, yy, f);
    let s = 0;
    P.slots.forEach((k, i) => { out[i] = f[k] / P.scales[i]; s += out[i] * out[i]; });
    return Math.sqrt(s);
  };
  let r = scaled(y, fs);
  let dt = 1e-3;
  for (let it = 0; it < 400 && Number.isFinite(r) && r > 1e-13; it++) {
    for (let j = 0; j < n; j++) {
      const k = P.slots[j];
      const h = FD * P.scales[j] * Math.max(Math.abs(y[k]) / P.scales[j], 1);
      const y0 = y[k];
      y[k] = y0 + h;
      scaled(y, fp);
      y[k] = y0;
      for (let i = 0; i < n; i++) A[i * n + j] = -((fp[i] - fs[i]) / h) * P.scales[j];
    }
    for (let i = 0; i < n; i++) A[i * n + i] += 1 / dt;
    if (!lu.factor(A)) return;
    const dx = Float64Array.from(fs);
    lu.solve(dx);
    const keep = Float64Array.from(y);
    P.slots.forEach((k, i) => { y[k] += P.scales[i] * dx[i]; });
    if (P.slots.slice(0, P.sys.nc).some((k) => !(y[k] > 0))) { y.set(keep); dt /= 10; r = scaled(y, fs); continue; }
    const rn = scaled(y, fs);
    if (!Number.isFinite(rn)) { y.set(keep); dt /= 10; r = scaled(y, fs); continue; }
    dt = Math.min(dt * Math.max(0.1, Math.min(10, r / rn)), 1e9);
    r = rn;
  }
}

function restChambers(P: Problem, y: Float64Array): Record<string, ChamberRest> {
  const { sys, setup } = P;
  sys.evaluate(P.t, y);
  const out: Record<string, ChamberRest> = {};
  setup.chambers.forEach((ch, i) => {
    const V = sys.V[i];
    out[ch.name] = restOf(ch, sys.p[i], setup.model.pa, V, y[sys.mIdx[i]], ch.wall.rigid ? 0 : segmentOfVolume(ch, V));
  });
  return out;
}

/** The state to start Newton from at the end of a run: end masses; controller integrals from the end output and error. */
function endGuess(P: Problem, run: RunResult): Float64Array {
  const { sys, setup } = P;
  const y = sys.initialState();
  setup.model.chambers.forEach((c, i) => { y[sys.mIdx[i]] = run.chambers[c.name].final.mass; });
  const last = (key: string): number | undefined => {
    const k = run.trace.channels.findIndex((c) => c.key === key);
    return k < 0 ? undefined : run.trace.values[k].at(-1);
  };
  for (const c of controllersOf(sys)) {
    const u = last(`${c.c.name}.output`), e = last(`${c.c.name}.error`);
    if (c.iIdx >= 0 && u !== undefined && e !== undefined) y[c.iIdx] = u - c.law.kp * e;
    if (c.fIdx >= 0 && e !== undefined) y[c.fIdx] = c.c.spec.target.at(P.t) - e;
  }
  return y;
}

/** The controllers' states (ControllerState) of a system. */
function controllersOf(sys: NetworkSystem): import('../elements/controller.js').ControllerState[] {
  return sys.elements.filter((e): e is ControllerElement => e instanceof ControllerElement).map((e) => e.state);
}

function sameState(P: Problem, a: Float64Array, b: Float64Array): boolean {
  return P.slots.slice(0, P.sys.nc).every((k, i) => Math.abs(a[k] - b[k]) <= 1e-7 * P.scales[i]);
}

/**
 * Rest states of a network with control states. `run`, when given, supplies the transient's
 * end state as a second start.
 */
export function loopEquilibria(model: Model, valves: ValveState, masses: ArrayLike<number>, run: RunResult | null): { group: GroupResult; rests: LoopRest[] } {
  const P = problemOf(model, valves, masses);
  const { sys } = P;
  const starts: Float64Array[] = [sys.initialState()];
  if (run) starts.push(endGuess(P, run));
  const found: Float64Array[] = [];
  for (const s of starts) {
    const y = Float64Array.from(s);
    if (!newton(P, y)) {
      // follow the dynamics towards a stable rest state, then polish
      y.set(s);
      pseudoTransient(P, y);
      if (!newton(P, y)) continue;
    }
    if (found.some((z) => sameState(P, z, y))) continue;
    found.push(y);
  }
  const rests: LoopRest[] = found.map((y) => {
    const st = loopStability(P, y);
    const notes = controllerNotes(P, y);
    return {
      y,
      equilibrium: {
        chambers: restChambers(P, y), stable: st.stability === 'stable', stability: st.ok ? st.stability : 'marginal',
        growth_rate: st.growth_rate, time_constant: st.time_constant, eigenvalues: st.eigenvalues,
        members: [0], consistent: true, warnings: [], notes,
      },
    };
  });
  const group: GroupResult = {
    chambers: model.chambers.map((c) => c.name),
    kind: P.setup.groups.some((g) => g.kind === 'closed') ? 'closed' : 'open',
    mass: null, method: 'closed-loop', combinations: starts.length, complete: false,
    branch_combinations: starts.length, examined: starts.length, timed_out: false,
    equilibria: rests.map((r) => ({ chambers: Object.values(r.equilibrium.chambers), stability: loopStability(P, r.y) })),
    flowing: [],
    notes: [`controllers and regulators: rest states by Newton on the whole state from ${starts.length === 1 ? 'the start state' : 'the start and end states'} (may be incomplete)`],
  };
  return { group, rests };
}

function loopStability(P: Problem, y: Float64Array): Stability {
  return stabilityAt(P.sys, { t: P.t, y, coords: P.slots, scales: P.scales, conserved: P.closed.map((g) => g.pos) });
}

function controllerNotes(P: Problem, y: Float64Array): string[] {
  const { sys } = P;
  sys.evaluate(P.t, y);
  const out: string[] = [];
  for (const c of controllersOf(sys)) {
    const L = c.law;
    const sat = c.v >= L.umax ? ` (held at its upper limit ${(L.umax * 100).toPrecision(3)} %)` : c.v <= L.umin ? ` (held at its lower limit ${(L.umin * 100).toPrecision(3)} %)` : '';
    out.push(`controller ${c.c.name}: output ${(c.u * 100).toPrecision(4)} %, error ${c.e.toPrecision(3)}${sat}${c.continuous ? '' : '; sampled: stability of the continuous law'}`);
  }
  return out;
}

/** The growth rate and verdict at the rest state reached from the start (for continuation over a gain). */
export function loopGrowth(model: Model, valves: ValveState, guess?: Float64Array): { y: Float64Array; stability: Stability; chambers: Record<string, ChamberRest> } | null {
  const masses = model.chambers.map((c) => c.m0);
  const P = problemOf(model, valves, masses);
  const y = guess && guess.length === P.sys.n ? Float64Array.from(guess) : P.sys.initialState();
  if (!newton(P, y)) return null;
  return { y, stability: loopStability(P, y), chambers: restChambers(P, y) };
}
