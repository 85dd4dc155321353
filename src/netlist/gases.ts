/**
 * Named gases for the netlist reader: the one table lives in src/physics/gas.ts (with its
 * sources); this module only hands out copies.
 */
import { GASES } from '../physics/gas.js';
import type { GasSpec } from './types.js';

export const NAMED_GASES: Record<string, GasSpec> = GASES;

/** A fresh copy of a named gas (callers may not share the table's objects). */
export function namedGas(name: string): GasSpec | undefined {
  const g = Object.hasOwn(NAMED_GASES, name) ? NAMED_GASES[name] : undefined;
  return g ? { ...g, viscosity: { ...g.viscosity } } : undefined;
}
