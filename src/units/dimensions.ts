/**
 * The physical dimensions a netlist field can have, each with its SI unit (the unit every
 * parsed number is expressed in) and an example for hints.
 */
import type { Unit } from 'mathjs';
import { mathUnit } from './math.js';

export type Dimension =
  | 'length'
  | 'area'
  | 'volume'
  | 'pressure'
  | 'time'
  | 'temperature'
  | 'temperature-difference'
  | 'mass'
  | 'mass-flow'
  | 'volume-flow'
  | 'compliance'
  | 'conductance'
  | 'heat-conductance'
  | 'viscosity'
  | 'molar-mass'
  | 'force'
  | 'spring-rate'
  | 'damping'
  | 'velocity'
  | 'angle'
  | 'energy'
  | 'dimensionless';

export interface DimensionInfo {
  /** The SI unit, as mathjs spells it. */
  si: string;
  /** How the SI unit is printed in docs and CSV headers. */
  label: string;
  /** Words for messages: "a length". */
  noun: string;
  /** A typical value, for hints. */
  example: string;
}

export const DIMENSIONS: Record<Dimension, DimensionInfo> = {
  length: { si: 'm', label: 'm', noun: 'a length', example: '4 mm' },
  area: { si: 'm^2', label: 'm²', noun: 'an area', example: '1 mm^2' },
  volume: { si: 'm^3', label: 'm³', noun: 'a volume', example: '0.5 L' },
  pressure: { si: 'Pa', label: 'Pa', noun: 'a pressure', example: '200 kPa' },
  time: { si: 's', label: 's', noun: 'a time', example: '150 ms' },
  temperature: { si: 'K', label: 'K', noun: 'a temperature', example: '20 degC' },
  'temperature-difference': { si: 'K', label: 'K', noun: 'a temperature difference', example: '2 K' },
  mass: { si: 'kg', label: 'kg', noun: 'a mass', example: '2 g' },
  'mass-flow': { si: 'kg/s', label: 'kg/s', noun: 'a mass flow', example: '0.5 g/s' },
  'volume-flow': { si: 'm^3/s', label: 'm³/s', noun: 'a volume flow', example: '10 L/min' },
  compliance: { si: 'm^3/Pa', label: 'm³/Pa', noun: 'a compliance (volume per pressure)', example: '0.1 L/bar' },
  conductance: { si: 'm^3/(s*Pa)', label: 'm³/(s·Pa)', noun: 'a sonic conductance', example: '0.9 L/(s*bar)' },
  'heat-conductance': { si: 'W/K', label: 'W/K', noun: 'a heat conductance (h·A)', example: '2 W/K' },
  viscosity: { si: 'Pa*s', label: 'Pa·s', noun: 'a dynamic viscosity', example: '1.8e-5 Pa*s' },
  'molar-mass': { si: 'kg/mol', label: 'kg/mol', noun: 'a molar mass', example: '28.97 g/mol' },
  force: { si: 'N', label: 'N', noun: 'a force', example: '40 N' },
  'spring-rate': { si: 'N/m', label: 'N/m', noun: 'a spring rate (force per length)', example: '500 N/m' },
  damping: { si: 'N*s/m', label: 'N·s/m', noun: 'a viscous coefficient (force per velocity)', example: '50 N*s/m' },
  velocity: { si: 'm/s', label: 'm/s', noun: 'a velocity', example: '0.5 m/s' },
  angle: { si: 'rad', label: 'rad', noun: 'an angle', example: '90 deg' },
  energy: { si: 'J', label: 'J', noun: 'an energy', example: '2 J' },
  dimensionless: { si: '', label: '-', noun: 'a plain number', example: '0.5' },
};

const siUnits = new Map<Dimension, Unit>();

/** The mathjs unit of a dimension's SI unit (cached); undefined for dimensionless. @internal (mathjs types stay out of the published declarations) */
export function siUnit(dimension: Dimension): Unit | undefined {
  const si = DIMENSIONS[dimension].si;
  if (!si) return undefined;
  let u = siUnits.get(dimension);
  if (!u) {
    u = mathUnit(si);
    siUnits.set(dimension, u);
  }
  return u;
}

/** Base-dimension exponents (mathjs order: mass, length, time, current, temperature, ...). */
export function dimensionVector(dimension: Dimension): number[] {
  return siUnit(dimension)?.dimensions.slice() ?? new Array<number>(9).fill(0);
}

/** The dimension whose base exponents equal `vector`, for messages ("got a pressure"). */
export function nameDimension(vector: readonly number[]): Dimension | undefined {
  const order: Dimension[] = [
    'dimensionless', 'length', 'area', 'volume', 'pressure', 'time', 'temperature', 'mass',
    'mass-flow', 'volume-flow', 'compliance', 'conductance', 'heat-conductance', 'viscosity', 'molar-mass',
    'force', 'spring-rate', 'damping', 'velocity', 'angle', 'energy',
  ];
  return order.find((d) => dimensionVector(d).every((e, i) => Math.abs(e - (vector[i] ?? 0)) < 1e-12));
}
