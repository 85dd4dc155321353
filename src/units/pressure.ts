/**
 * Pressures that say what they are measured from.
 *
 * A pressure in a netlist is gauge (relative to the netlist's ambient pressure) or absolute,
 * and must say which: a trailing `gauge`, `abs`, `absolute`, `(g)` or `(a)`, or the trade
 * shorthands `psig`, `psia`, `barg`, `bara` (also with a prefix: `mbarg`). The qualifier is
 * stripped before mathjs sees the text.
 */
import { fail, parseQuantity, type QuantityResult, type ValueError } from './quantity.js';

export type PressureReference = 'gauge' | 'abs';

/**
 * Highest gas pressure accepted, Pa absolute (1 GPa, ten thousand bar): far beyond any
 * pneumatic rig and beyond where the ideal-gas law means anything. Moduli are pressures too
 * but are not gas pressures; they are bounded by PLAUSIBLE in quantity.ts.
 */
export const MAX_GAS_PRESSURE = 1e9;
/** Lowest ambient pressure accepted, Pa (gauge values are read against it). */
const MIN_AMBIENT = 100;

export type PressureResult = { ok: true; abs: number; gauge: number; reference: PressureReference } | ValueError;

const WORD_QUALIFIER = /^(.*?)\s*(gauge|absolute|abs|\(g\)|\(a\))\s*$/i;
const GLUED_QUALIFIER = /^(.*?[0-9.\s)])([A-Za-z]?)(psi|bar)([ga])\s*$/i;
const DIFFERENTIAL = /^(.*?[0-9.\s)])([A-Za-z]?)(psi)d\s*$/i;

/** Splits `"200 kPa gauge"` into `"200 kPa"` and `gauge`; reference undefined when absent. */
export function splitQualifier(text: string): { body: string; reference?: PressureReference } {
  const word = WORD_QUALIFIER.exec(text);
  if (word && word[1].trim() !== '') {
    const q = word[2].toLowerCase();
    return { body: word[1], reference: q === 'gauge' || q === '(g)' ? 'gauge' : 'abs' };
  }
  const glued = GLUED_QUALIFIER.exec(text);
  if (glued) {
    return { body: `${glued[1]}${glued[2]}${glued[3].toLowerCase()}`, reference: glued[4].toLowerCase() === 'g' ? 'gauge' : 'abs' };
  }
  return { body: text };
}

function kiloPascal(pa: number): string {
  return `${Number((pa / 1000).toPrecision(6))} kPa`;
}

/** The hint for an unqualified pressure, showing both readings of the same number. */
function referenceHint(body: string, pa: number | undefined, ambientPa: number): string {
  if (pa === undefined) return 'write e.g. `200 kPa gauge` or `301.3 kPa abs`';
  return `write \`${body.trim()} gauge\` (= ${kiloPascal(pa + ambientPa)} abs) or \`${body.trim()} abs\``;
}

/**
 * A pressure that must say gauge or absolute, returned absolute (Pa) and gauge (Pa) against
 * `ambientPa`. Bare numbers are refused: a pressure needs its unit and its reference.
 * Negative absolute pressures are refused.
 */
export function parsePressure(text: string | number, ambientPa: number): PressureResult {
  if (typeof text === 'number') {
    if (!Number.isFinite(text)) return fail('not-finite', `\`${text}\` is not a finite number`, 'write e.g. `200 kPa gauge`');
    return fail('pressure-reference', `the pressure ${text} has no unit and does not say gauge or absolute`, `write e.g. \`${text} Pa gauge\` or \`${text} Pa abs\``);
  }
  if (typeof text !== 'string') return fail('wrong-type', `expected a pressure, got ${typeof text}`, 'write e.g. `200 kPa gauge`');
  const { body, reference } = splitQualifier(text);
  const q = parseQuantity(body, 'pressure');
  if (!q.ok) return q;
  if (!/[A-Za-z]/.test(body)) {
    return fail('unit-syntax', `the pressure \`${text.trim()}\` has no unit`, `write the unit, e.g. \`${body.trim()} kPa ${reference ?? 'gauge'}\``);
  }
  if (!reference) {
    return fail('pressure-reference', `the pressure \`${text.trim()}\` does not say gauge or absolute`, referenceHint(body, q.value, ambientPa));
  }
  const abs = reference === 'gauge' ? q.value + ambientPa : q.value;
  if (abs < 0) {
    return fail('out-of-range', `\`${text.trim()}\` is below vacuum (${kiloPascal(abs)} absolute)`, `the lowest possible pressure is 0 kPa abs = ${kiloPascal(-ambientPa)} gauge`);
  }
  if (abs > MAX_GAS_PRESSURE) {
    return aboveMaxPressure(text);
  }
  return { ok: true, abs, gauge: abs - ambientPa, reference };
}

/**
 * The ambient pressure: absolute by definition, so `abs`/`psia`/`bara` are optional and a
 * bare number means Pa. `gauge` is refused (gauge against what?).
 */
export function parseAmbientPressure(text: string | number): QuantityResult {
  const { body, reference } = typeof text === 'string' ? splitQualifier(text) : { body: text, reference: undefined };
  if (reference === 'gauge') {
    return fail('pressure-reference', 'the ambient pressure is absolute by definition and cannot be gauge', 'write e.g. `101.325 kPa` or `14.7 psia`');
  }
  const q = parseQuantity(body, 'pressure');
  if (!q.ok) return q;
  if (q.value <= 0) return fail('out-of-range', `the ambient pressure must be above 0, got ${q.value} Pa`, 'write e.g. `101.325 kPa`');
  if (q.value < MIN_AMBIENT || q.value > MAX_GAS_PRESSURE) {
    return fail('out-of-range', `the ambient pressure must be between ${MIN_AMBIENT} Pa and ${MAX_GAS_PRESSURE / 1e6} MPa, got ${q.value.toPrecision(4)} Pa`, 'write e.g. `101.325 kPa`; model a vacuum with a reservoir at low pressure, not with the ambient');
  }
  return q;
}

/** The refusal of a pressure above MAX_GAS_PRESSURE: one wording for every pressure plenum reads. */
export function aboveMaxPressure(text: string): ValueError {
  return fail('out-of-range', `\`${text.trim()}\` is above ${MAX_GAS_PRESSURE / 1e6} MPa absolute, the highest gas pressure plenum accepts`, 'check the unit prefix and the exponent');
}

/**
 * A pressure difference (a check valve's cracking pressure, a tolerance): a plain pressure;
 * bounded by the highest gas pressure like every pressure a gas can have or exert.
 * `gauge`, `psig`, `barg` and `psid` are accepted as meaning the same, `abs` is refused.
 */
export function parsePressureDifference(text: string | number): QuantityResult {
  if (typeof text !== 'string') return parseQuantity(text, 'pressure');
  const diff = DIFFERENTIAL.exec(text);
  if (diff) return parseQuantity(`${diff[1]}${diff[2]}psi`, 'pressure');
  const { body, reference } = splitQualifier(text);
  if (reference === 'abs') {
    return fail('pressure-reference', `\`${text.trim()}\` is a difference of pressures and cannot be absolute`, `write a plain pressure, e.g. \`${body.trim()}\``);
  }
  const r = parseQuantity(body, 'pressure');
  return r.ok && Math.abs(r.value) > MAX_GAS_PRESSURE ? aboveMaxPressure(text) : r;
}
