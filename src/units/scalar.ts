/**
 * One value written as in a netlist (`1.5 mm`, `20 kPa gauge`, `40%`, `10 L/min ANR`): read into
 * its number, unit and SI value, and written back. Used by studies (`--vary`) and by
 * continuation (`--from`, `--to`).
 */
import { DIMENSIONS, nameDimension } from './dimensions.js';
import { splitQualifier, type PressureReference } from './pressure.js';
import { readUnit } from './quantity.js';

/** A number with the unit it was written in and its SI value. */
export interface ScalarValue {
  /** The number in the written unit. */
  x: number;
  /** The unit as written back: `mm`, `kPa`, `%`, or '' for a bare number. */
  unit: string;
  reference?: PressureReference;
  /** A standard volume flow (ISO 8778), written with `ANR` after the unit. */
  anr?: boolean;
  /** SI value (Pa gauge or abs for pressures, 0..1 for `%`). */
  si: number;
  /** SI unit for column headers: `m`, `Pa gauge`, `-`. */
  siLabel: string;
  /** Base dimension exponents, for checking that values agree. */
  base: number[];
}

/** Prints a number compactly and exactly enough to round-trip through the netlist reader. */
export function numberText(x: number, digits?: number): string {
  const y = digits ? Number(x.toPrecision(digits)) : x;
  return Object.is(y, -0) ? '0' : String(y);
}

/** The netlist text for x in a unit map's unit. */
export function valueText(x: number, map: Pick<ScalarValue, 'unit' | 'reference' | 'anr'>, digits?: number): string {
  const n = numberText(x, digits);
  if (map.unit === '%') return `${n}%`;
  const u = map.unit ? `${n} ${map.unit}` : n;
  if (map.anr) return `${u} ANR`;
  return map.reference ? `${u} ${map.reference}` : u;
}

/** Reads one value (`1.5 mm`, `20 kPa gauge`, `40%`, `1.6`) into its number, unit and SI value. */
export function readScalar(text: string): { ok: true; value: ScalarValue } | { ok: false; message: string; hint: string } {
  const t = text.trim();
  const pct = /^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*%$/.exec(t);
  if (pct) {
    const x = Number(pct[1]);
    return { ok: true, value: { x, unit: '%', si: x / 100, siLabel: '-', base: new Array<number>(9).fill(0) } };
  }
  const anrMatch = /^(.*\S)\s+ANR$/i.exec(t);
  const anr = anrMatch !== null;
  const { body, reference } = anrMatch ? { body: anrMatch[1], reference: undefined } : splitQualifier(t);
  const r = readUnit(body);
  if (!r.ok) return { ok: false, message: r.message, hint: r.hint };
  const u = r.unit;
  if (u.units.length === 0) {
    if (reference || anr) return { ok: false, message: `\`${t}\` says ${anr ? 'ANR' : reference} but has no unit`, hint: anr ? 'write e.g. `10 L/min ANR`' : 'write e.g. `20 kPa gauge`' };
    const x = u.toNumber();
    return { ok: true, value: { x, unit: '', si: x, siLabel: '-', base: new Array<number>(9).fill(0) } };
  }
  const unit = u.formatUnits();
  const x = u.toNumber(unit);
  const dim = nameDimension(u.dimensions);
  const siUnit = dim ? DIMENSIONS[dim].si : u.toSI().formatUnits();
  const si = u.toNumber(siUnit);
  const label = anr ? `${siUnit} ANR` : dim === 'pressure' && reference ? `${siUnit} ${reference}` : siUnit;
  const value: ScalarValue = { x, unit, si, siLabel: label, base: u.dimensions.slice() };
  if (reference) value.reference = reference;
  if (anr) value.anr = true;
  return { ok: true, value };
}
