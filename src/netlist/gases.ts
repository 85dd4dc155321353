/**
 * Named gases: molar mass, ratio of specific heats and Sutherland viscosity data.
 *
 * References: F. M. White, Viscous Fluid Flow, Table 1-2 (Sutherland constants and reference
 * viscosities), from memory; molar masses are standard atomic-weight sums (from memory;
 * dry air 28.9647 g/mol is the handbook value). src/physics/gas.ts carries the same numbers;
 * the two are to be reconciled into one table.
 */
import type { GasSpec } from './types.js';

export const NAMED_GASES: Record<string, GasSpec> = {
  air: { name: 'air', molarMass: 28.9647e-3, gamma: 1.4, viscosity: { value: 1.716e-5, at: 273.15, sutherland: 110.4 } },
  nitrogen: { name: 'nitrogen', molarMass: 28.0134e-3, gamma: 1.4, viscosity: { value: 1.663e-5, at: 273.15, sutherland: 107 } },
  helium: { name: 'helium', molarMass: 4.0026e-3, gamma: 1.667, viscosity: { value: 1.87e-5, at: 273.15, sutherland: 79.4 } },
  'carbon-dioxide': { name: 'carbon-dioxide', molarMass: 44.0095e-3, gamma: 1.289, viscosity: { value: 1.37e-5, at: 273.15, sutherland: 222 } },
};

/** A fresh copy of a named gas (callers may not share the table's objects). */
export function namedGas(name: string): GasSpec | undefined {
  const g = NAMED_GASES[name];
  return g ? { ...g, viscosity: { ...g.viscosity } } : undefined;
}
