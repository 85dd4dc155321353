/**
 * Branches: a line (tube), a valve, or a valve inside a line (series combination solved
 * exactly for the pressure between them). Flow is signed, positive from → to.
 *
 * Valve operation:
 * - schedule: opening(t) from a piecewise-linear schedule (breakpoints restart the integrator);
 * - check: one-way; the spring holds the cracking pressure pc, so the valve passes flow driven
 *   by (p_from − pc) → p_to while p_from − pc > p_to and none otherwise. The flow is continuous
 *   at the switch (zero on both sides), so opening and closing are logged events, not jumps;
 * - relief, pop action: a discrete state, closed → open when the upstream gauge pressure rises
 *   through `opens-above`, open → closed when it falls through `reseats-below` (hysteresis);
 * - relief, proportional lift: the opening follows the upstream gauge pressure, 0 at
 *   `opens-above`, rising linearly to 1 at `full-lift-at`, the same curve on the way down (no
 *   hysteresis), so the flow is continuous in the pressure; its events only mark the two kinks.
 * Both relief kinds discharge from → to only: with the downstream side at the higher pressure
 * the valve is seated and passes nothing (its rating says nothing about reverse flow, and a
 * relief valve's disc is pressed onto its seat by back pressure).
 * - regulator: the opening follows the downstream (`to`) gauge pressure (physics/regulator.ts);
 *   a relieving regulator's vent is a branch of its own (`<name>.vent`, `to` → ambient) whose
 *   opening follows the same pressure, its upstream end. Neither passes gas backwards (a
 *   regulator's seat is a check against reverse flow; common practice).
 * - driven: the opening is `command`, set by the controller that drives the valve.
 */
import { ANR, GASES, ISO6358_RHO0, R_UNIVERSAL, type Gas } from '../physics/gas.js';

const AIR_R = R_UNIVERSAL / GASES.air.molarMass;
import { frictionSlope, RE_LAMINAR } from '../physics/tube.js';
import { emptyLineFlow, lineFlowInto, type LineFlow } from '../physics/line-flow.js';
import { valveFlowInto, type ValveFlow } from '../physics/valve-flow.js';
import { brent } from '../physics/roots.js';
import { regulatorOpening, ventOpening } from '../physics/regulator.js';
import type { BranchModel } from '../model/types.js';
import { makeSchedule, type Schedule } from '../model/schedule.js';
import type { ValveRating } from '../netlist/types.js';

/** Critical-flow function ψc = √γ·(2/(γ+1))^((γ+1)/(2(γ−1))), Anderson, Modern Compressible Flow, ch. 5. */
function psiStar(gamma: number): number {
  return Math.sqrt(gamma) * Math.pow(2 / (gamma + 1), (gamma + 1) / (2 * (gamma - 1)));
}

/**
 * Diameter of an ideal nozzle with the same choked flow, used to quote a Reynolds number for
 * a valve. For an ISO 6358 rating (air's): C·ρ0·√(T0/T)·p = A·p·ψc/√(R·T) ⇒ A = C·ρ0·√(R·T0)/ψc
 * with air's R and γ (ρ0 = 1.185 kg/m³, T0 = 293.15 K per ISO 6358-1).
 */
export function equivalentDiameter(rating: ValveRating): number {
  if (rating.kind === 'orifice') return rating.diameter * Math.sqrt(rating.dischargeCoefficient);
  // the rating is air's: the effective area is the valve's, whatever gas flows (physics/gas.ts)
  const A = (rating.conductance * ISO6358_RHO0 * Math.sqrt(AIR_R * ANR.temperature)) / psiStar(GASES.air.gamma);
  return Math.sqrt((4 * A) / Math.PI);
}

export interface BranchFlow {
  mdot: number;
  reynolds: number;
  /** The valve is choked (a valve, or the valve of a line with a valve). */
  choked: boolean;
  regime: 'laminar' | 'transitional' | 'turbulent' | 'orifice';
  /** The line (alone or hosting a valve) is choked at its exit (physics/line-flow.ts). */
  lineChoked: boolean;
  /** The line's exit Mach number (0 for a valve alone). */
  mach: number;
  /** Laminar line: neglected acceleration relative to friction (physics/line-flow.ts). */
  accel: number;
  /** The ideal-nozzle bound set the line's flow. */
  limited: boolean;
}

export function emptyBranchFlow(): BranchFlow {
  return { mdot: 0, reynolds: 0, choked: false, regime: 'laminar', lineChoked: false, mach: 0, accel: 0, limited: false };
}

/** Copies the line's extra outputs into a branch flow. */
function lineExtras(out: BranchFlow, f: LineFlow | null): void {
  out.lineChoked = f ? f.choked : false;
  out.mach = f ? f.mach : 0;
  out.accel = f ? f.accel : 0;
  out.limited = f ? f.limited : false;
}

/** A branch flow q (kg/s) and its partial derivatives in the end pressures (Pa) and temperatures (K). */
export interface BranchPartials { q: number; dp1: number; dp2: number; dT1: number; dT2: number }

const SQRT_EPS = Math.sqrt(2.220446049250313e-16);

/** A forward-difference increment of about √eps relative to `scale`, exactly representable at x. */
function step(x: number, scale: number): number {
  return (x + SQRT_EPS * scale) - x;
}

export class BranchState {
  readonly schedule: Schedule | null;
  /** Relief valve state. */
  open = false;
  /** Opening commanded by a controller (driven valves), 0..1. */
  command = 0;
  /** Lagged position z ∈ [−1, 1] of a regulator with a time constant (its vent reads −z), set from the state. */
  position = 0;
  readonly dEq: number;
  // Scratch, so that evaluating a flow never allocates (it runs inside the rhs).
  private readonly tube: LineFlow = emptyLineFlow();
  private readonly valve: ValveFlow = { mdot: 0, choked: false };
  private readonly probe: BranchFlow = emptyBranchFlow();
  /** Arguments of the series balance `mismatch` (valve inside a line). */
  private sA = 0;
  private sB = 0;
  private sT = 0;
  private sOpening = 0;
  /** Line flow minus valve flow at the pressure pMid between them (decreasing in pMid). */
  private readonly mismatch: (pMid: number) => number;

  constructor(readonly b: BranchModel, readonly gas: Gas, readonly pa: number) {
    const op = b.valve?.operation;
    this.schedule = op?.kind === 'schedule' ? makeSchedule(op.initially, op.steps) : null;
    this.dEq = b.valve ? equivalentDiameter(b.valve.rating) : b.line!.diameter;
    this.mismatch = (pMid) => this.lineOnly(this.sA, pMid, this.sT).mdot - this.valveOnly(pMid, this.sB, this.sT, this.sT, this.sOpening).mdot;
  }

  /** Flow through the line alone (into the tube scratch). */
  private lineOnly(p1: number, p2: number, Tup: number): LineFlow {
    const l = this.b.line!;
    return lineFlowInto(this.tube, p1, p2, Tup, this.gas, l.diameter, l.length, l.roughness);
  }

  /**
   * Opening fraction 0..1 at time t and end pressures p1, p2 (Pa absolute): schedules, relief
   * state, regulators (downstream pressure), a controller's command; check valves are 1.
   */
  opening(t: number, p1: number, p2: number): number {
    const op = this.b.valve?.operation;
    if (!op) return 1;
    switch (op.kind) {
      case 'schedule': return (this.schedule as Schedule).at(t);
      case 'relief': return op.fullLiftAt !== undefined ? this.lift(p1) : this.open ? 1 : 0;
      case 'regulator':
        if (op.timeConstant > 0) return this.b.vent ? Math.max(-this.position, 0) : Math.max(this.position, 0);
        return this.b.vent ? ventOpening(p1 - this.pa, op.set, op.band) : regulatorOpening(p2 - this.pa, op.set, op.band);
      case 'driven': return this.command;
      default: return 1;
    }
  }

  /** Opening of a proportional relief valve at upstream pressure pFrom (Pa abs): 0..1. */
  lift(pFrom: number): number {
    const op = this.b.valve!.operation as { opensAbove: number; fullLiftAt: number };
    const x = (pFrom - this.pa - op.opensAbove) / (op.fullLiftAt - op.opensAbove);
    return x <= 0 ? 0 : x >= 1 ? 1 : x;
  }

  /** Flow from → to for the valve alone, given end pressures and temperatures (into the valve scratch). */
  private valveOnly(p1: number, p2: number, T1: number, T2: number, opening: number): ValveFlow {
    const v = this.b.valve!;
    const op = v.operation;
    const out = this.valve;
    if (opening <= 0) { out.mdot = 0; out.choked = false; return out; }
    if (op.kind === 'check') {
      const pEff = p1 - op.cracking;
      if (pEff <= p2) { out.mdot = 0; out.choked = false; return out; }
      return valveFlowInto(out, v.rating, pEff, p2, T1, T2, this.gas, opening);
    }
    valveFlowInto(out, v.rating, p1, p2, T1, T2, this.gas, opening);
    if ((op.kind === 'relief' || op.kind === 'regulator') && out.mdot < 0) { out.mdot = 0; out.choked = false; }
    return out;
  }

  flow(t: number, p1: number, p2: number, T1: number, T2: number, out: BranchFlow): void {
    const b = this.b;
    const Tup = p1 >= p2 ? T1 : T2;
    if (!b.valve) {
      const f = this.lineOnly(p1, p2, Tup);
      out.mdot = f.mdot; out.reynolds = f.reynolds; out.choked = false; out.regime = f.regime;
      lineExtras(out, f);
      return;
    }
    const opening = this.opening(t, p1, p2);
    if (!b.line) {
      const r = this.valveOnly(p1, p2, T1, T2, opening);
      out.mdot = r.mdot; out.choked = r.choked; out.regime = 'orifice';
      lineExtras(out, null);
      out.reynolds = (4 * Math.abs(r.mdot)) / (Math.PI * this.dEq * this.gas.viscosity(Tup));
      return;
    }
    if (opening <= 0 || p1 === p2) {
      out.mdot = 0; out.reynolds = 0; out.choked = false; out.regime = 'laminar';
      lineExtras(out, null);
      return;
    }
    // Valve at the downstream end of its line: the pressure between them balances the two
    // flows (physics/series.ts, done here without allocating). The mismatch is line(p1, pMid) −
    // valve(pMid, p2): −valve(p1, p2) at pMid = p1 and line(p1, p2) at pMid = p2, so Brent's
    // method brackets its one root; the flow is the mean of the two, equal to round-off.
    this.sA = p1; this.sB = p2; this.sT = Tup; this.sOpening = opening;
    const h = this.mismatch;
    const pMid = brent(h, p1, p2, h(p1), h(p2));
    if (Number.isNaN(pMid)) {
      out.mdot = Number.NaN; out.reynolds = Number.NaN; out.choked = false; out.regime = 'laminar';
      lineExtras(out, null);
      return;
    }
    const f = this.lineOnly(p1, pMid, Tup);
    lineExtras(out, f);
    const v = this.valveOnly(pMid, p2, Tup, Tup, opening);
    out.mdot = 0.5 * (f.mdot + v.mdot); out.reynolds = f.reynolds; out.regime = f.regime; out.choked = v.choked;
  }

  /**
   * The flow and its partial derivatives in the end states by forward differences of `flow`
   * (increments √eps relative to the larger end pressure and to each temperature). Local and
   * cheap: two or four extra flow evaluations. Temperature partials only when `withT`.
   * `known`, when given, is this branch's flow at exactly these end states (the system's last
   * evaluation): a plain line then needs no flow evaluation at all.
   *
   * References: Dennis & Schnabel, Numerical Methods for Unconstrained Optimization and
   * Nonlinear Equations, 1983, §5.4 (difference increments, from memory).
   */
  partials(t: number, p1: number, p2: number, T1: number, T2: number, withT: boolean, out: BranchPartials, known?: BranchFlow): void {
    const f = this.probe;
    if (!this.b.valve && !withT) {
      if (!known) this.flow(t, p1, p2, T1, T2, f);
      const at = known ?? f;
      if (at.regime === 'laminar' && !at.limited && !at.lineChoked) {
        // the closed form of the compressible Hagen–Poiseuille law (physics/line-flow.ts: laminar)
        out.q = at.mdot;
        this.linePressurePartials(p1, p2, at.reynolds, p1 >= p2 ? T1 : T2, out);
        return;
      }
    }
    this.flow(t, p1, p2, T1, T2, f);
    const q = f.mdot;
    out.q = q;
    const scale = Math.max(Math.abs(p1), Math.abs(p2), 1);
    const d1 = step(p1, scale);
    this.flow(t, p1 + d1, p2, T1, T2, f);
    out.dp1 = (f.mdot - q) / d1;
    const d2 = step(p2, scale);
    this.flow(t, p1, p2 + d2, T1, T2, f);
    out.dp2 = (f.mdot - q) / d2;
    if (!withT) { out.dT1 = 0; out.dT2 = 0; return; }
    const e1 = step(T1, T1);
    this.flow(t, p1, p2, T1 + e1, T2, f);
    out.dT1 = (f.mdot - q) / e1;
    const e2 = step(T2, T2);
    this.flow(t, p1, p2, T1, T2 + e2, f);
    out.dT2 = (f.mdot - q) / e2;
  }

  /**
   * ∂q/∂p1 and ∂q/∂p2 of a plain line in closed form, given the Reynolds number of its flow
   * (physics/tube.ts): q = ±(π·D·μ/4)·Re with F(Re) = f(Re)·Re² = X = |p1² − p2²|·D³/(L·R·T·μ²), so
   * ∂q/∂p1 = (π·D·μ/4)·2·p1·D³/(L·R·T·μ²)/F′(Re) and ∂q/∂p2 the same with −p2, in either
   * direction. F′ = 64 in the laminar range (Hagen–Poiseuille); above it the analytic slope of
   * the blended friction law (C¹). Used for laminar flow only: above it the acceleration terms
   * of physics/line-flow.ts enter and the partials are taken by differences.
   */
  private linePressurePartials(p1: number, p2: number, Re: number, Tup: number, out: BranchPartials): void {
    const l = this.b.line!;
    const mu = this.gas.viscosity(Tup);
    const D = l.diameter;
    const dF = Re > RE_LAMINAR ? frictionSlope(Re, l.roughness / D) : 64;
    const k = ((Math.PI * D * mu) / 4) * (2 * D * D * D) / (l.length * this.gas.R * Tup * mu * mu * dF);
    out.dp1 = k * p1;
    out.dp2 = -k * p2;
    out.dT1 = 0;
    out.dT2 = 0;
  }
}
