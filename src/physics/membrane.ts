/**
 * Inflation pressure of a thin spherical rubber membrane (incompressible, equibiaxial stretch).
 *
 * λ = r/r0 (stretch), t = t0/λ², I1 = 2λ² + λ⁻⁴; Δp is the elastic gauge pressure in Pa.
 *   neo-Hookean:    Δp = 2μ (t0/r0)(λ⁻¹ − λ⁻⁷)
 *   Mooney–Rivlin:  Δp = 4 (t0/r0)(C1 + C2 λ²)(λ⁻¹ − λ⁻⁷)      (μ = 2(C1 + C2))
 *   Gent:           Δp = neo-Hookean / (1 − (I1 − 3)/Jm), finite below the lock stretch
 * μ, C1, C2 in Pa; r0, t0 in m; Jm dimensionless.
 *
 * References: Treloar, The Physics of Rubber Elasticity, 3rd ed. 1975, ch. 10 (inflation of a
 * spherical membrane); Ogden, Non-Linear Elastic Deformations, 1984, §4.3 and §7.2; Gent, Rubber
 * Chem. Technol. 69 (1996) 59.
 */

export type Membrane =
  | { kind: 'neo-hookean'; r0: number; t0: number; mu: number }
  | { kind: 'mooney-rivlin'; r0: number; t0: number; c1: number; c2: number }
  | { kind: 'gent'; r0: number; t0: number; mu: number; jm: number };

export interface MembranePressure {
  /** Elastic gauge pressure Δp, Pa. */
  dp: number;
  /** dΔp/dλ, Pa. */
  ddp: number;
}

/**
 * Lock stretch of the Gent law: the λ > 1 where I1 − 3 = Jm. With u = λ², 2u + u⁻² = 3 + Jm is
 * increasing and convex for u > 1, so Newton from the overestimate u = (3 + Jm)/2 decreases
 * monotonically onto the root.
 */
export function gentLockStretch(Jm: number): number {
  const target = 3 + Jm;
  let u = target / 2;
  for (let i = 0; i < 100; i++) {
    const g = 2 * u + 1 / (u * u) - target;
    const step = g / (2 - 2 / (u * u * u));
    u -= step;
    if (Math.abs(step) <= 1e-16 * u) break;
  }
  return Math.sqrt(u);
}

/** Writes Δp(λ) and dΔp/dλ into out (no allocation). Gent at or past the lock: +Infinity. */
export function membranePressureInto(law: Membrane, lambda: number, out: MembranePressure): MembranePressure {
  const k = law.t0 / law.r0;
  const l2 = lambda * lambda;
  const im1 = 1 / lambda;
  const im2 = im1 * im1;
  const im7 = im2 * im2 * im2 * im1; // multiplications: `** 7` is a Math.pow call in the hot path
  const g = im1 - im7;                 // λ⁻¹ − λ⁻⁷
  const dg = -im1 * im1 + 7 * im7 * im1; // −λ⁻² + 7λ⁻⁸
  switch (law.kind) {
    case 'neo-hookean':
      out.dp = 2 * law.mu * k * g;
      out.ddp = 2 * law.mu * k * dg;
      break;
    case 'mooney-rivlin': {
      const a = law.c1 + law.c2 * l2;
      out.dp = 4 * k * a * g;
      out.ddp = 4 * k * (2 * law.c2 * lambda * g + a * dg);
      break;
    }
    case 'gent': {
      const D = 1 - (2 * l2 + 1 / (l2 * l2) - 3) / law.jm;
      if (!(D > 0)) {
        out.dp = Infinity;
        out.ddp = Infinity;
        break;
      }
      const dD = -(4 * lambda - 4 * im2 * im2 * im1) / law.jm;
      const nh = 2 * law.mu * k * g;
      const dnh = 2 * law.mu * k * dg;
      out.dp = nh / D;
      out.ddp = dnh / D - (nh * dD) / (D * D);
      break;
    }
  }
  return out;
}

/** Δp (Pa) and dΔp/dλ (Pa) at stretch λ ≥ 1. */
export function membranePressure(law: Membrane, lambda: number): MembranePressure {
  return membranePressureInto(law, lambda, { dp: 0, ddp: 0 });
}
