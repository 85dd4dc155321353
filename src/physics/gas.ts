/**
 * Ideal gases: constants, the built-in gas table and Sutherland viscosity.
 *
 * Units: molar mass kg/mol, R J/(kg·K), cp and cv J/(kg·K), viscosity Pa·s, T K, p Pa absolute.
 *
 * References: CODATA 2018 (R); Sutherland's law with coefficients from White, Viscous Fluid
 * Flow, 3rd ed., Table 1-2 (N2, CO2); ISO 8778 (standard reference atmosphere); ISO 6358-1:2013
 * (ρ0 = 1.185 kg/m³).
 */
import type { GasSpec } from '../netlist/types.js';

/** Molar gas constant, J/(mol·K); exact since the 2019 SI (CODATA 2018). */
export const R_UNIVERSAL = 8.314462618;

/** ISO 8778 standard reference atmosphere ("ANR"): 100 kPa absolute, 20 °C (65 % RH). */
export const ANR = { pressure: 100e3, temperature: 293.15 };

/**
 * Density of air at ANR as defined by ISO 6358-1 (it accounts for the 65 % relative humidity
 * of ISO 8778, hence slightly below dry air's 1.189 kg/m³). A defined constant, from memory.
 */
export const ISO6358_RHO0 = 1.185;

/**
 * Built-in gases. Molar masses from standard atomic weights (air: dry-air handbook value).
 * γ: air and N2 1.4 (diatomic, common practice); He 5/3 (monatomic); CO2 1.289 (Cengel & Boles,
 * Thermodynamics, Table A-2 at 300 K, from memory).
 * Sutherland data: air μref 1.716e-5 Pa·s at 273.15 K, S 110.4 K (common form of White's
 * 1.716e-5 / 273 K / 111 K); N2 1.663e-5 at 273 K, S 107 K and CO2 1.370e-5 at 273 K, S 222 K
 * (White, Viscous Fluid Flow, Table 1-2, p. 28; as quoted in several independent sources);
 * He 1.865e-5 at 273 K, S 79.4 K (not in White's table; common tabulated value, from memory —
 * it gives 1.987e-5 Pa·s at 298.15 K, within 0.3 % of the ab initio 1.983e-5 of Hurly &
 * Moldover, J. Res. NIST 105 (2000) 667, also from memory).
 */
export const GASES: Record<'air' | 'nitrogen' | 'helium' | 'carbon-dioxide', GasSpec> = {
  air: { name: 'air', molarMass: 28.9647e-3, gamma: 1.4, viscosity: { value: 1.716e-5, at: 273.15, sutherland: 110.4 } },
  nitrogen: { name: 'nitrogen', molarMass: 28.0134e-3, gamma: 1.4, viscosity: { value: 1.663e-5, at: 273, sutherland: 107 } },
  helium: { name: 'helium', molarMass: 4.002602e-3, gamma: 5 / 3, viscosity: { value: 1.865e-5, at: 273, sutherland: 79.4 } },
  'carbon-dioxide': { name: 'carbon-dioxide', molarMass: 44.0095e-3, gamma: 1.289, viscosity: { value: 1.370e-5, at: 273, sutherland: 222 } },
};

export interface Gas {
  name: string;
  /** kg/mol */
  molarMass: number;
  /** Specific gas constant, J/(kg·K). */
  R: number;
  gamma: number;
  /** J/(kg·K) */
  cp: number;
  /** J/(kg·K) */
  cv: number;
  /** Dynamic viscosity (Pa·s) at temperature T (K). */
  viscosity(T: number): number;
  /**
   * Factor on an air-rated ISO 6358 flow for this gas (1 for air): the choked mass-flow ratio of
   * this gas to air through one effective area, see `iso6358GasFactor`.
   */
  isoFactor: number;
}

/** ψ(γ) = (2/(γ+1))^((γ+1)/(2(γ−1))), the critical-flow function of an ideal nozzle. */
export function nozzlePsi(gamma: number): number {
  return Math.pow(2 / (gamma + 1), (gamma + 1) / (2 * (gamma - 1)));
}

/**
 * Conversion of an ISO 6358 rating (measured with air) to another gas through the equivalent
 * nozzle: the rating's choked flow of air at the reference state, C·ρ0·p1, is that of an ideal
 * nozzle of effective area A_e = C·ρ0·√(R_air·T0)/(√γ_air·ψ(γ_air)); the other gas flows through
 * the same area with its own γ and R, so its choked mass flow is the air value times
 *   √(γ/R)·ψ(γ) / (√(γ_air/R_air)·ψ(γ_air))       (0.394 for helium, 1.017 for nitrogen).
 * Anderson, Modern Compressible Flow, 3rd ed., ch. 5 (nozzle mass flow); the use of an equivalent
 * nozzle to carry a rating across gases is common practice (from memory, not confirmed against a
 * standard text). The subsonic shape (b, m) is kept as measured with air: a modelling choice
 * (for an ideal nozzle the critical ratio moves with γ, 0.528 for air, 0.487 for helium).
 */
export function iso6358GasFactor(gamma: number, R: number): number {
  const air = GASES.air;
  const Rair = R_UNIVERSAL / air.molarMass;
  return (Math.sqrt(gamma / R) * nozzlePsi(gamma)) / (Math.sqrt(air.gamma / Rair) * nozzlePsi(air.gamma));
}

/** Sutherland: μ(T) = μref (T/Tref)^1.5 (Tref + S)/(T + S). Pa·s, K. */
export function sutherland(T: number, muRef: number, Tref: number, S: number): number {
  const x = T / Tref;
  return muRef * x * Math.sqrt(x) * ((Tref + S) / (T + S));
}

export function makeGas(spec: GasSpec): Gas {
  const R = R_UNIVERSAL / spec.molarMass;
  const cv = R / (spec.gamma - 1);
  const { value, at, sutherland: S } = spec.viscosity;
  return {
    name: spec.name,
    molarMass: spec.molarMass,
    R,
    gamma: spec.gamma,
    cp: spec.gamma * cv,
    cv,
    viscosity: (T: number) => sutherland(T, value, at, S),
    isoFactor: iso6358GasFactor(spec.gamma, R),
  };
}

/**
 * Density at ANR (kg/m³), to turn standard volumetric flows ("L/min ANR") into mass flows.
 * Air: the ISO 6358-1 defined ρ0 (humid reference air). Other gases: ideal gas at ANR.
 */
export function anrDensity(gas: Gas): number {
  if (gas.name === 'air') return ISO6358_RHO0;
  return ANR.pressure / (gas.R * ANR.temperature);
}
