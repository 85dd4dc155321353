/**
 * Unit-bearing values → SI numbers.
 *
 * A value is a number with a unit in a string (`"4 mm"`, `"0.9 L/(s*bar)"`) or a bare number,
 * which means SI. Strings go through mathjs `unit()` (never `evaluate`, where `min` is a
 * function and `5 L/min` would fail) and are checked for dimension with `equalBase`.
 */
import type { Unit } from 'mathjs';
import { mathUnit } from './math.js';
import { DIMENSIONS, nameDimension, siUnit, type Dimension } from './dimensions.js';
import { unknownUnitHint, unknownUnitToken } from './unit-hint.js';

export type ValueErrorCode =
  | 'unit-syntax'
  | 'unit-unknown'
  | 'unit-dimension'
  | 'not-finite'
  | 'out-of-range'
  | 'wrong-type'
  | 'pressure-reference'
  | 'expression-syntax'
  | 'expression-forbidden'
  | 'expression-dimension'
  | 'too-deep';

export type ValueError = { ok: false; code: ValueErrorCode; message: string; hint: string };
export type QuantityResult = { ok: true; value: number } | ValueError;

/** Longer strings are not values; refusing them keeps mathjs away from pathological input. */
const MAX_VALUE_LENGTH = 200;

/**
 * The magnitudes plenum accepts for a non-zero value of each dimension, SI. Far outside them
 * a value is a slip (a unit, an exponent) and the numerics would under- or overflow long
 * before the physics means anything; the limits are wide enough for any pneumatic rig, from
 * micro-valves to plant networks. Dimensionless numbers are bounded field by field instead.
 */
export const PLAUSIBLE: Partial<Record<Dimension, { lo: number; hi: number; shown: string }>> = {
  length: { lo: 1e-9, hi: 1e5, shown: '1 nm to 100 km' },
  area: { lo: 1e-18, hi: 1e10, shown: '1e-18 to 1e10 m²' },
  volume: { lo: 1e-15, hi: 1e6, shown: '1e-15 m³ (1 pL) to 1e6 m³' },
  // no lower bound: a tiny gauge or absolute pressure is simply near ambient or vacuum
  pressure: { lo: 0, hi: 1e12, shown: 'up to 1e12 Pa' },
  time: { lo: 1e-12, hi: 1e9, shown: '1 ps to 1e9 s (about 32 years)' },
  temperature: { lo: 1, hi: 1e5, shown: '1 K to 1e5 K' },
  'temperature-difference': { lo: 1e-9, hi: 1e5, shown: '1e-9 K to 1e5 K' },
  mass: { lo: 1e-18, hi: 1e9, shown: '1e-18 kg to 1e9 kg' },
  'mass-flow': { lo: 1e-18, hi: 1e6, shown: '1e-18 kg/s to 1e6 kg/s' },
  'volume-flow': { lo: 1e-18, hi: 1e6, shown: '1e-18 m³/s to 1e6 m³/s' },
  compliance: { lo: 1e-24, hi: 1e3, shown: '1e-24 m³/Pa to 1e3 m³/Pa' },
  conductance: { lo: 1e-24, hi: 1e3, shown: '1e-24 to 1e3 m³/(s·Pa)' },
  'heat-conductance': { lo: 1e-12, hi: 1e9, shown: '1e-12 W/K to 1e9 W/K' },
  viscosity: { lo: 1e-9, hi: 1e3, shown: '1e-9 Pa·s to 1e3 Pa·s' },
  'molar-mass': { lo: 1e-4, hi: 10, shown: '0.1 g/mol to 10 kg/mol' },
  force: { lo: 1e-9, hi: 1e9, shown: '1 nN to 1 GN' },
  'spring-rate': { lo: 1e-6, hi: 1e12, shown: '1e-6 N/m to 1e12 N/m' },
  damping: { lo: 1e-9, hi: 1e9, shown: '1e-9 N·s/m to 1e9 N·s/m' },
  velocity: { lo: 1e-12, hi: 1e4, shown: '1e-12 m/s to 1e4 m/s' },
  energy: { lo: 1e-12, hi: 1e12, shown: '1e-12 J to 1e12 J' },
};

/** `NaN kPa`, `Infinity m`, `-inf`: spelled-out non-numbers, which mathjs would call unknown units. */
const NON_NUMBER = /^[-+]?(?:nan|inf(?:inity)?)(?![A-Za-z0-9_])/i;

/** Friendly spellings mathjs does not read, mapped to ones it does. */
const SPELLINGS: [RegExp, string][] = [
  [/°\s*C\b|℃/g, 'degC'],
  [/°\s*F\b|℉/g, 'degF'],
  [/[µμ]/g, 'u'],
  [/²/g, '^2'],
  [/³/g, '^3'],
  [/·/g, '*'],
];

export function fail(code: ValueErrorCode, message: string, hint: string): ValueError {
  return { ok: false, code, message, hint };
}

/** Rewrites `°C`, `µm`, `m³` and `Pa·s` into what mathjs reads. */
export function normaliseSpelling(text: string): string {
  let s = text.trim();
  for (const [re, to] of SPELLINGS) s = s.replace(re, to);
  return s;
}

function describe(u: Unit): string {
  const d = nameDimension(u.dimensions);
  return d ? DIMENSIONS[d].noun : `\`${u.formatUnits()}\``;
}

function exampleHint(dimension: Dimension): string {
  const info = DIMENSIONS[dimension];
  if (dimension === 'dimensionless') return `write a plain number such as \`${info.example}\``;
  return `write ${info.noun} with its unit, e.g. \`${info.example}\` (a bare number means ${info.label})`;
}

/** mathjs `unit()` with errors turned into values. @internal (mathjs types stay out of the published declarations) */
export function readUnit(text: string): { ok: true; unit: Unit } | ValueError {
  const s = normaliseSpelling(text);
  if (!s) return fail('unit-syntax', 'the value is empty', 'write a number with its unit, e.g. `4 mm`');
  if (s.length > MAX_VALUE_LENGTH) return fail('unit-syntax', `the value is ${s.length} characters long`, 'write a number with its unit, e.g. `4 mm`');
  if (NON_NUMBER.test(s)) return fail('not-finite', `\`${text.trim()}\` is not a finite number`, 'write a finite value (NaN and infinity are not values)');
  try {
    const unit = mathUnit(s);
    if (unit.value === null || unit.value === undefined) {
      return fail('unit-syntax', `\`${text}\` has no number`, 'write the number before the unit, e.g. `4 mm`');
    }
    return { ok: true, unit };
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    const token = unknownUnitToken(message);
    if (token !== undefined) {
      return fail('unit-unknown', `unknown unit \`${token}\` in \`${text}\``, unknownUnitHint(token) ?? 'write a unit mathjs knows, e.g. `mm`, `kPa`, `L/min`, `degC`');
    }
    return fail('unit-syntax', `cannot read \`${text}\` as a number with a unit`, 'write a number, a space and a unit, e.g. `4 mm` or `0.9 L/(s*bar)`');
  }
}

function checkFinite(value: number, text: string): QuantityResult {
  if (Number.isFinite(value)) return { ok: true, value };
  return fail('not-finite', `\`${text}\` is not a finite number`, 'write a finite value (.nan and .inf are not values)');
}

/** A number for messages: six significant digits, no round-off tail (-26.850000000000023 → -26.85). */
function shownNumber(x: number): string {
  return String(Number(x.toPrecision(6)));
}

/** Refuses a non-zero value whose magnitude lies outside PLAUSIBLE for its dimension. */
function checkPlausible(value: number, dimension: Dimension, text: string): QuantityResult {
  const range = PLAUSIBLE[dimension];
  const size = Math.abs(value);
  if (!range || value === 0 || (size >= range.lo && size <= range.hi)) return { ok: true, value };
  const unit = DIMENSIONS[dimension].label;
  return fail('out-of-range', `\`${text.trim()}\` (${value.toExponential(2)} ${unit}) is outside the range plenum accepts for ${DIMENSIONS[dimension].noun}: ${range.shown}`,
    size < range.lo ? 'check the unit prefix and the exponent; the value is far too small to simulate' : 'check the unit prefix and the exponent; the value is far too large to simulate');
}

function fromBareNumber(value: number, dimension: Dimension, text: string): QuantityResult {
  const r = checkFinite(value, text);
  if (!r.ok) return r;
  if (dimension === 'temperature' && !(r.value > 0)) {
    return fail('out-of-range', `${shownNumber(r.value)} K is not above absolute zero`, 'a temperature must be above 0 K, e.g. `20 degC` or `293.15 K`');
  }
  return checkPlausible(r.value, dimension, text);
}

/**
 * Reads `text` as a quantity of `dimension` and returns it in SI. A bare number (or a string
 * holding only a number) is taken as SI. Temperatures must be above 0 K; a
 * `temperature-difference` ignores the offset of degC/degF (`2 degC` → 2 K).
 */
export function parseQuantity(text: string | number, dimension: Dimension): QuantityResult {
  if (typeof text !== 'string') return parseQuantityOnce(text, dimension);
  // A pure function of (text, dimension), memoised: large netlists repeat their values, and a
  // mathjs unit parse costs some 10 µs (70 000 values in a 10 000-chamber netlist).
  const key = `${dimension}\u0000${text}`;
  let r = quantityMemo.get(key);
  if (!r) {
    r = parseQuantityOnce(text, dimension);
    if (quantityMemo.size >= QUANTITY_MEMO_LIMIT) quantityMemo.clear();
    quantityMemo.set(key, r);
  }
  return { ...r };
}

const quantityMemo = new Map<string, QuantityResult>();
const QUANTITY_MEMO_LIMIT = 20_000;

function parseQuantityOnce(text: string | number, dimension: Dimension): QuantityResult {
  if (typeof text === 'number') return fromBareNumber(text, dimension, String(text));
  if (typeof text !== 'string') return fail('wrong-type', `expected ${DIMENSIONS[dimension].noun}, got ${typeof text}`, exampleHint(dimension));
  const read = readUnit(text);
  if (!read.ok) return read;
  const u = read.unit;
  if (u.units.length === 0) return fromBareNumber(u.value, dimension, text);
  const si = siUnit(dimension);
  if (!si || !u.equalBase(si)) {
    const got = describe(u);
    const coulomb = dimension === 'temperature' && u.units.some((c) => c.unit.name === 'C');
    const hint = coulomb ? '`C` is the coulomb; write `20 degC` or `293.15 K`' : exampleHint(dimension);
    return fail('unit-dimension', `expected ${DIMENSIONS[dimension].noun}, got ${got} (\`${text.trim()}\`)`, hint);
  }
  let value = u.toNumber(DIMENSIONS[dimension].si);
  if (dimension === 'temperature-difference') value -= mathUnit(`0 ${u.formatUnits()}`).toNumber('K');
  return fromBareNumber(value, dimension, text);
}

/**
 * A fraction 0..1: `"40%"`, `"40 %"` or a number 0..1.
 */
export function parseFraction(text: string | number): QuantityResult {
  let value: number;
  let shown: string;
  if (typeof text === 'number') {
    value = text;
    shown = String(text);
  } else if (typeof text === 'string') {
    const m = /^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*$/.exec(text);
    if (!m) return fail('unit-syntax', `cannot read \`${text}\` as a fraction`, 'write a percentage such as `40%` or a number between 0 and 1');
    value = m[2] ? Number(m[1]) / 100 : Number(m[1]);
    shown = text.trim();
  } else {
    return fail('wrong-type', `expected a fraction, got ${typeof text}`, 'write a percentage such as `40%` or a number between 0 and 1');
  }
  if (!Number.isFinite(value)) return fail('not-finite', `\`${shown}\` is not a finite number`, 'write a percentage such as `40%`');
  if (value < 0 || value > 1) {
    const asPercent = typeof text === 'number' && text > 1 && text <= 100 ? ` (for a percentage write \`${text}%\`)` : '';
    return fail('out-of-range', `\`${shown}\` is outside 0..100 %`, `write a percentage between 0% and 100% or a number between 0 and 1${asPercent}`);
  }
  return { ok: true, value };
}
