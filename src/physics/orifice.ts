/**
 * Isentropic compressible flow of an ideal gas through a nozzle or sharp orifice from
 * stagnation state (p0, T0) to back pressure p2, times a discharge coefficient Cd.
 *   choked, r = p2/p0 ≤ r* = (2/(γ+1))^(γ/(γ−1)):
 *     ṁ = Cd A p0 √(γ/(R T0)) (2/(γ+1))^((γ+1)/(2(γ−1)))
 *   subsonic, r* < r ≤ 1:
 *     ṁ = Cd A p0 √( 2γ/((γ−1) R T0) · (r^(2/γ) − r^((γ+1)/γ)) )
 * The two agree at r*, so ṁ(r) is continuous; its slope is infinite at r = 1 (see valve-flow.ts).
 * p Pa absolute, T0 K, A m², R J/(kg·K), ṁ kg/s (one-way: 0 for p2 ≥ p0).
 *
 * References: Anderson, Modern Compressible Flow, 3rd ed., ch. 5 (quasi-one-dimensional flow,
 * mass flow through a nozzle); Shapiro 1953, ch. 4.
 */

/** The constants of a gas's γ, kept for the last γ asked (a network has one gas). */
let lastGamma = Number.NaN, lastRc = Number.NaN, lastChoke = Number.NaN;
function constantsOf(gamma: number): void {
  if (gamma === lastGamma) return;
  lastRc = Math.pow(2 / (gamma + 1), gamma / (gamma - 1));
  lastChoke = Math.pow(2 / (gamma + 1), (gamma + 1) / (2 * (gamma - 1)));
  lastGamma = gamma;
}

/** Critical pressure ratio r* = (2/(γ+1))^(γ/(γ−1)) (0.528281788 for γ = 1.4). */
export function criticalPressureRatio(gamma: number): number {
  constantsOf(gamma);
  return lastRc;
}

/** Mass flow (kg/s) from (p0, T0) into back pressure p2; Cd·A is the effective area (m²). */
export function orificeMassFlow(p0: number, p2: number, T0: number, R: number, gamma: number, A: number, Cd = 1): number {
  if (!(p2 < p0)) return 0;
  const r = p2 / p0;
  constantsOf(gamma);
  if (r <= lastRc) {
    return Cd * A * p0 * Math.sqrt(gamma / (R * T0)) * lastChoke;
  }
  const phi = Math.pow(r, 2 / gamma) - Math.pow(r, (gamma + 1) / gamma);
  return Cd * A * p0 * Math.sqrt(((2 * gamma) / ((gamma - 1) * R * T0)) * phi);
}
