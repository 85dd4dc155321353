/**
 * The volume of an elastic chamber from the gas it holds.
 *
 * A node holds gas mass m at temperature T in its wall volume V plus a rigid dead volume Vd
 * (tubing lumped into it). The wall law gives the gauge pressure Δp(V), so V solves
 *   F(V) = (pa + Δp(V))·(V + Vd) − m·R·T = 0.
 * F' = p + (V + Vd)·dΔp/dV. When F' > 0 over the wall's range (checked at build time, see
 * `model/build.ts`) F is strictly increasing and the root is unique, even on the falling branch
 * of a balloon curve past its pressure maximum: there the pressure falls but p·V still rises.
 * The slack law of a sphere (physics/wall.ts) sends p to vacuum as V → 0, so F(0) = −mRT ≤ 0
 * brackets the root from below.
 *
 * References: safeguarded Newton–bisection, Press et al., Numerical Recipes, 3rd ed., §9.4 (rtsafe).
 */
import type { WallLaw } from '../physics/wall.js';

const MAX_ITER = 200;

export interface VolumeScratch { p: number; dpdV: number }

/** Lowest wall volume of the law's range: where the absolute pressure reaches vacuum. */
export function vacuumVolume(wall: WallLaw, pa: number): number {
  if (wall.rigid) return wall.V0;
  if (wall.kind === 'linear') {
    const s: VolumeScratch = { p: 0, dpdV: 0 };
    wall.eval(wall.V0, s);
    return Math.max(0, wall.V0 - pa / s.dpdV);
  }
  return 0;
}

/**
 * Solves F(V) = 0 for V. `guess` is a warm start (the previous solution); `lo` is the vacuum
 * volume of the law. Returns NaN when no root exists in the law's range (mass beyond a Gent
 * lock, negative mass), so that callers can report a numerical fault instead of throwing.
 */
export function solveVolume(
  wall: WallLaw, pa: number, Vd: number, mRT: number, guess: number, lo: number, s: VolumeScratch,
): number {
  const F = (V: number): number => {
    wall.eval(V, s);
    return (pa + s.p) * (V + Vd) - mRT;
  };
  if (!(mRT >= 0) || !Number.isFinite(mRT)) return Number.NaN;
  let a = lo;
  let b: number;
  if (Number.isFinite(wall.Vmax)) {
    b = wall.Vmax * (1 - 1e-14);
    if (F(b) < 0) return Number.NaN;
  } else {
    b = Math.max(guess, wall.V0, lo) * 2 + 1e-12;
    let k = 0;
    while (F(b) < 0) {
      a = b;
      b *= 2;
      if (++k > 200) return Number.NaN;
    }
  }
  let V = guess > a && guess < b ? guess : 0.5 * (a + b);
  for (let i = 0; i < MAX_ITER; i++) {
    const f = F(V);
    if (f === 0) return V;
    if (f < 0) a = V; else b = V;
    const d = s.dpdV * (V + Vd) + (pa + s.p);
    let next = V - f / d;
    // Converged: a Newton step at round-off level. Tested before the bracket safeguard, which a
    // step at round-off can leave (the bracket's ends are then round-off close to the root) and
    // whose bisection would otherwise wander the whole bracket before stopping.
    if (Math.abs(next - V) <= 1e-14 * (V + Vd) + 1e-300) return next > a && next < b ? next : V;
    if (!(next > a && next < b) || !Number.isFinite(next)) next = 0.5 * (a + b);
    if (Math.abs(next - V) <= 1e-14 * (V + Vd) + 1e-300) return next;
    V = next;
    if (b - a <= 1e-15 * (b + Vd)) return V;
  }
  return V;
}
