/**
 * plenum's mathjs: its unit class (for every value with a unit) and, only when a netlist holds
 * an expression, its expression parser.
 *
 * The unit class is mathjs's own (`createUnitClass`: its parser, unit tables, prefixes and
 * conversions), given plain number arithmetic instead of mathjs's typed functions. A full
 * mathjs instance builds some thirty typed functions (for numbers, BigNumbers, fractions and
 * complex numbers) the first time its unit class is used: 70–90 ms of every `plenum run`,
 * twice when the run has a worker thread, for values that are only ever plain numbers here.
 * The expression parser needs a full instance; it is created on first use.
 *
 * Kept in a single module so that the bundled CLI pulls in (and tree-shakes) mathjs once.
 * Nothing here ever evaluates an expression: `parse` only builds a syntax tree, which
 * `expression.ts` checks against a whitelist and compiles into a plain closure.
 */
import { create, createUnitClass, parseDependencies } from 'mathjs';
import type { MathNode, Unit, UnitCtor } from 'mathjs';

declare module 'mathjs' {
  /** mathjs's factory of its Unit class (exported by mathjs, missing from its typings). */
  export const createUnitClass: (dependencies: Record<string, unknown>) => UnitCtor;
}

/** Units missing from mathjs 15 (conventional values at 4 °C water / 0 °C mercury, from memory). */
const EXTRA_UNITS: [string, string][] = [
  ['inH2O', '249.08891 Pa'],
  ['inHg', '3386.389 Pa'],
];

/** What mathjs keeps for each unit name (its typings call it `Unit`, which it is not). */
export interface UnitDefinition {
  name: string;
  value: number;
  offset: number;
  prefixes: Record<string, { name: string; value: number }>;
}

/** mathjs's default tolerances for `equal` (mathjs 15 configuration defaults). */
const REL_TOL = 1e-12;
const ABS_TOL = 1e-15;

/** mathjs `equal` on numbers: nearly equal within the relative and absolute tolerances. */
function nearlyEqual(a: number, b: number): boolean {
  if (!Number.isFinite(a) || !Number.isFinite(b)) return a === b;
  if (a === b) return true;
  return Math.abs(a - b) <= Math.max(REL_TOL * Math.max(Math.abs(a), Math.abs(b)), ABS_TOL);
}

/** mathjs `round` on numbers: half away from zero, to `n` decimals. */
function roundNumber(x: number, n = 0): number {
  const f = 10 ** n;
  return (Math.sign(x) * Math.round(Math.abs(x) * f)) / f;
}

/** Never constructed: with `number: 'number'` mathjs keeps values as plain numbers. */
class NotUsed {}

/**
 * Stands in for mathjs's Fraction, which its unit tables use for the Fahrenheit and Rankine
 * scales (`new Fraction(5, 9)`): a Number object, which plain arithmetic reads as 5/9.
 */
function FractionAsNumber(n: number, d = 1): object {
  return Object(n / d) as object;
}

const UnitClass: UnitCtor = createUnitClass({
  config: { number: 'number', precision: 64, predictable: false, relTol: REL_TOL, absTol: ABS_TOL },
  addScalar: (a: number, b: number) => a + b,
  subtractScalar: (a: number, b: number) => a - b,
  multiplyScalar: (a: number, b: number) => a * b,
  divideScalar: (a: number, b: number) => a / b,
  pow: Math.pow,
  abs: Math.abs,
  fix: Math.trunc,
  round: roundNumber,
  equal: nearlyEqual,
  isNumeric: (x: unknown) => typeof x === 'number' || typeof x === 'boolean',
  format: (x: number) => String(x),
  number: (x: unknown) => Number(x),
  Complex: NotUsed,
  BigNumber: NotUsed,
  Fraction: FractionAsNumber,
});
for (const [name, definition] of EXTRA_UNITS) {
  if (!UnitClass.isValuelessUnit(name)) UnitClass.createUnitSingle(name, definition);
}

/** mathjs `unit(text)`: a number with units; throws SyntaxError on bad input. */
export function mathUnit(text: string): Unit {
  // the string case of mathjs's `unit` function
  if (UnitClass.isValuelessUnit(text)) return new UnitClass(null as unknown as number, text);
  return (UnitClass.parse as (s: string, o: { allowNoUnits: boolean }) => Unit)(text, { allowNoUnits: true });
}

let parser: ((text: string) => MathNode) | undefined;

/** mathjs `parse(text)`: a syntax tree, never evaluated; throws SyntaxError on bad input. */
export function mathParse(text: string): MathNode {
  parser ??= create({ parseDependencies }).parse;
  return parser(text);
}

/** True when `name` (with any prefix) is a unit mathjs knows, e.g. `kPa`. */
export function isUnitName(name: string): boolean {
  return UnitClass.isValuelessUnit(name);
}

/** Every unit definition by name (for suggestions). */
export function unitDefinitions(): Record<string, UnitDefinition> {
  return UnitClass.UNITS as unknown as Record<string, UnitDefinition>;
}
