/**
 * Isothermal compressible flow in a straight round tube, wall friction only (acceleration and
 * entrance losses neglected). Integrating dp/dx = −f G²/(2 D ρ) with ρ = p/(R T) along the tube:
 *   p1² − p2² = f(Re) · (L/D) · G² · R · T,   G = ṁ/A,   Re = G·D/μ(T).
 * p Pa absolute, T K, D and L and roughness m, ṁ kg/s.
 *
 * Friction (Darcy): laminar f = 64/Re, which gives the closed form
 *   ṁ = π D⁴ (p1² − p2²) / (256 μ L R T)      (compressible Hagen–Poiseuille);
 * turbulent: Haaland's explicit fit of Colebrook, 1/√f = −1.8 log10[(ε/D/3.7)^1.11 + 6.9/Re]
 * (smooth-pipe law for ε = 0; meant for ε/D up to about 0.05, the Moody chart's range). Between Re = 2300 and 4000 (the transitional range, common
 * practice, Cengel & Cimbala, Fluid Mechanics, ch. 8, from memory) the two are blended,
 * f = (1 − w) f_lam + w f_turb with the C¹ smoothstep w = 3s² − 2s³, s = (Re − 2300)/1700:
 * smooth in Re, and f·Re² stays strictly increasing (asserted in the tests) because f_turb >
 * f_lam throughout the blend, so the flow is a unique, increasing function of p1² − p2².
 *
 * Solving: f·Re² = X := (p1² − p2²) D³/(L R T μ²) is known from the pressures, so Re follows
 * in closed form when laminar (Re = X/64) and otherwise by a safeguarded Newton iteration on
 * f·Re² − X (bisection whenever a step leaves the bracket), warm-started from the tube's last Re.
 *
 * References: Bird, Stewart & Lightfoot, Transport Phenomena, 2nd ed., §2.3 (Hagen–Poiseuille);
 * Shapiro, The Dynamics and Thermodynamics of Compressible Fluid Flow, 1953, ch. 6 (isothermal
 * flow with friction); Haaland, J. Fluids Eng. 105 (1983) 89.
 */
import type { Gas } from './gas.js';

export const RE_LAMINAR = 2300;
export const RE_TURBULENT = 4000;
const HAALAND_K = 1.8 / Math.LN10;

export interface TubeFlow {
  /** kg/s, positive from end 1 to end 2. */
  mdot: number;
  reynolds: number;
  regime: 'laminar' | 'transitional' | 'turbulent';
  /** Darcy friction factor (Infinity at zero flow, where f = 64/Re). */
  friction: number;
}

/** Haaland with the roughness term a = (ε/D/3.7)^1.11 precomputed. */
function haalandFromA(a: number, Re: number): number {
  const inv = -HAALAND_K * Math.log(a + 6.9 / Re);
  return 1 / (inv * inv);
}

/** Haaland's Darcy friction factor at Reynolds number Re and relative roughness ε/D. */
export function haalandFriction(Re: number, relRoughness: number): number {
  return haalandFromA(Math.pow(relRoughness / 3.7, 1.11), Re);
}

/** Scratch for F = f·Re² and dF/dRe. */
interface FScratch { F: number; dF: number; f: number }

/** The blended friction law: writes f, F = f·Re² and dF/dRe. */
function frictionLaw(Re: number, a: number, o: FScratch): void {
  if (Re <= RE_LAMINAR) {
    o.f = 64 / Re;
    o.F = 64 * Re;
    o.dF = 64;
    return;
  }
  const A = a + 6.9 / Re;
  const inv = -HAALAND_K * Math.log(A);
  const ft = 1 / (inv * inv);
  const dinv = (HAALAND_K * 6.9) / (A * Re * Re);
  const dft = (-2 * ft * dinv) / inv;
  const Ft = ft * Re * Re;
  const dFt = dft * Re * Re + 2 * ft * Re;
  if (Re >= RE_TURBULENT) {
    o.f = ft;
    o.F = Ft;
    o.dF = dFt;
    return;
  }
  const s = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR);
  const w = s * s * (3 - 2 * s);
  const dw = (6 * s * (1 - s)) / (RE_TURBULENT - RE_LAMINAR);
  const Fl = 64 * Re;
  o.f = (1 - w) * (64 / Re) + w * ft;
  o.F = (1 - w) * Fl + w * Ft;
  o.dF = (1 - w) * 64 + w * dFt + dw * (Ft - Fl);
}

const scratch: FScratch = { F: 0, dF: 0, f: 0 };

/** Darcy friction factor of the blended law (laminar, transitional, turbulent). */
export function frictionFactor(Re: number, relRoughness: number): number {
  frictionLaw(Re, roughnessTerm(relRoughness), scratch);
  return scratch.f;
}

/** d(f·Re²)/dRe of the blended law, analytic (64 when laminar). */
export function frictionSlope(Re: number, relRoughness: number): number {
  frictionLaw(Re, roughnessTerm(relRoughness), scratch);
  return scratch.dF;
}

/** Haaland's roughness term (ε/D/3.7)^1.11, remembered for the last relative roughness (a network's lines share a few). */
let lastRel = 0;
let lastA = 0;
function roughnessTerm(rel: number): number {
  if (rel !== lastRel) {
    lastA = Math.pow(rel / 3.7, 1.11);
    lastRel = rel;
  }
  return lastA;
}

/**
 * Re with F(Re) = f(Re)·Re² = X (X > 64·2300), by safeguarded Newton on F(Re) − X. `guess` (a
 * previous Reynolds number of the same tube, or 0) starts the iteration near the root: between
 * the evaluations of an integration step the flow changes little, and one or two Newton steps
 * then do.
 *
 * F is increasing and convex in Re (F ∝ Re^1.75…2 when turbulent), so Newton from above the
 * root descends onto it monotonically and from below overshoots once; a step that leaves the
 * bracket [lo, hi] known so far is replaced by bisection. Stop: a Newton step (not a bisection)
 * below 1e-10 of Re. Convergence is quadratic where F is C² (everywhere but the two blend ends,
 * where it is C¹ and still superlinear), so the error after that step is far below round-off.
 * The tests check F(Re) = X to 1e-12 across all regimes, from cold and from warm starts.
 */
function solveReynolds(X: number, a: number, guess: number): number {
  let lo = RE_LAMINAR;
  let hi = Infinity;
  let Re: number;
  if (guess > RE_LAMINAR && guess < Infinity) {
    Re = guess;
  } else {
    // one fixed-point sweep Re = √(X/f) from a mid-range friction factor of 0.03
    Re = Math.sqrt(X / 0.03);
    Re = Math.max(Math.sqrt(X / haalandFromA(a, Re)), RE_LAMINAR * 1.0001);
  }
  for (let i = 0; i < 200; i++) {
    frictionLaw(Re, a, scratch);
    const g = scratch.F - X;
    if (g === 0) return Re;
    if (g > 0) hi = Re; else lo = Re;
    const next = Re - g / scratch.dF;
    if (next > lo && next < hi) {
      if (Math.abs(next - Re) <= NEWTON_STOP * next) return next;
      Re = next;
    } else {
      // safeguard: bisect the bracket (or double until there is one)
      Re = hi < Infinity ? 0.5 * (lo + hi) : 2 * Re;
      if (hi - lo <= 1e-15 * Re) return Re;
    }
  }
  return Re;
}

/** Newton stops after a step below this fraction of Re (see solveReynolds). */
const NEWTON_STOP = 1e-10;

/**
 * Tube flow written into `out` (no allocation; for use inside right-hand sides). The Reynolds
 * number already in `out` (from the last call with the same `out`) starts the turbulent solve.
 * ṁ is signed (positive 1 → 2), antisymmetric, exactly 0 for p1 = p2 and linear in p1 − p2
 * near zero (laminar there).
 */
export function tubeFlowInto(
  out: TubeFlow, p1: number, p2: number, T: number, gas: Gas, D: number, L: number, roughness: number,
): TubeFlow {
  const mu = gas.viscosity(T);
  const dp2 = Math.abs(p1 - p2) * (p1 + p2); // |p1² − p2²| without cancellation
  const X = (dp2 * D * D * D) / (L * gas.R * T * mu * mu);
  let Re: number;
  if (X <= 64 * RE_LAMINAR) {
    Re = X / 64;
    out.friction = 64 / Re;
    out.regime = 'laminar';
  } else {
    const a = roughnessTerm(roughness / D);
    Re = solveReynolds(X, a, out.reynolds);
    frictionLaw(Re, a, scratch);
    out.friction = scratch.f;
    out.regime = Re < RE_TURBULENT ? 'transitional' : 'turbulent';
  }
  out.reynolds = Re;
  const m = (Re * mu * Math.PI * D) / 4;
  out.mdot = p1 >= p2 ? m : -m;
  return out;
}

/** Tube flow (allocates the result; see tubeFlowInto). */
export function tubeFlow(p1: number, p2: number, T: number, gas: Gas, D: number, L: number, roughness: number): TubeFlow {
  return tubeFlowInto({ mdot: 0, reynolds: 0, regime: 'laminar', friction: 0 }, p1, p2, T, gas, D, L, roughness);
}
