/**
 * Wall laws: the gauge pressure Δp(V) (Pa) a chamber's wall exerts at volume V (m³), with slope.
 *
 * rigid      V fixed (eval gives p = NaN, dpdV = ∞).
 * linear     Δp = (V − V0)/C.
 * spheres    thin rubber membrane (membrane.ts) at λ = (V/V0)^(1/3), V0 = (4/3)π r0³, for V ≥ V0.
 * measured   shape-preserving cubic (pchip.ts) through [V, Δp] points; linear above the last.
 *
 * Slack regime. Below its unstretched size a sphere (and a measured bag below its first point
 * V1) has no elastic tension: the bag collapses at slightly sub-ambient pressure, and its gas
 * pressure falls to vacuum only as its volume goes to zero, so mass and volume vanish together
 * and an emptying chamber never meets a singularity. With x = V/Vs (Vs = V0, or V1), y = 1 − x,
 * anchor gauge pressure ps (0 for spheres, p1 for measured), P = ambient pressure:
 *   Δp = ps − S·y/(1 + β·y),  β = S/(P + ps) − 1,
 * where S = dΔp/dx at x = 1 (the elastic slope, so Δp is C¹ at Vs). Then Δp(0) = −P exactly,
 * dΔp/dV = S/(Vs (1 + βy)²) > 0 (1 + βy lies between 1 and S/(P + ps) > 0), and the absolute
 * pressure P + Δp = (P + ps)·x/(1 + βy) vanishes linearly with V. Below V = 0 (only reached by
 * solver overshoot) Δp continues linearly with its slope at 0.
 * Measured walls: the knot slope at V1 is the shape-preserving one of an interior knot whose
 * left neighbour is vacuum, (0, −P); it is positive whenever the data rise from V1, and then
 * the rational form above applies with S = V1·slope. When the data start flat or falling that
 * slope is 0 and the slack piece is instead the monotone cubic from (0, −P) to (V1, p1) with
 * zero end slope. Above the last point the curve continues linearly with the end slope.
 *
 * Mass–volume uniqueness (pvMonotone): at fixed T the gas mass is ∝ (P + Δp)·V, increasing in V
 * iff (P + Δp) + V·dΔp/dV > 0. For the neo-Hookean sphere with c = 2μ t0/r0, using
 * V·dΔp/dV = (λ/3)·dΔp/dλ, this is P + c[(2/3)λ⁻¹ + (4/3)λ⁻⁷] > 0, i.e. after multiplying by
 * 3λ²: 3λ²P + c(2λ + 4λ⁻⁵) > 0, true for all λ > 0. The same algebra gives
 * P + 4(t0/r0)[(C1 + C2λ²)((2/3)λ⁻¹ + (4/3)λ⁻⁷) + (2/3)C2λ²(λ⁻¹ − λ⁻⁷)] > 0 for Mooney–Rivlin
 * (C1, C2 ≥ 0, λ ≥ 1), and for Gent the extra term −(λ/3)Δp·D′/D ≥ 0 (D′ ≤ 0 for λ ≥ 1). In the
 * slack regime (P + Δp)·V = (P + ps)·Vs·x²/(1 + βy), increasing for x > 0 whenever β > −1.
 * The check is still done numerically, because a lumped dead volume Vd (tubing) adds Vd·dΔp/dV,
 * which is negative past a pressure maximum.
 *
 * References: Treloar 1975 and Ogden 1984 (membranes, see membrane.ts); Fritsch & Carlson, SIAM
 * J. Numer. Anal. 17 (1980) 238 (monotone cubic interpolation); Brent 1973, ch. 4 (extrema).
 */
import type { WallSpec } from '../netlist/types.js';
import { gentLockStretch, membranePressureInto, type Membrane, type MembranePressure } from './membrane.js';
import { makePchip, pchipEval, pchipInteriorSlope, type Pchip } from './pchip.js';
import { brent } from './roots.js';

/** Stretch up to which extrema are sought and pvMonotone checks NH and MR spheres (rubber bursts far below). */
const LAMBDA_CHECK = 20;
/** Grid points for bracketing extrema and for the pvMonotone scan. */
const GRID = 4000;

export interface WallPoint { p: number; dpdV: number }

export interface WallLaw {
  kind: WallSpec['law'];
  rigid: boolean;
  sphere: boolean;
  /** Rigid volume; unstretched volume (spheres); zero-gauge volume (linear); first point (measured). m³ */
  V0: number;
  /** Largest admissible volume (Gent lock, rigid volume), else Infinity. m³ */
  Vmax: number;
  /** Writes the gauge pressure Δp(V) (Pa) and dΔp/dV (Pa/m³). */
  eval(V: number, out: WallPoint): void;
  /** λ = (V/V0)^(1/3) for spheres, NaN otherwise. */
  stretch(V: number): number;
  /** V0·λ³ for spheres, NaN otherwise. */
  volumeAtStretch(lambda: number): number;
  /** Local extrema of Δp(V) on the elastic range, ascending in V. */
  extrema: { V: number; p: number; kind: 'max' | 'min' }[];
  /** Volume below which the slack treatment applies (V0 for spheres, V1 for measured), else 0. */
  slackBelow: number;
}

/** Volume interval that pvMonotone scans, per law (kept out of the public interface). */
const scanRange = new WeakMap<WallLaw, { lo: number; hi: number }>();

/** The rational slack curve anchored at (Vs, ps) with slope S/Vs there, reaching −P at V = 0. */
function slack(V: number, Vs: number, ps: number, S: number, P: number, out: WallPoint): void {
  const beta = S / (P + ps) - 1;
  if (V <= 0) {
    const slope0 = ((P + ps) * (P + ps)) / (S * Vs);
    out.p = -P + slope0 * V;
    out.dpdV = slope0;
    return;
  }
  const y = 1 - V / Vs;
  const q = 1 + beta * y;
  out.p = ps - (S * y) / q;
  out.dpdV = S / (Vs * q * q);
}

/**
 * Slack curve for a measured bag whose data start flat or falling (knot slope 0 at V1): the
 * cubic Hermite from (0, −P) with the secant slope to (V1, p1) with slope 0, monotone because
 * its slope ratios (1, 0) lie in the Fritsch–Carlson region.
 */
function slackFlat(V: number, V1: number, p1: number, P: number, out: WallPoint): void {
  const sec = (P + p1) / V1;
  if (V <= 0) {
    out.p = -P + sec * V;
    out.dpdV = sec;
    return;
  }
  const u = V / V1;
  // Hermite: y0 = −P, d0 = sec, y1 = p1, d1 = 0 on [0, V1].
  out.p = -P + (P + p1) * (3 * u * u - 2 * u * u * u) + sec * V1 * (u * u * u - 2 * u * u + u);
  out.dpdV = (P + p1) * (6 * u - 6 * u * u) / V1 + sec * (3 * u * u - 4 * u + 1);
}

function membraneOf(spec: WallSpec): Membrane | undefined {
  switch (spec.law) {
    case 'neo-hookean': return { kind: 'neo-hookean', r0: spec.radius, t0: spec.thickness, mu: spec.shearModulus };
    case 'mooney-rivlin': return { kind: 'mooney-rivlin', r0: spec.radius, t0: spec.thickness, c1: spec.c1, c2: spec.c2 };
    case 'gent': return { kind: 'gent', r0: spec.radius, t0: spec.thickness, mu: spec.shearModulus, jm: spec.limit };
    default: return undefined;
  }
}

/** Largest stretch searched: below the Gent lock; for MR far enough to see the minimum near 1/√(C2/C1). */
function lambdaHigh(m: Membrane): number {
  if (m.kind === 'gent') return gentLockStretch(m.jm) * (1 - 1e-9);
  if (m.kind === 'mooney-rivlin' && m.c2 > 0 && m.c1 > 0) return Math.max(LAMBDA_CHECK, 4 / Math.sqrt(m.c2 / m.c1));
  return LAMBDA_CHECK;
}

/** Extrema of Δp(λ): sign changes of dΔp/dλ on a geometric grid, refined by Brent's method. */
function membraneExtrema(m: Membrane, V0: number): WallLaw['extrema'] {
  const s: MembranePressure = { dp: 0, ddp: 0 };
  const slope = (l: number): number => membranePressureInto(m, l, s).ddp;
  const hiL = lambdaHigh(m);
  const ratio = Math.pow(hiL, 1 / GRID);
  const out: WallLaw['extrema'] = [];
  let a = 1;
  let fa = slope(a);
  for (let i = 1; i <= GRID; i++) {
    const b = i === GRID ? hiL : a * ratio;
    const fb = slope(b);
    if ((fa > 0 && fb <= 0) || (fa < 0 && fb >= 0)) {
      const l = brent(slope, a, b, fa, fb);
      out.push({ V: V0 * l * l * l, p: membranePressureInto(m, l, s).dp, kind: fa > 0 ? 'max' : 'min' });
    }
    a = b;
    fa = fb;
  }
  return out;
}

function makeSphere(kind: WallSpec['law'], m: Membrane, P: number): WallLaw {
  const V0 = (4 / 3) * Math.PI * m.r0 ** 3;
  const s: MembranePressure = { dp: 0, ddp: 0 };
  const S = membranePressureInto(m, 1, s).ddp / 3; // dΔp/dx at x = 1, since λ = x^(1/3)
  if (!(S > 0) || !(V0 > 0)) throw new Error(`${kind} wall: radius, thickness and moduli must make a positive initial stiffness`);
  const Vmax = m.kind === 'gent' ? V0 * gentLockStretch(m.jm) ** 3 : Infinity;
  const law: WallLaw = {
    kind, rigid: false, sphere: true, V0, Vmax, slackBelow: V0,
    eval(V, out) {
      if (V < V0) return slack(V, V0, 0, S, P, out);
      if (V >= Vmax) { out.p = Infinity; out.dpdV = Infinity; return; }
      const l = Math.cbrt(V / V0);
      membranePressureInto(m, l, s);
      out.p = s.dp;
      out.dpdV = (s.ddp * l) / (3 * V);
    },
    stretch: (V) => Math.cbrt(V / V0),
    volumeAtStretch: (l) => V0 * l * l * l,
    extrema: membraneExtrema(m, V0),
  };
  scanRange.set(law, { lo: 0, hi: V0 * lambdaHigh(m) ** 3 });
  return law;
}

function makeMeasured(points: [number, number][], P: number): WallLaw {
  const n = points.length;
  if (n < 2) throw new Error('measured wall: need at least two points');
  for (let i = 0; i < n; i++) {
    const [V, p] = points[i];
    if (!Number.isFinite(V) || !Number.isFinite(p)) throw new Error(`measured wall: point ${i} is not finite`);
    if (i > 0 && !(V > points[i - 1][0])) throw new Error(`measured wall: volumes must increase strictly (point ${i})`);
  }
  const c: Pchip = makePchip(points.map((q) => q[0]), points.map((q) => q[1]));
  const V1 = c.x[0];
  const p1 = c.y[0];
  const hasSlack = V1 > 0;
  if (hasSlack) {
    if (!(P + p1 > 0)) throw new Error('measured wall: the first point must lie above vacuum');
    // V1 is an interior knot whose left neighbour is vacuum at V = 0.
    c.d[0] = pchipInteriorSlope(V1, (P + p1) / V1, c.x[1] - V1, (c.y[1] - p1) / (c.x[1] - V1));
  }
  const d1 = c.d[0];
  const Vn = c.x[n - 1];
  const pn = c.y[n - 1];
  const dn = c.d[n - 1];
  // Extrema sit at knots where the secants change sign (the slack side counts as rising).
  const extrema: WallLaw['extrema'] = [];
  for (let k = 0; k < n - 1; k++) {
    const left = k === 0 ? (hasSlack ? 1 : 0) : c.y[k] - c.y[k - 1];
    const right = c.y[k + 1] - c.y[k];
    if (left > 0 && right < 0) extrema.push({ V: c.x[k], p: c.y[k], kind: 'max' });
    else if (left < 0 && right > 0) extrema.push({ V: c.x[k], p: c.y[k], kind: 'min' });
  }
  const law: WallLaw = {
    kind: 'measured', rigid: false, sphere: false, V0: V1, Vmax: Infinity, slackBelow: hasSlack ? V1 : 0,
    eval(V, out) {
      if (V >= Vn) { out.p = pn + dn * (V - Vn); out.dpdV = dn; return; }
      if (V >= V1) return pchipEval(c, V, out);
      if (!hasSlack) { out.p = p1 + d1 * (V - V1); out.dpdV = d1; return; }
      if (d1 > 0) return slack(V, V1, p1, d1 * V1, P, out);
      return slackFlat(V, V1, p1, P, out);
    },
    stretch: () => Number.NaN,
    volumeAtStretch: () => Number.NaN,
    extrema,
  };
  scanRange.set(law, { lo: hasSlack ? 0 : Math.max(V1, 0), hi: Vn + (Vn - V1) });
  return law;
}

/**
 * The wall law for a chamber. P is the ambient pressure (Pa absolute), used by the slack regime.
 * Throws only for malformed measured points (the netlist reader validates them first).
 */
export function makeWall(spec: WallSpec, pAmbient: number): WallLaw {
  const P = pAmbient;
  const none = () => Number.NaN;
  switch (spec.law) {
    case 'rigid': {
      const V0 = spec.volume;
      return {
        kind: 'rigid', rigid: true, sphere: false, V0, Vmax: V0, slackBelow: 0, extrema: [],
        eval(_V, out) { out.p = Number.NaN; out.dpdV = Infinity; },
        stretch: none, volumeAtStretch: none,
      };
    }
    case 'linear': {
      const { volume: V0, compliance: C } = spec;
      const law: WallLaw = {
        kind: 'linear', rigid: false, sphere: false, V0, Vmax: Infinity, slackBelow: 0, extrema: [],
        eval(V, out) { out.p = (V - V0) / C; out.dpdV = 1 / C; },
        stretch: none, volumeAtStretch: none,
      };
      scanRange.set(law, { lo: Math.max(0, V0 - P * C), hi: V0 + 20 * P * C });
      return law;
    }
    case 'measured':
      return makeMeasured(spec.points, P);
    default:
      return makeSphere(spec.law, membraneOf(spec) as Membrane, P);
  }
}

/**
 * Whether the gas mass at fixed temperature, ∝ (P + Δp)(V + Vd), increases strictly with V over
 * the wall's range, so that a chamber's volume follows uniquely from its mass: checks
 * (P + Δp) + (V + Vd)·dΔp/dV > 0 on a fine grid. Vd is a rigid dead volume (m³) lumped into the
 * chamber. `at` is the first volume where it fails. Ranges: spheres from 0 to λ = 20 (or the Gent
 * lock, or past the Mooney–Rivlin minimum), linear from vacuum to 20 atmospheres gauge, measured
 * from 0 through the data and one further data span. Rigid walls pass trivially.
 */
export function pvMonotone(law: WallLaw, pAmbient: number, Vd = 0): { ok: boolean; at?: number } {
  const range = scanRange.get(law);
  if (law.rigid || !range) return { ok: true };
  const P = pAmbient;
  const s: WallPoint = { p: 0, dpdV: 0 };
  const test = (V: number): boolean => {
    law.eval(V, s);
    return (P + s.p) + (V + Vd) * s.dpdV > 0;
  };
  // Geometric grid from just above the bottom (where the check degenerates to 0 > 0 for Vd = 0)
  // to the slack volume, then geometric on the elastic part, plus all extrema.
  const { lo, hi } = range;
  const mid = Math.max(law.slackBelow, lo);
  const pts: number[] = [];
  if (mid > lo) {
    const bottom = lo > 0 ? lo : mid * 1e-9;
    const r = Math.pow(mid / bottom, 1 / GRID);
    for (let i = 1; i <= GRID; i++) pts.push(bottom * r ** i);
  }
  const start = mid > 0 ? mid : hi / GRID;
  const r = Math.pow(hi / start, 1 / GRID);
  for (let i = 0; i <= GRID; i++) pts.push(Math.min(start * r ** i, law.Vmax * (1 - 1e-12)));
  for (const e of law.extrema) pts.push(e.V);
  for (const V of pts) if (!test(V)) return { ok: false, at: V };
  return { ok: true };
}
