/**
 * Mass flow through a valve rated by ISO 6358 (C, b, m) or as an orifice (d, Cd), in either
 * direction, at an opening fraction 0..1 that scales the effective area (orifice) or the sonic
 * conductance (ISO 6358) proportionally.
 *
 * Upstream is the side with the higher pressure; its temperature is used. An ISO 6358 rating
 * is air's: for another gas the flow is scaled by the equivalent-nozzle factor `gas.isoFactor`
 * (gas.ts), 0.394 for helium. A rating describes the valve in its rated direction; it is used
 * for flow either way (a valve body that passes less backwards is not modelled), except that
 * check and relief valves never pass reverse flow (elements/branch.ts).
 *
 * Linear patch near equal pressures. Both laws behave like √(1 − r) as r = p_down/p_up → 1, so
 * dṁ/dΔp is infinite at Δp = 0: an implicit integrator's Jacobian blows up and Newton
 * iterations stall exactly where chambers equalise. Above r_lin = 0.999 the flow is instead
 * linear in Δp = p_up − p_down through the law's value at r_lin:
 *   ṁ = ṁ_law(r_lin) · (1 − r)/(1 − r_lin) = K(T_up)·Δp,
 * with K independent of p_up (both laws are ∝ p_up at fixed r). The flow is then continuous,
 * zero at Δp = 0, strictly increasing in Δp, antisymmetric apart from the upstream temperature,
 * and has the finite slope K, the secant slope at r_lin (about twice the law's tangent there).
 * Choice of r_lin: the patch covers pressure differences below 0.1 % of the upstream pressure
 * (≈ 100 Pa at ambient, below the resolution of ordinary gauges), where the law itself is least
 * certain; a smaller 1 − r_lin would raise the peak conductance as 1/√(1 − r_lin) and stiffen
 * the system with no gain in fidelity. Inside the patch the flow is below the law's
 * (by the factor ≈ √((1 − r)/(1 − r_lin)) ≤ 1) and below its value at r_lin, which is a few per
 * cent of the choked flow (5.3 % for ISO 6358 with b = 0.3, 6.5 % for an orifice with γ = 1.4;
 * more as b approaches 1). A modelling choice, documented as such.
 *
 * References: ISO 6358-1:2013 (iso6358.ts); Anderson, Modern Compressible Flow, 3rd ed., ch. 5
 * (orifice.ts).
 */
import type { ValveRating } from '../netlist/types.js';
import type { Gas } from './gas.js';
import { iso6358MassFlow } from './iso6358.js';
import { criticalPressureRatio, orificeMassFlow } from './orifice.js';

/** Pressure ratio above which the flow is linear in Δp. */
export const R_LIN = 0.999;

export interface ValveFlow {
  /** kg/s, positive from → to. */
  mdot: number;
  choked: boolean;
}

/** One-way flow of the rated law at full-law ratio r ≤ 1 (p_down = r·p_up), scaled by opening. */
function lawFlow(rating: ValveRating, pUp: number, r: number, Tup: number, gas: Gas, opening: number): number {
  if (rating.kind === 'iso6358') {
    // the rating is air's; another gas through its equivalent nozzle (gas.ts, iso6358GasFactor)
    return gas.isoFactor * iso6358MassFlow(pUp, r * pUp, Tup, rating.conductance * opening, rating.criticalRatio, rating.subsonicIndex);
  }
  const A = (Math.PI / 4) * rating.diameter * rating.diameter * opening;
  return orificeMassFlow(pUp, r * pUp, Tup, gas.R, gas.gamma, A, rating.dischargeCoefficient);
}

/** Valve flow written into out (no allocation). Opening is clamped to [0, 1]. */
export function valveFlowInto(
  out: ValveFlow, rating: ValveRating, pFrom: number, pTo: number, Tfrom: number, Tto: number, gas: Gas, opening: number,
): ValveFlow {
  const x = Math.min(opening, 1);
  if (!(x > 0) || pFrom === pTo) {
    out.mdot = 0;
    out.choked = false;
    return out;
  }
  const forward = pFrom > pTo;
  const pUp = forward ? pFrom : pTo;
  const Tup = forward ? Tfrom : Tto;
  const r = (forward ? pTo : pFrom) / pUp;
  let m: number;
  if (r <= R_LIN) {
    m = lawFlow(rating, pUp, r, Tup, gas, x);
  } else {
    m = (lawFlow(rating, pUp, R_LIN, Tup, gas, x) * (1 - r)) / (1 - R_LIN);
  }
  const rc = rating.kind === 'iso6358' ? rating.criticalRatio : criticalPressureRatio(gas.gamma);
  out.choked = r <= rc;
  out.mdot = forward ? m : -m;
  return out;
}

/** Valve flow (allocates the result; see valveFlowInto). */
export function valveFlow(
  rating: ValveRating, pFrom: number, pTo: number, Tfrom: number, Tto: number, gas: Gas, opening: number,
): ValveFlow {
  return valveFlowInto({ mdot: 0, choked: false }, rating, pFrom, pTo, Tfrom, Tto, gas, opening);
}
