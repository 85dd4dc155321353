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
 * ln(f Re²) − ln X in ln Re (bisection whenever a step leaves the bracket).
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
  frictionLaw(Re, Math.pow(relRoughness / 3.7, 1.11), scratch);
  return scratch.f;
}

/** Re with f(Re)·Re² = X (X > 64·2300), by safeguarded Newton in ln Re. */
function solveReynolds(X: number, a: number): number {
  const lnX = Math.log(X);
  let lo = Math.log(RE_LAMINAR);
  let hi = Infinity;
  // Start: one fixed-point sweep Re = √(X/f) from a mid-range friction factor of 0.03.
  let Re = Math.sqrt(X / 0.03);
  Re = Math.sqrt(X / haalandFromA(a, Re));
  let u = Math.log(Math.max(Re, RE_LAMINAR * 1.0001));
  for (let i = 0; i < 100; i++) {
    const R = Math.exp(u);
    frictionLaw(R, a, scratch);
    const g = Math.log(scratch.F) - lnX;
    if (g === 0) return R;
    if (g > 0) hi = u; else lo = u;
    let next = u - g / ((R * scratch.dF) / scratch.F);
    if (!(next > lo && next < hi)) next = Number.isFinite(hi) ? 0.5 * (lo + hi) : u + 1;
    if (Math.abs(next - u) <= 1e-15 * Math.abs(next)) return Math.exp(next);
    u = next;
  }
  return Math.exp(u);
}

/**
 * Tube flow written into `out` (no allocation; for use inside right-hand sides).
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
    const a = Math.pow(roughness / D / 3.7, 1.11);
    Re = solveReynolds(X, a);
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
