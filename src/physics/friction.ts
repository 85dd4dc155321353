/**
 * Stick–slip friction of a piston and its seals after Karnopp (D. Karnopp, "Computer
 * simulation of stick-slip friction in mechanical dynamic systems", J. Dyn. Sys. Meas.
 * Control 107 (1985) 100):
 *   sliding (|v| > Δv):  F_f = F_c·sign(v) + c·v                 (Coulomb + viscous)
 *   sticking (|v| ≤ Δv): F_f = F            while |F| ≤ F_s      (friction balances the
 *                        F_f = F_s·sign(F)  once |F| > F_s        applied force F, up to F_s)
 * F_s static (breakaway) friction ≥ F_c sliding friction ≥ 0, c viscous coefficient (N·s/m),
 * F the applied force (everything on the body except friction), Δv the zero-velocity band.
 * A body at rest therefore stays at rest until |F| exceeds F_s, and once moving it feels
 * F_c + c|v| against its motion.
 *
 * The band exists because a fixed-step integrator never lands on v = 0. An integrator with
 * event location can take the band to zero: the body is in one of three modes — stuck (v ≡ 0,
 * friction = F), sliding forwards or sliding backwards (friction F_c·s + c·v with the mode's
 * direction s, smooth within the mode) — and switches only at located events: |F| reaches
 * F_s while stuck (`breakaway`), v reaches 0 while sliding (`afterHalt` decides: stick, or
 * carry on the other way). Within every mode the right-hand side is smooth, so the
 * integrator never chatters across v = 0. `karnoppFriction` is the law with a finite band,
 * for callers that integrate without events; the modes are the same law as Δv → 0.
 *
 * Limits: no Stribeck curve (friction falls from F_s to F_c at once on breakaway), no
 * pre-sliding displacement, no dependence on pressure or temperature; friction parameters
 * are constants of the seal at the conditions they were measured at.
 *
 * Units: N, N·s/m, m/s.
 */

export interface FrictionLaw {
  /** Static (breakaway) friction F_s, N. */
  static: number;
  /** Sliding (Coulomb) friction F_c ≤ F_s, N. */
  sliding: number;
  /** Viscous coefficient c, N·s/m. */
  viscous: number;
}

export const NO_FRICTION: FrictionLaw = { static: 0, sliding: 0, viscous: 0 };

/** Sliding direction: +1 forwards, −1 backwards, 0 stuck. */
export type SlideMode = -1 | 0 | 1;

/** Whether the law has a Coulomb part (and therefore needs the stuck/sliding modes). */
export function hasCoulomb(f: FrictionLaw): boolean {
  return f.static > 0 || f.sliding > 0;
}

/**
 * Karnopp's law with a zero-velocity band Δv ≥ 0: the friction force (N, acting against +x
 * when positive) on a body moving at v under the applied force F.
 */
export function karnoppFriction(f: FrictionLaw, v: number, F: number, dv: number): number {
  if (Math.abs(v) <= dv) return Math.abs(F) <= f.static ? F : f.static * Math.sign(F);
  return f.sliding * Math.sign(v) + f.viscous * v;
}

/** Friction while sliding in direction s at velocity v (N, against +x when positive). */
export function slidingFriction(f: FrictionLaw, s: SlideMode, v: number): number {
  return f.sliding * s + f.viscous * v;
}

/** Whether a stuck body breaks away under the applied force F. */
export function breaksAway(f: FrictionLaw, F: number): boolean {
  return Math.abs(F) > f.static;
}

/**
 * The mode of a body at rest under the applied force F: stuck while static friction holds,
 * else sliding in the direction of F. Used at the start, when a sliding body's velocity
 * reaches zero, and at breakaway.
 */
export function modeAtRest(f: FrictionLaw, F: number): SlideMode {
  if (!breaksAway(f, F)) return 0;
  return F > 0 ? 1 : -1;
}

/** Acceleration (m/s²) of a body of mass M in mode s at velocity v under applied force F. */
export function acceleration(f: FrictionLaw, s: SlideMode, v: number, F: number, M: number): number {
  if (s === 0) return 0;
  return (F - slidingFriction(f, s, v)) / M;
}
