/**
 * The one mathjs instance of plenum, holding only the unit parser and the expression parser.
 *
 * Kept in a single module so that the bundled CLI pulls in (and tree-shakes) mathjs once.
 * Nothing here ever evaluates an expression: `parse` only builds a syntax tree, which
 * `expression.ts` checks against a whitelist and compiles into a plain closure.
 */
import { create, createUnitDependencies, parseDependencies, unitDependencies } from 'mathjs';
import type { MathNode, Unit } from 'mathjs';

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

const math = create({ unitDependencies, parseDependencies, createUnitDependencies });
for (const [name, definition] of EXTRA_UNITS) {
  if (!math.Unit.isValuelessUnit(name)) math.createUnit(name, definition);
}

/** mathjs `unit(text)`: a number with units; throws SyntaxError on bad input. */
export function mathUnit(text: string): Unit {
  return math.unit(text);
}

/** mathjs `parse(text)`: a syntax tree, never evaluated; throws SyntaxError on bad input. */
export function mathParse(text: string): MathNode {
  return math.parse(text);
}

/** True when `name` (with any prefix) is a unit mathjs knows, e.g. `kPa`. */
export function isUnitName(name: string): boolean {
  return math.Unit.isValuelessUnit(name);
}

/** Every unit definition by name (for suggestions). */
export function unitDefinitions(): Record<string, UnitDefinition> {
  return math.Unit.UNITS as unknown as Record<string, UnitDefinition>;
}
