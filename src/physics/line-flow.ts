/**
 * Compressible flow through a line (straight round tube) fed from a chamber, with the gas's
 * acceleration: the flow is limited by choking at the line's exit.
 *
 * Model, in the direction of flow, from the upstream chamber's stagnation state (p0, T0) to the
 * downstream (back) pressure pb; k = (γ−1)/2, G = ṁ/A, A = πD²/4:
 * 1. Isentropic entrance (Anderson, Modern Compressible Flow, 3rd ed., ch. 3 and 5) to the inlet
 *    Mach number M1:  T1 = T0/(1 + k M1²),  p1 = p0 (1 + k M1²)^(−γ/(γ−1)),  G = p1 M1 √(γ/(R T1)).
 * 2. Isothermal flow with friction at the inlet's static temperature T1 (Shapiro, The Dynamics
 *    and Thermodynamics of Compressible Fluid Flow, 1953, ch. 6, isothermal flow in long ducts):
 *      p1² − p2² = G² R T1 [ f L/D + 2 ln(p1/p2) ]
 *    with f the Darcy friction factor of tube.ts at Re = G D/μ(T0). The right side grows with
 *    falling exit pressure p2 only down to p2* = G √(R T1), where the exit Mach number is
 *    M2 = 1/√γ: isothermal flow chokes there.
 * 3. Exit: subsonic, p2 = pb; choked (pb ≤ p2* at the largest G the line can pass), the flow
 *    stays at that G whatever pb does ("flat once choked").
 *
 * Why isothermal rather than adiabatic (Fanno): the line law was already isothermal (a long,
 * thin pneumatic line exchanges heat with its wall), and without the acceleration terms this law
 * is exactly the previous one, so laminar capillaries keep their closed form. The two differ
 * little where it matters: for a 4 mm hose venting a 6 bar gauge receiver this law gives within
 * 6 % of Fanno flow with the same isentropic entrance at 0.1, 1 and 10 m (test/reference/
 * choked_lines.py, docs/verification.md); at L → 0 it gives 97.8 % of the ideal nozzle (the
 * isentropic mass flux at M1 = 1/√γ), Fanno gives 100 %.
 *
 * Laminar and transitional flow. The acceleration terms (k M1² in step 1, 2 ln(p1/p2) in
 * step 2) carry a weight w(Re): 0 up to Re = 2300, 1 from 4000, the C¹ smoothstep of tube.ts
 * between. In laminar flow the law is therefore exactly the compressible Hagen–Poiseuille law
 * (tube.ts), acceleration neglected, a documented choice: its size relative to friction,
 * 2 ln(p1/p2)/(f L/D), is reported as `accel` so that runs can warn when it stops being small.
 * The choking limit is kept in laminar flow all the same: when that law would put the exit
 * above M = 1/√γ (a capillary into near vacuum), the exit stays at p2* = G √(R T) and
 * p0² − p2*² = 64 μ L R T G/D² gives the choked G in closed form. The weight depends on G only,
 * and both terms grow with G, so the flow stays a unique, increasing function of the pressure
 * drop.
 *
 * Bound. The result never exceeds the ideal nozzle of the line's bore at the upstream state
 * (orifice.ts, subsonic or choked, Cd = 1): no passage of that bore passes more. It binds only
 * in corners the law above does not cover (a laminar or transitional capillary of tiny bore
 * into near vacuum); the flow is then the nozzle's and `limited` is set.
 *
 * Properties: continuous, antisymmetric (upstream is the side at the higher pressure, at its
 * temperature), increasing in the upstream and decreasing in the downstream pressure, flat
 * once choked, exactly 0 at equal pressures and linear in Δp near them (laminar there), so
 * the jacobian is finite with no patch.
 *
 * Solving: one safeguarded root search (secant on G², bracketed) for
 *   Ψ(G) = p1² − pe² − G² R T1 [f L/D + 2w ln(p1/pe)],  pe = max(pb, √w·p2*),
 * which is positive below the solution and negative above it (Ψ < 0 where the entrance cannot
 * pass G at all); M1(G) by a safeguarded Newton iteration on the entrance relation. Laminar
 * flows take the closed form of tube.ts and no search.
 *
 * p Pa absolute, T K, D, L, roughness m, ṁ kg/s.
 *
 * References: Shapiro 1953, ch. 6; Anderson, Modern Compressible Flow, 3rd ed., ch. 3 (Fanno,
 * for comparison) and ch. 5; docs/references.md ("Compressible flow limits").
 */
import type { Gas } from './gas.js';
import { orificeMassFlow, criticalPressureRatio } from './orifice.js';
import { frictionFactor, RE_LAMINAR, RE_TURBULENT, tubeFlowInto, type TubeFlow } from './tube.js';

export interface LineFlow extends TubeFlow {
  /** The exit has reached the choking Mach number (flow independent of the back pressure). */
  choked: boolean;
  /** Exit Mach number (the largest along an isothermal line). */
  mach: number;
  /** Laminar: neglected acceleration relative to friction, 2 ln(p1/p2)/(f L/D); 0 otherwise. */
  accel: number;
  /** The ideal-nozzle bound set the flow. */
  limited: boolean;
  /** Mass flux G (kg/(m²·s)) of the last call with this object: the next call's first guess. */
  flux: number;
}

export function emptyLineFlow(): LineFlow {
  return { mdot: 0, reynolds: 0, regime: 'laminar', friction: Infinity, choked: false, mach: 0, accel: 0, limited: false, flux: 0 };
}

/** Weight of the acceleration terms: 0 laminar, 1 turbulent, C¹ smoothstep between. */
export function accelWeight(Re: number): number {
  if (Re <= RE_LAMINAR) return 0;
  if (Re >= RE_TURBULENT) return 1;
  const s = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR);
  return s * s * (3 - 2 * s);
}

/** Whether the current evaluation took the laminar closed form. */
const s0 = { laminar: false };

const EPS = Number.EPSILON;

/** Working values of one evaluation of Ψ (module scratch: no allocation inside the rhs). */
const st = { p0: 0, pb: 0, T0: 0, R: 0, gamma: 0, D: 0, LD: 0, mu: 0, rel: 0, flux0: 0, M1: 0, T1: 0, p1: 0, pe: 0, ps: 0, w: 0, f: 0 };

/**
 * Inlet Mach number M with M (1 + w k M²)^(−n) = g (n = (γ+1)/(2(γ−1))), on the subsonic branch
 * M ≤ 1/√(wγ) (the isothermal choking limit at the inlet). NaN when g is beyond that branch.
 * The left side increases on [0, 1/√w] (its derivative is (1 − wM²)(1 + wkM²)^(−n−1)) and lies
 * below M, so M ≥ g: Newton from one fixed-point sweep M = g (1 + w k g²)^n, bisection whenever
 * a step leaves the bracket.
 */
function inletMach(g: number, w: number, gamma: number): number {
  if (gamma !== machGamma) machConstants(gamma); // psi uses them too
  if (w === 0) return g;
  const k = machK, n = machN;
  let hi = 1 / Math.sqrt(w * gamma);
  // the left side at the branch's end: hi (1 + w k hi²)^(−n) = hi (1 + k/γ)^(−n)
  if (g > hi * machEdge) return Number.NaN;
  let lo = g;
  // start from one fixed-point sweep M = g (1 + w k g²)^n, inside the bracket (M ≥ g)
  let M = Math.min(g / powMinusN(1 + w * k * g * g), 0.5 * (g + hi));
  for (let i = 0; i < 100; i++) {
    const e = 1 + w * k * M * M;
    const q = powMinusN(e);
    const r = M * q - g;
    if (r === 0) return M;
    if (r < 0) lo = M; else hi = M;
    const dq = ((1 - w * M * M) * q) / e;
    let next = M - r / dq;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - M) <= 1e-15 * next) return next;
    M = next;
  }
  return M;
}

/**
 * inletMach's constants for the last γ: k = (γ−1)/2, n = (γ+1)/(2(γ−1)), (1 + k/γ)^(−n), and n
 * as an integer when it is one to round-off (3 for air and nitrogen, 2 for helium): x^(−n) is
 * then a few multiplications instead of a call of Math.pow, the cost of the line law.
 */
let machGamma = Number.NaN, machK = 0, machN = 0, machEdge = 0, machNInt = 0;
function machConstants(gamma: number): void {
  machK = 0.5 * (gamma - 1);
  machN = (gamma + 1) / (2 * (gamma - 1));
  machEdge = Math.pow(1 + machK / gamma, -machN);
  const r = Math.round(machN);
  machNInt = r >= 1 && r <= 4 && Math.abs(machN - r) < 1e-12 ? r : 0;
  machGamma = gamma;
}

/** x^(−n) for the current γ (machConstants). */
function powMinusN(x: number): number {
  switch (machNInt) {
    case 2: return 1 / (x * x);
    case 3: return 1 / (x * x * x);
    case 1: return 1 / x;
    case 4: { const x2 = x * x; return 1 / (x2 * x2); }
    default: return Math.pow(x, -machN);
  }
}

/** Ψ(G) of the header, filling the scratch with the state it used. */
function psi(G: number): number {
  const s = st;
  if (G <= 0) return (s.p0 - s.pb) * (s.p0 + s.pb);
  const Re = (G * s.D) / s.mu;
  const f = frictionFactor(Re, s.rel);
  const w = accelWeight(Re);
  const M1 = inletMach(G / s.flux0, w, s.gamma);
  if (Number.isNaN(M1)) return -s.p0 * s.p0;
  const e = 1 + 0.5 * (s.gamma - 1) * w * M1 * M1;
  const T1 = s.T0 / e;
  const p1 = (s.p0 * powMinusN(e)) / Math.sqrt(e); // p0·e^(−γ/(γ−1)), γ/(γ−1) = n + 1/2
  const c2 = G * G * s.R * T1;
  const ps = Math.sqrt(c2);
  const pe = Math.max(s.pb, Math.sqrt(w) * ps);
  s.M1 = M1; s.T1 = T1; s.p1 = p1; s.pe = pe; s.ps = ps; s.w = w; s.f = f;
  return (p1 - pe) * (p1 + pe) - c2 * (f * s.LD + 2 * w * Math.log(p1 / pe));
}

/**
 * The root of Ψ (Ψ(0) = d0 > 0, decreasing in G) from a first guess u1 of u = G². Ψ is nearly
 * linear in u (Ψ ≈ d0 − K·u, K varying slowly with G), so the first step is Newton's with the
 * slope of that model through the guess, the next ones secant steps, each kept inside the
 * bracket found so far (bisection, or doubling while no upper end is known, when a step leaves
 * it or |Ψ| has not halved). Stops when |Ψ| is at the round-off of its terms (each at most p0²)
 * or a step is below a few round-offs of u, always at a point Ψ was last evaluated at (the
 * scratch holds its state). From the previous solution of the same line (a warm start: between
 * the evaluations of an integration step the flow changes little) three or four evaluations of
 * Ψ; from the friction-only flow (cold) about six; a bracketing Brent search from [0, hi] took
 * twelve. Same root to round-off (test/physics/line-flow.test.ts).
 */
function rootOfPsi(u1: number, d0: number): number {
  let ulo = 0, uhi = Infinity;
  let u0 = Number.NaN, f0 = Number.NaN;
  let best = d0;
  const noise = 16 * EPS * st.p0 * st.p0;
  for (let i = 0; i < 300; i++) {
    const f1 = psi(Math.sqrt(u1));
    if (Math.abs(f1) <= noise) return Math.sqrt(u1);
    if (f1 > 0) ulo = u1; else uhi = u1;
    if (uhi < Infinity && uhi - ulo <= 4 * EPS * uhi) return Math.sqrt(u1);
    let next = i === 0 || f1 === f0 ? (u1 * d0) / (d0 - f1) : u1 - (f1 * (u1 - u0)) / (f1 - f0);
    const small = Math.abs(f1);
    if (!(next > ulo && next < uhi) || (i > 0 && small > 0.5 * best)) next = uhi < Infinity ? 0.5 * (ulo + uhi) : 2 * u1;
    best = Math.min(best, small);
    if (Math.abs(next - u1) <= 2 * EPS * u1) return Math.sqrt(u1);
    u0 = u1; f0 = f1; u1 = next;
  }
  psi(Math.sqrt(u1)); // not reached in practice; leave the scratch at the point returned
  return Math.sqrt(u1);
}

/**
 * Line flow written into `out` (no allocation; for use inside right-hand sides). ṁ is signed,
 * positive from end 1 to end 2; T is the upstream temperature (K).
 */
export function lineFlowInto(
  out: LineFlow, pA: number, pB: number, T: number, gas: Gas, D: number, L: number, roughness: number,
): LineFlow {
  out.choked = false; out.mach = 0; out.accel = 0; out.limited = false;
  tubeFlowInto(out, pA, pB, T, gas, D, L, roughness);
  if (pA === pB) return out;
  const forward = pA > pB;
  const p0 = forward ? pA : pB;
  const pb = forward ? pB : pA;
  const A = 0.25 * Math.PI * D * D;
  const mu = gas.viscosity(T);
  const gamma = gas.gamma;
  let G: number;
  let Te: number; // static temperature along the line
  let pe: number; // exit pressure
  s0.laminar = out.regime === 'laminar';
  if (s0.laminar) {
    G = Math.abs(out.mdot) / A;
    Te = T;
    pe = pb;
    const cs = Math.sqrt(gas.R * T);
    if (pb < G * cs) {
      // the exit would pass M = 1/√γ: choked at pe = G·√(R T), so p0² − (G·√(RT))² = k·G with
      // k = 64 μ L R T/D² (the laminar law with that exit pressure), a quadratic in G
      const k = (64 * mu * L * gas.R * T) / (D * D);
      const RT = gas.R * T;
      G = (2 * p0 * p0) / (k + Math.sqrt(k * k + 4 * RT * p0 * p0)); // the positive root, without cancellation
      pe = G * cs;
      out.choked = true;
      s0.laminar = false; // the flow is no longer the closed form's
      out.reynolds = (G * D) / mu;
      out.friction = 64 / out.reynolds;
    }
    out.accel = (2 * Math.log(p0 / pe)) / (out.friction * (L / D));
  } else {
    const s = st;
    s.p0 = p0; s.pb = pb; s.T0 = T; s.R = gas.R; s.gamma = gamma; s.D = D; s.LD = L / D; s.mu = mu;
    s.rel = roughness / D; s.flux0 = p0 * Math.sqrt(gamma / (gas.R * T));
    // first guess: the last solution of this line, else the friction-only flow (an upper bound)
    const guess = out.flux > 0 ? out.flux : Math.abs(out.mdot) / A;
    G = rootOfPsi(guess * guess, (p0 - pb) * (p0 + pb));
    const Re = (G * D) / mu;
    out.reynolds = Re;
    out.friction = s.f;
    out.regime = Re <= RE_LAMINAR ? 'laminar' : Re < RE_TURBULENT ? 'transitional' : 'turbulent';
    out.choked = s.w > 0 && pb <= Math.sqrt(s.w) * s.ps;
    Te = s.T1;
    pe = s.pe;
  }
  out.mach = (G * Math.sqrt(gas.R * Te)) / (pe * Math.sqrt(gamma));
  let m = out.regime === 'laminar' && s0.laminar ? Math.abs(out.mdot) : G * A;
  const nozzle = orificeMassFlow(p0, pb, T, gas.R, gamma, A);
  if (m > nozzle) {
    m = nozzle;
    out.limited = true;
    const r = pb / p0;
    out.choked = r <= criticalPressureRatio(gamma);
    out.mach = out.choked ? 1 : Math.sqrt((Math.pow(1 / r, (gamma - 1) / gamma) - 1) / (0.5 * (gamma - 1)));
    out.reynolds = (m / A) * D / mu;
  }
  out.mdot = forward ? m : -m;
  out.flux = m / A;
  return out;
}

/** Line flow (allocates the result; see lineFlowInto). */
export function lineFlow(pA: number, pB: number, T: number, gas: Gas, D: number, L: number, roughness: number): LineFlow {
  return lineFlowInto(emptyLineFlow(), pA, pB, T, gas, D, L, roughness);
}
