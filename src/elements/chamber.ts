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

export class ChamberState {
  readonly wall: WallLaw & { h?: number };
  readonly lo: number;
  readonly scratch: VolumeScratch = { p: 0, dpdV: 0 };
  /** Last solved wall volume: warm start for the next solve. */
  Vguess: number;
  /** Mass scale of the hysteresis transition, kg. */
  readonly dmHyst: number;

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
    const c = this.c;
    if (c.wall.rigid) {
      out.V = c.wall.V0;
      out.p = (m * this.gas.R * T) / (c.wall.V0 + c.deadVolume);
      out.kappa = 0;
      return;
    }
    if (this.wall.h !== undefined) this.wall.h = Math.min(1, Math.max(0, h));
    const V = solveVolume(this.wall, this.pa, c.deadVolume, m * this.gas.R * T, this.Vguess, this.lo, this.scratch);
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
}
