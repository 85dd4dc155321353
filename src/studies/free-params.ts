/**
 * Free parameters of a calibration or sizing study: `--free PATH=LOW..HIGH` (or `--free PATH`
 * for a calibration without bounds), the same paths as `sweep --vary`, values written as in a
 * netlist. Internally every value is SI, pressures absolute (Pa); each parameter keeps the unit
 * (and gauge/abs) the netlist or its bounds were written in, so that trial values and the
 * calibrated netlist read as the user wrote them.
 */
import { isScalar, parseDocument } from 'yaml';
import { checkPath, splitPath } from '../netlist/override.js';
import { readScalar, valueText, type ScalarValue } from '../units/scalar.js';
import { unitMap, type UnitMap } from './sweep-spec.js';

export interface FreeParam {
  path: string;
  /** Bounds, SI (pressures absolute); ±Infinity when not given. */
  lo: number;
  hi: number;
  /** The netlist's value, SI, or undefined when the key is left at its default. */
  nominal?: number;
  /** The unit values are written in. */
  map: UnitMap;
}

export type ParamRead<T> = { ok: true; value: T } | { ok: false; message: string; hint: string };

const NUMBER_HINT = 'write values as in a netlist, e.g. `--free lines.feed.diameter=2 mm..6 mm` or `--free valves.v1.conductance=0.1 L/(s*bar)..1 L/(s*bar)`';

/** The text of the scalar at a path of the netlist, or undefined when it is not written. */
export function netlistText(source: string, path: string): string | undefined {
  const doc = parseDocument(source, { version: '1.2', schema: 'core', merge: false, resolveKnownTags: false });
  const node = doc.getIn(splitPath(path), true);
  return isScalar(node) ? String(node.value) : undefined;
}

/** A unit as netlists write it: `L/(s*bar)` rather than mathjs's `L / (s bar)`. */
function tidyUnit(map: UnitMap): UnitMap {
  return { ...map, unit: map.unit.replace(/ \/ /g, '/').replace(/(\w) (?=\w)/g, '$1*') };
}

/** SI value of a scalar; pressures absolute. */
function siOf(v: ScalarValue, pa: number): number {
  return v.reference === 'gauge' ? v.si + pa : v.si;
}

/** Writes an SI value (pressures absolute) as netlist text in the parameter's unit. */
export function paramText(p: Pick<FreeParam, 'map'>, si: number, pa: number, digits = 12): string {
  const s = p.map.reference === 'gauge' ? si - pa : si;
  return valueText((s - p.map.offset) / p.map.factor, p.map, digits);
}

/** SI (pressures absolute) → the number in the parameter's unit (for tables). */
export function inUnit(p: Pick<FreeParam, 'map'>, si: number, pa: number): number {
  const s = p.map.reference === 'gauge' ? si - pa : si;
  return (s - p.map.offset) / p.map.factor;
}

/** Reads `PATH=LOW..HIGH` (bounds optional when `boundsOptional`) against the netlist. */
export function parseFree(arg: string, source: string, pa: number, boundsOptional: boolean): ParamRead<FreeParam> {
  const eq = arg.indexOf('=');
  const path = (eq < 0 ? arg : arg.slice(0, eq)).trim();
  const body = eq < 0 ? '' : arg.slice(eq + 1).trim();
  const where = checkPath(source, path);
  if (!where.ok) return { ok: false, message: `--free ${path}: ${where.message}`, hint: where.hint };
  const text = netlistText(source, path);
  const nominal = text !== undefined ? readScalar(text) : undefined;
  if (nominal && !nominal.ok) return { ok: false, message: `--free ${path}: the netlist's value \`${text}\` is not a number`, hint: 'only numeric parameters can be free' };
  if (!body) {
    if (!boundsOptional) return { ok: false, message: `--free ${path} needs bounds`, hint: `write \`--free ${path}=LOW..HIGH\`, e.g. \`--free lines.feed.diameter=2 mm..6 mm\`` };
    if (!nominal) return { ok: false, message: `--free ${path}: the netlist does not set this value, so there is no start`, hint: `give bounds (\`${path}=LOW..HIGH\`): the search starts in their middle` };
    return { ok: true, value: { path, lo: -Infinity, hi: Infinity, nominal: siOf(nominal.value, pa), map: tidyUnit(unitMap(nominal.value)) } };
  }
  const parts = body.split('..');
  if (parts.length !== 2 || !parts[0].trim() || !parts[1].trim()) return { ok: false, message: `--free ${path}: \`${body}\` is not LOW..HIGH`, hint: NUMBER_HINT };
  const lo = readScalar(parts[0]);
  const hi = readScalar(parts[1]);
  for (const [r, t] of [[lo, parts[0]], [hi, parts[1]]] as const) {
    if (!r.ok) return { ok: false, message: `--free ${path}: \`${t.trim()}\`: ${r.message}`, hint: r.hint };
  }
  if (!lo.ok || !hi.ok) throw new Error('unreachable');
  const same = (a: ScalarValue, b: ScalarValue): boolean => a.base.every((x, i) => x === b.base[i]) && (a.unit === '%') === (b.unit === '%') && Boolean(a.anr) === Boolean(b.anr);
  const pressure = (v: ScalarValue): boolean => v.siLabel.startsWith('Pa');
  if (!same(lo.value, hi.value)) return { ok: false, message: `--free ${path}: \`${parts[0].trim()}\` and \`${parts[1].trim()}\` are not the same kind of quantity`, hint: NUMBER_HINT };
  if (nominal && !same(lo.value, nominal.value) && !(nominal.value.unit === '' && lo.value.unit !== '%')) {
    return { ok: false, message: `--free ${path}: the bounds are not the same kind of quantity as the netlist's \`${text}\``, hint: `write bounds like \`${text}\`` };
  }
  for (const v of [lo.value, hi.value]) {
    if (pressure(v) && !v.reference) return { ok: false, message: `--free ${path}: the pressure \`${v.x} ${v.unit}\` does not say gauge or absolute`, hint: 'write e.g. `4 barg..7 barg` or `500 kPa abs..800 kPa abs`' };
  }
  const a = siOf(lo.value, pa);
  const b = siOf(hi.value, pa);
  if (!(a < b)) return { ok: false, message: `--free ${path}: the lower bound is not below the upper bound`, hint: 'write LOW..HIGH with LOW < HIGH' };
  // values are written back in the netlist's own unit when it has one, else in the bounds' unit
  const map = tidyUnit(unitMap(nominal && nominal.value.unit !== '' && same(nominal.value, lo.value) ? nominal.value : lo.value));
  const nom = nominal ? siOf(nominal.value, pa) : undefined;
  return { ok: true, value: { path, lo: a, hi: b, nominal: nom !== undefined && Number.isFinite(nom) ? nom : undefined, map } };
}

/** Start of a search: the netlist's value if inside the bounds, else the middle (geometric for positive bounds). */
export function startValue(p: FreeParam): number {
  if (p.nominal !== undefined && p.nominal >= p.lo && p.nominal <= p.hi) return p.nominal;
  if (p.lo > 0 && Number.isFinite(p.hi)) return Math.sqrt(p.lo * p.hi);
  return 0.5 * (p.lo + p.hi);
}

