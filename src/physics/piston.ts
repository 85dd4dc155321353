/**
 * A pneumatic cylinder's piston: geometry, gas volumes, the force balance and the end stops.
 *
 * Geometry: bore D, rod d (0 for a single-acting cylinder, whose rod side is open to
 * ambient), stroke s, dead volumes V0c and V0r (ports, cushions, the gas beside the piston at
 * its ends). Position x ∈ [0, s] is the extension from the retracted stop.
 *   cap area A_c = π D²/4,  annulus area A_r = π (D² − d²)/4
 *   cap gas volume  V_c = V0c + A_c·x
 *   rod gas volume  V_r = V0r + A_r·(s − x)
 * Force balance of the rigid moving parts (mass M), x positive towards extension:
 *   M ẍ = F − F_friction,
 *   F = (p_c − p_a)·A_c − (p_r − p_a)·A_r − (F0 + k·x) − F_load(t) − M·g·sin θ
 * with ambient pressure p_a acting on the outside of the piston and rod (so the rod's own
 * cross-section sees ambient), a retracting spring of preload F0 (at x = 0) and rate k, an
 * external load opposing extension, and gravity along the axis for a mounting angle θ above
 * the horizontal (θ = 90°: extending straight up).
 *
 * End stops: the piston meets a stop at x = 0 or x = s inelastically (no rebound: cushioning
 * is not modelled) and stays there while the force pushes it into the stop, or pulls it
 * away by no more than static friction can hold; this is decided by `heldAtStop`.
 *
 * Gas spring: a sealed volume V behind a piston area A at absolute pressure p is a spring of
 * rate n·p·A²/V (n = 1 isothermal, γ adiabatic), so a mass on it oscillates with
 * ω² = (k + Σ n p A²/V)/M for small amplitudes (any fluid-power text; from memory).
 *
 * Units: m, m², m³, Pa absolute, N, N/m, kg, s.
 */

/** Standard gravity, m/s² (CGPM 1901, exact by definition). */
export const STANDARD_GRAVITY = 9.80665;

export interface PistonGeometry {
  /** Cap-side piston area A_c, m². */
  capArea: number;
  /** Rod-side (annulus) area A_r, m²; equals A_c for a single-acting cylinder without rod. */
  annulusArea: number;
  stroke: number;
  deadCap: number;
  deadRod: number;
}

/** Area of a circle of diameter d, m². */
export function circleArea(d: number): number {
  return (Math.PI * d * d) / 4;
}

/** Geometry from bore, rod diameter (0: none), stroke and dead volumes. */
export function pistonGeometry(bore: number, rod: number, stroke: number, deadCap: number, deadRod: number): PistonGeometry {
  return { capArea: circleArea(bore), annulusArea: circleArea(bore) - circleArea(rod), stroke, deadCap, deadRod };
}

/** Cap-side gas volume at position x, m³. */
export function capVolume(g: PistonGeometry, x: number): number {
  return g.deadCap + g.capArea * x;
}

/** Rod-side gas volume at position x, m³. */
export function rodVolume(g: PistonGeometry, x: number): number {
  return g.deadRod + g.annulusArea * (g.stroke - x);
}

/** Everything on the piston except gas pressures and friction. */
export interface PistonLoad {
  /** Moving mass M (piston, rod, payload), kg. */
  mass: number;
  /** Spring rate k, N/m (0: none). */
  springRate: number;
  /** Spring force at x = 0, N. */
  springPreload: number;
  /** M·g·sin θ, N (positive when gravity opposes extension). */
  gravity: number;
}

/** M·g·sin θ for a mounting angle θ (rad) above the horizontal. */
export function gravityForce(mass: number, angle: number): number {
  return mass * STANDARD_GRAVITY * Math.sin(angle);
}

/**
 * Net force on the piston towards extension, friction excluded (N):
 * (p_c − p_a)A_c − (p_r − p_a)A_r − (F0 + k x) − F_load − M g sin θ.
 * For a single-acting cylinder pass p_r = p_a.
 */
export function pistonForce(g: PistonGeometry, l: PistonLoad, pCap: number, pRod: number, pa: number, x: number, load: number): number {
  return (pCap - pa) * g.capArea - (pRod - pa) * g.annulusArea - (l.springPreload + l.springRate * x) - load - l.gravity;
}

/**
 * Whether a piston resting at a stop stays there: `side` −1 at x = 0, +1 at x = s; `F` the
 * net force towards extension (friction excluded), `Fs` the static friction. It stays while
 * the force pushes into the stop (side·F ≥ 0) or pulls it away by at most Fs.
 */
export function heldAtStop(side: -1 | 1, F: number, Fs: number): boolean {
  return side * F >= -Fs;
}

/** Rate of a gas spring n·p·A²/V, N/m (n = 1 isothermal, γ adiabatic). */
export function gasSpringRate(n: number, p: number, A: number, V: number): number {
  return (n * p * A * A) / V;
}

/**
 * Equilibrium position of a frictionless piston against its spring when the cap side is held
 * at p and the rod side at ambient (single-acting, or rod side vented): x = ((p − p_a)A_c −
 * F0 − F_load − M g sin θ)/k. Not clamped to the stroke.
 */
export function springEquilibrium(g: PistonGeometry, l: PistonLoad, p: number, pa: number, load: number): number {
  return ((p - pa) * g.capArea - l.springPreload - load - l.gravity) / l.springRate;
}
