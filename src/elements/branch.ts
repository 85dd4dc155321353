/**
 * Branches: a line (tube), a valve, or a valve inside a line (series combination solved
 * exactly for the pressure between them). Flow is signed, positive from → to.
 *
 * Valve operation:
 * - schedule: opening(t) from a piecewise-linear schedule (breakpoints restart the integrator);
 * - check: one-way; the spring holds the cracking pressure pc, so the valve passes flow driven
 *   by (p_from − pc) → p_to while p_from − pc > p_to and none otherwise. The flow is continuous
 *   at the switch (zero on both sides), so opening and closing are logged events, not jumps;
 * - relief: a discrete state, closed → open when the upstream gauge pressure rises through
 *   `opens-above`, open → closed when it falls through `reseats-below` (hysteresis); it
 *   discharges from → to only (never backwards).
 */
import type { Gas } from '../physics/gas.js';
import { tubeFlow } from '../physics/tube.js';
import { valveFlow } from '../physics/valve-flow.js';
import { seriesFlow } from '../physics/series.js';
import type { BranchModel } from '../model/types.js';
import { makeSchedule, type Schedule } from '../model/schedule.js';
import type { ValveRating } from '../netlist/types.js';

/** Critical-flow function ψc = √γ·(2/(γ+1))^((γ+1)/(2(γ−1))), Anderson, Modern Compressible Flow, ch. 5. */
function psiStar(gamma: number): number {
  return Math.sqrt(gamma) * Math.pow(2 / (gamma + 1), (gamma + 1) / (2 * (gamma - 1)));
}

/**
 * Diameter of an ideal nozzle with the same choked flow, used to quote a Reynolds number for
 * a valve. For an ISO 6358 rating: C·ρ0·√(T0/T)·p = A·p·ψc/√(R·T) ⇒ A = C·ρ0·√(R·T0)/ψc
 * (ρ0 = 1.185 kg/m³, T0 = 293.15 K per ISO 6358-1).
 */
export function equivalentDiameter(rating: ValveRating, gas: Gas): number {
  if (rating.kind === 'orifice') return rating.diameter * Math.sqrt(rating.dischargeCoefficient);
  const A = (rating.conductance * 1.185 * Math.sqrt(gas.R * 293.15)) / psiStar(gas.gamma);
  return Math.sqrt((4 * A) / Math.PI);
}

export interface BranchFlow { mdot: number; reynolds: number; choked: boolean; regime: 'laminar' | 'transitional' | 'turbulent' | 'orifice' }

export class BranchState {
  readonly schedule: Schedule | null;
  /** Relief valve state. */
  open = false;
  readonly dEq: number;

  constructor(readonly b: BranchModel, readonly gas: Gas, readonly pa: number) {
    const op = b.valve?.operation;
    this.schedule = op?.kind === 'schedule' ? makeSchedule(op.initially, op.steps) : null;
    this.dEq = b.valve ? equivalentDiameter(b.valve.rating, gas) : b.line!.diameter;
  }

  /** Opening fraction 0..1 at time t (schedules and relief state; check valves are 1). */
  opening(t: number): number {
    const op = this.b.valve?.operation;
    if (!op) return 1;
    if (op.kind === 'schedule') return (this.schedule as Schedule).at(t);
    if (op.kind === 'relief') return this.open ? 1 : 0;
    return 1;
  }

  /** Flow from → to for the valve alone, given end pressures and temperatures. */
  private valveOnly(p1: number, p2: number, T1: number, T2: number, opening: number): { mdot: number; choked: boolean } {
    const v = this.b.valve!;
    const op = v.operation;
    if (opening <= 0) return { mdot: 0, choked: false };
    if (op.kind === 'check') {
      const pEff = p1 - op.cracking;
      if (pEff <= p2) return { mdot: 0, choked: false };
      return valveFlow(v.rating, pEff, p2, T1, T2, this.gas, opening);
    }
    const r = valveFlow(v.rating, p1, p2, T1, T2, this.gas, opening);
    if (op.kind === 'relief' && r.mdot < 0) return { mdot: 0, choked: false };
    return r;
  }

  flow(t: number, p1: number, p2: number, T1: number, T2: number, out: BranchFlow): void {
    const b = this.b;
    const Tup = p1 >= p2 ? T1 : T2;
    const mu = this.gas.viscosity(Tup);
    if (!b.valve) {
      const l = b.line!;
      const f = tubeFlow(p1, p2, Tup, this.gas, l.diameter, l.length, l.roughness);
      out.mdot = f.mdot; out.reynolds = f.reynolds; out.choked = false; out.regime = f.regime;
      return;
    }
    const opening = this.opening(t);
    if (!b.line) {
      const r = this.valveOnly(p1, p2, T1, T2, opening);
      out.mdot = r.mdot; out.choked = r.choked; out.regime = 'orifice';
      out.reynolds = (4 * Math.abs(r.mdot)) / (Math.PI * this.dEq * mu);
      return;
    }
    const l = b.line;
    if (opening <= 0 || p1 === p2) {
      out.mdot = 0; out.reynolds = 0; out.choked = false; out.regime = 'laminar';
      return;
    }
    // valve at the downstream end of its line; the pressure between them is solved exactly
    const s = seriesFlow(p1, p2,
      (a, c) => tubeFlow(a, c, Tup, this.gas, l.diameter, l.length, l.roughness).mdot,
      (a, c) => this.valveOnly(a, c, Tup, Tup, opening).mdot);
    const f = tubeFlow(p1, s.pMid, Tup, this.gas, l.diameter, l.length, l.roughness);
    const v = this.valveOnly(s.pMid, p2, Tup, Tup, opening);
    out.mdot = s.mdot; out.reynolds = f.reynolds; out.regime = f.regime; out.choked = v.choked;
  }
}
