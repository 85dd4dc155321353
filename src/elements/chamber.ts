/**
 * Chamber: gas mass m (kg) is the state, plus temperature T (K) when heat is not isothermal,
 * plus a hysteresis blend h (0..1) for a measured wall with a deflation curve.
 *
 * Energy balance of an open control volume with a moving wall (ideal gas, uniform state,
 * kinetic energy neglected), Cengel & Boles, Thermodynamics, unsteady-flow processes:
 *   d(m·cv·T)/dt = Σ_in ṁ·cp·T_in − Σ_out ṁ·cp·T − p·dV/dt + hA·(Ta − T)
 * With V = V(m, T) from p(V)·(V + Vd) = m·R·T:
 *   dV = κ·(R·T·dm + m·R·dT),  κ = 1/(p + (V + Vd)·dp/dV)   (κ = 0 for a rigid wall)
 * which gives the explicit form used here:
 *   Ṫ·(m·cv + p·κ·m·R) = Σ_in ṁ(cp·T_in − cv·T) − Σ_out ṁ·R·T + hA(Ta − T) − p·κ·R·T·ṁ_net.
 *
 * Hysteresis (measured wall with both curves): Δp = Δp_defl(V) + h·(Δp_infl(V) − Δp_defl(V)),
 * with a Duhem-type rate-independent blend dh/dt = (|ṁ|/Δm_h)·(target − h), target 1 while the
 * chamber gains gas and 0 while it loses it; Δm_h is 5 % of the gas the chamber holds at the
 * top of its inflation curve at ambient temperature. Reference: Visintin, Differential Models
 * of Hysteresis, Springer 1994, ch. 4 (Duhem model).
 */
import type { Gas } from '../physics/gas.js';
import type { WallLaw } from '../physics/wall.js';
import type { ChamberModel } from '../model/types.js';
import { solveVolume, vacuumVolume, type VolumeScratch } from '../model/volume.js';

/** Newton iterations tried from the warm start before handing over to the safeguarded solver. */
const WARM_NEWTON_ITER = 6;
/** Relative step at which the warm-started Newton iteration stops. */
const WARM_NEWTON_TOL = 1e-12;

/** A measured wall blended between its inflation and deflation curves by h. */
export function hysteresisWall(inflation: WallLaw, deflation: WallLaw): WallLaw & { h: number } {
  const a: VolumeScratch = { p: 0, dpdV: 0 };
  const b: VolumeScratch = { p: 0, dpdV: 0 };
  // Inherit everything else (range, stretch, extrema) from the inflation branch.
  const w = Object.create(inflation) as WallLaw & { h: number };
  w.h = 1;
  w.eval = (V: number, out: { p: number; dpdV: number }): void => {
    inflation.eval(V, a);
    deflation.eval(V, b);
    out.p = b.p + w.h * (a.p - b.p);
    out.dpdV = b.dpdV + w.h * (a.dpdV - b.dpdV);
  };
  return w;
}

/** ∂p/∂m (Pa/kg), ∂p/∂T (Pa/K) and ∂p/∂h (Pa) of a chamber's pressure in its own states. */
export interface PressurePartials { dm: number; dT: number; dh: number }

export class ChamberState {
  readonly wall: WallLaw & { h?: number };
  readonly lo: number;
  readonly scratch: VolumeScratch = { p: 0, dpdV: 0 };
  /** Last solved wall volume: warm start for the next solve. */
  Vguess: number;
  /** Mass scale of the hysteresis transition, kg. */
  readonly dmHyst: number;
  private readonly probe: VolumeScratch = { p: 0, dpdV: 0 };
  private readonly probe2: VolumeScratch = { p: 0, dpdV: 0 };

  constructor(readonly c: ChamberModel, readonly gas: Gas, readonly pa: number) {
    this.wall = c.deflation ? hysteresisWall(c.wall, c.deflation) : c.wall;
    this.lo = vacuumVolume(c.wall, pa);
    this.Vguess = c.V0;
    let dm = 0;
    if (c.deflation) {
      const s: VolumeScratch = { p: 0, dpdV: 0 };
      const top = c.spec.wall.law === 'measured' ? c.spec.wall.points[c.spec.wall.points.length - 1][0] : c.V0;
      c.wall.eval(top, s);
      dm = (0.05 * (pa + s.p) * (top + c.deadVolume)) / (gas.R * c.T0);
    }
    this.dmHyst = dm;
  }

  /**
   * Pressure (Pa abs), wall volume (m³) and κ = ∂V/∂(pV_gas) for mass m, temperature T and
   * hysteresis blend h. Writes into out; NaN pressure when the state is outside the law.
   */
  solve(m: number, T: number, h: number, out: { p: number; V: number; kappa: number }): void {
    this.inM = m;
    this.inT = T;
    this.inH = h;
    this.solveInputs(out);
  }

  /**
   * Inputs of `solveInputs` (mass, temperature, blend) and the warm Newton's mRT and result. The
   * hot path sets them as fields rather than passing doubles to calls V8 may not inline, which
   * would box each one (docs/dev-performance.md).
   */
  protected inM = Number.NaN;
  protected inT = Number.NaN;
  protected inH = Number.NaN;
  private warmRT = Number.NaN;
  private warmV = Number.NaN;

  /** `solve` of the state in inM, inT, inH. */
  protected solveInputs(out: { p: number; V: number; kappa: number }): void {
    const m = this.inM, T = this.inT, h = this.inH;
    const c = this.c;
    if (c.wall.rigid) {
      out.V = c.wall.V0;
      out.p = (m * this.gas.R * T) / (c.wall.V0 + c.deadVolume);
      out.kappa = 0;
      return;
    }
    if (this.wall.h !== undefined) this.wall.h = Math.min(1, Math.max(0, h));
    const mRT = m * this.gas.R * T;
    this.warmRT = mRT;
    let V = this.warmNewton() ? this.warmV : Number.NaN;
    if (Number.isNaN(V)) V = solveVolume(this.wall, this.pa, c.deadVolume, mRT, this.Vguess, this.lo, this.scratch);
    if (!Number.isFinite(V)) {
      out.V = Number.NaN; out.p = Number.NaN; out.kappa = Number.NaN;
      return;
    }
    this.wall.eval(V, this.scratch);
    this.Vguess = V;
    out.V = V;
    out.p = this.pa + this.scratch.p;
    out.kappa = 1 / (out.p + (V + c.deadVolume) * this.scratch.dpdV);
  }

  /**
   * The volume for mRT by plain Newton from the last solution, the common case inside an
   * integration (the state moves little between evaluations): F(V) = (pa + Δp(V))(V + Vd) − mRT
   * is strictly increasing (checked at build), so a converging Newton sequence has found the one
   * root, and from a nearby start it converges quadratically. Stops once a step is below 1e-12 of
   * the volume (even at a kink of a C¹ law the error is then at round-off); the volume goes to
   * warmV. Returns false at any sign of trouble (a step
   * leaving the law's range, a non-positive slope, slow convergence): the caller then runs the
   * safeguarded solver (model/volume.ts), which also decides when no root exists.
   *
   * References: Press et al., Numerical Recipes, 3rd ed., §9.4 (Newton–Raphson, quadratic
   * convergence near a simple root).
   */
  private warmNewton(): boolean {
    const { wall, pa, lo, scratch: s } = this;
    const mRT = this.warmRT;
    const Vd = this.c.deadVolume;
    const Vmax = wall.Vmax;
    let V = this.Vguess;
    if (!(V > lo && V < Vmax) || !(mRT >= 0)) return false;
    for (let i = 0; i < WARM_NEWTON_ITER; i++) {
      wall.eval(V, s);
      const f = (pa + s.p) * (V + Vd) - mRT;
      if (f === 0) { this.warmV = V; return true; }
      const d = s.dpdV * (V + Vd) + (pa + s.p);
      if (!(d > 0)) return false;
      const next = V - f / d;
      if (!(next > lo && next < Vmax)) return false;
      if (Math.abs(next - V) <= WARM_NEWTON_TOL * (V + Vd)) { this.warmV = next; return true; }
      V = next;
    }
    return false;
  }

  /**
   * Partial derivatives of the pressure in m, T and h at a solved state (V, p, κ from `solve`).
   * From p(V)·(V + Vd) = m·R·T: dV = κ·(R·T·dm + m·R·dT), so ∂p/∂m = p′·κ·R·T and
   * ∂p/∂T = p′·κ·m·R (p′ = dΔp/dV); a rigid wall gives R·T/(V + Vd) and m·R/(V + Vd). For the
   * hysteresis blend at fixed m and T, ∂p/∂h = p·κ·(Δp_infl(V) − Δp_defl(V)) inside [0, 1].
   */
  pressurePartials(m: number, T: number, h: number, V: number, p: number, kappa: number, out: PressurePartials): void {
    const c = this.c;
    const R = this.gas.R;
    if (c.wall.rigid) {
      const Vg = c.wall.V0 + c.deadVolume;
      out.dm = (R * T) / Vg;
      out.dT = (m * R) / Vg;
      out.dh = 0;
      return;
    }
    if (this.wall.h !== undefined) this.wall.h = Math.min(1, Math.max(0, h));
    this.wall.eval(V, this.probe);
    const slope = this.probe.dpdV;
    out.dm = slope * kappa * R * T;
    out.dT = slope * kappa * m * R;
    if (c.deflation && h >= 0 && h <= 1) { // the blend is clamped to [0, 1]: flat outside
      c.wall.eval(V, this.probe);
      c.deflation.eval(V, this.probe2);
      out.dh = p * kappa * (this.probe.p - this.probe2.p);
    } else {
      out.dh = 0;
    }
  }

  /**
   * `solve` at a nearby trial state (for local difference quotients) without disturbing the
   * warm start or the hysteresis blend of the state the chamber is tracking.
   */
  solveAside(m: number, T: number, h: number, out: { p: number; V: number; kappa: number }): void {
    const guess = this.Vguess;
    const blend = this.wall.h;
    this.solve(m, T, h, out);
    this.Vguess = guess;
    if (blend !== undefined) this.wall.h = blend;
  }
}
