/**
 * Energy balance of a uniform ideal gas in an open control volume with a moving boundary
 * (kinetic energy of the gas neglected), Cengel & Boles, Thermodynamics, unsteady-flow
 * processes:
 *   d(m·cv·T)/dt = Σ_in ṁ·cp·T_in − Σ_out ṁ·cp·T − p·dV/dt + hA·(Ta − T)
 * The volume may move for two reasons: a wall that yields to the gas (a chamber, V = V(m, T),
 * with dV = κ·(R·T·dm + m·R·dT), κ = 1/(p + (V + Vd)·dp/dV); see elements/chamber.ts) and a
 * boundary driven from outside at the rate V̇ (a piston: V̇ = A·ẋ). Solving for Ṫ:
 *   Ṫ·(m·cv + p·κ·m·R) = cp·H_in − cv·T·ṁ_in − R·T·ṁ_out + hA(Ta − T) − p·V̇ − p·κ·R·T·ṁ_net
 * where ṁ_in, ṁ_out are the direction-split flows (kg/s) and H_in = Σ_in ṁ·T_in (kg·K/s).
 * κ = 0 and V̇ = 0 is a rigid vessel; κ = 0 with V̇ = A·ẋ a cylinder chamber.
 *
 * Units: kg, K, Pa absolute, m³/s, W/K, J/(kg·K).
 */

export interface GasConstants {
  R: number;
  cp: number;
  cv: number;
}

/** The boundary terms of one evaluation: direction-split flows and heat exchange. */
export interface EnergyInflow {
  /** Σ of entering mass flows, kg/s. */
  mIn: number;
  /** Σ of leaving mass flows, kg/s. */
  mOut: number;
  /** Σ ṁ·T_in over entering flows, kg·K/s. */
  hIn: number;
  /** h·A to the surroundings, W/K (0: adiabatic). */
  hA: number;
  /** Temperature of the surroundings, K. */
  Ta: number;
}

/**
 * Ṫ (K/s) of gas of mass m at temperature T and pressure p, with wall factor κ (0 for a
 * volume that does not yield to the gas) and a volume rate V̇ imposed from outside.
 */
export function gasTemperatureRate(gas: GasConstants, m: number, T: number, p: number, kappa: number, Vdot: number, f: EnergyInflow): number {
  const { R, cv, cp } = gas;
  const net = f.mIn - f.mOut;
  const A = cp * f.hIn - cv * T * f.mIn - R * T * f.mOut + f.hA * (f.Ta - T);
  return (A - p * Vdot - p * kappa * R * T * net) / (m * cv + p * kappa * m * R);
}
