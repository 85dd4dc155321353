/**
 * The validation context: collects diagnostics with positions and paths, and reads values
 * from the YAML tree through the parameter tables (unknown keys, required keys, dimensions,
 * bounds, defaults). It never stops at the first problem: a reader that fails returns
 * undefined and the caller carries on.
 */
import type { Diagnostic, Severity } from '../diag/diagnostic.js';
import { closestMatches, didYouMean, listChoices } from '../diag/did-you-mean.js';
import { DIMENSIONS, type Dimension } from '../units/dimensions.js';
import { parsePressure, parsePressureDifference, parseAmbientPressure } from '../units/pressure.js';
import { parseFraction, parseQuantity, type QuantityResult, type ValueError } from '../units/quantity.js';
import type { Bounds, ParamSpec } from './kinds.js';
import type { SourcePos } from './types.js';
import type { Pos, YMap, YNode, YSeq } from './yaml-types.js';

export const IDENTIFIER = /^[A-Za-z][A-Za-z0-9_]*$/;
/** A node name: an identifier, or a cylinder's side (`clamp.cap`, `clamp.rod`). */
const NODE_NAME = /^[A-Za-z][A-Za-z0-9_]*(?:\.(?:cap|rod))?$/;

/** Something a diagnostic can point at. */
export interface Where {
  pos: Pos;
  path: (string | number)[];
}

function describeBounds(b: Bounds): string {
  const parts: string[] = [];
  if (b.gt !== undefined) parts.push(`greater than ${b.gt}`);
  if (b.ge !== undefined) parts.push(`at least ${b.ge}`);
  if (b.lt !== undefined) parts.push(`less than ${b.lt}`);
  if (b.le !== undefined) parts.push(`at most ${b.le}`);
  return parts.join(' and ');
}

function withinBounds(v: number, b: Bounds): boolean {
  return !(
    (b.gt !== undefined && !(v > b.gt)) ||
    (b.ge !== undefined && !(v >= b.ge)) ||
    (b.lt !== undefined && !(v < b.lt)) ||
    (b.le !== undefined && !(v <= b.le))
  );
}

function shown(node: YNode): string {
  if (node.kind !== 'scalar') return node.kind === 'map' ? 'a mapping' : 'a list';
  return typeof node.value === 'string' ? `\`${node.value}\`` : String(node.value);
}

export class Checker {
  readonly diagnostics: Diagnostic[] = [];
  /** Dotted paths of parameters that took their default. */
  readonly defaulted: string[] = [];
  /** Absolute Pa; gauge pressures are read against it (set once ambient is read). */
  ambientPa = 101325;
  /** Keys that a misspelt key of the map was taken for: their absence is not reported twice. */
  private readonly suggested = new WeakMap<YMap, Set<string>>();

  constructor(readonly file: string) {}

  report(severity: Severity, where: Where, code: string, message: string, hint: string): void {
    this.diagnostics.push({ code, severity, message, file: this.file, line: where.pos.line, column: where.pos.column, path: where.path, hint });
  }

  error(where: Where, code: string, message: string, hint: string): void {
    this.report('error', where, code, message, hint);
  }

  warn(where: Where, code: string, message: string, hint: string): void {
    this.report('warning', where, code, message, hint);
  }

  /** Reports a value error from the units layer at `where`. */
  valueError(where: Where, e: ValueError, what?: string): void {
    this.error(where, e.code, what ? `${what}: ${e.message}` : e.message, e.hint);
  }

  /** Where a missing key of `map` would go: the map's own key, else the map. */
  missingAt(map: YMap | YNode, key: string): Where {
    return { pos: map.keyPos ?? map.pos, path: [...map.path, key] };
  }

  /** A position for the model layer. */
  sourcePos(where: Where): SourcePos {
    return { file: this.file, line: where.pos.line, column: where.pos.column, path: where.path };
  }

  get hasErrors(): boolean {
    return this.diagnostics.some((d) => d.severity === 'error');
  }

  // ---- structure ---------------------------------------------------------------------------

  /** The node as a map; an empty value counts as an empty map when `emptyOk`. */
  map(node: YNode, what: string, hint: string, emptyOk = false): YMap | undefined {
    if (node.kind === 'map') return node;
    if (emptyOk && node.kind === 'scalar' && node.value === null) return { kind: 'map', entries: [], path: node.path, pos: node.pos, keyPos: node.keyPos };
    this.error(node, 'wrong-type', `${what} must be a mapping of keys to values, got ${shown(node)}`, hint);
    return undefined;
  }

  seq(node: YNode, what: string, hint: string): YSeq | undefined {
    if (node.kind === 'seq') return node;
    this.error(node, 'wrong-type', `${what} must be a list, got ${shown(node)}`, hint);
    return undefined;
  }

  get(map: YMap, key: string): YNode | undefined {
    return map.entries.find((e) => e.key === key)?.value;
  }

  keyWhere(map: YMap, key: string): Where {
    const e = map.entries.find((x) => x.key === key);
    return e ? { pos: e.keyPos, path: [...map.path, key] } : this.missingAt(map, key);
  }

  /**
   * Reports every key of `map` not in `allowed`, with a did-you-mean. `explain(key)` may give
   * a better hint (e.g. "`radius` belongs to sphere walls").
   */
  checkKeys(map: YMap, allowed: readonly string[], owner: string, explain?: (key: string) => string | undefined): void {
    for (const e of map.entries) {
      if (allowed.includes(e.key)) continue;
      const close = closestMatches(e.key, allowed);
      if (close.length) this.suggested.set(map, new Set([...(this.suggested.get(map) ?? []), ...close]));
      const hint = explain?.(e.key) ?? didYouMean(e.key, allowed) ?? `allowed keys: ${[...new Set(allowed)].join(', ')}`;
      this.error({ pos: e.keyPos, path: [...map.path, e.key] }, 'unknown-key', `unknown key \`${e.key}\` in ${owner}`, hint);
    }
  }

  /** True when an unknown key of `map` was reported as a likely misspelling of `key`. */
  wasSuggested(map: YMap, key: string): boolean {
    return this.suggested.get(map)?.has(key) ?? false;
  }

  /**
   * Reports a missing key, unless a misspelling of it was already reported (`diamter` for
   * `diameter`: one problem, one diagnostic).
   */
  missing(map: YMap, key: string, message: string, hint: string): void {
    if (this.wasSuggested(map, key)) return;
    this.error(this.missingAt(map, key), 'missing-key', message, hint);
  }

  // ---- scalars -----------------------------------------------------------------------------

  /** A string or number scalar; reports and returns undefined otherwise. */
  scalar(node: YNode, what: string, hint: string): string | number | undefined {
    if (node.kind === 'scalar' && (typeof node.value === 'string' || typeof node.value === 'number')) return node.value;
    const got = node.kind === 'scalar' && node.value === null ? 'nothing' : shown(node);
    this.error(node, 'wrong-type', `${what} must be a single value, got ${got}`, hint);
    return undefined;
  }

  text(node: YNode, what: string, hint: string): string | undefined {
    const v = this.scalar(node, what, hint);
    if (v === undefined) return undefined;
    if (typeof v !== 'string') {
      this.error(node, 'wrong-type', `${what} must be text, got ${v}`, hint);
      return undefined;
    }
    return v;
  }

  /** An identifier naming another element, or a cylinder's side (`clamp.cap`). */
  name(node: YNode, what: string): string | undefined {
    const v = this.text(node, what, 'write the name of an element');
    if (v === undefined) return undefined;
    if (!NODE_NAME.test(v)) {
      this.error(node, 'bad-name', `${what} \`${v}\` is not a valid name`, 'names are letters, digits and _, starting with a letter');
      return undefined;
    }
    return v;
  }

  /** Applies a units-layer result: reports failures and bounds. */
  checked(node: YNode, r: QuantityResult, what: string, bounds?: Bounds, unit = ''): number | undefined {
    if (!r.ok) {
      this.valueError(node, r, what);
      return undefined;
    }
    if (bounds && !withinBounds(r.value, bounds)) {
      const v = node.kind === 'scalar' ? String(node.value) : String(r.value);
      this.error(node, 'out-of-range', `${what} must be ${describeBounds(bounds)}${unit ? ` ${unit}` : ''}, got \`${v}\``, `give ${what} a value ${describeBounds(bounds)}`);
      return undefined;
    }
    return r.value;
  }

  quantity(node: YNode, dimension: Dimension, what: string, bounds?: Bounds): number | undefined {
    const hint = `write ${DIMENSIONS[dimension].noun}, e.g. \`${DIMENSIONS[dimension].example}\``;
    const v = this.scalar(node, what, hint);
    if (v === undefined) return undefined;
    return this.checked(node, parseQuantity(v, dimension), what, bounds, DIMENSIONS[dimension].label === '-' ? '' : DIMENSIONS[dimension].label);
  }

  /** A pressure saying gauge or abs; returns Pa absolute. */
  absolutePressure(node: YNode, what: string, bounds?: Bounds): number | undefined {
    const v = this.scalar(node, what, 'write e.g. `200 kPa gauge` or `301.3 kPa abs`');
    if (v === undefined) return undefined;
    const r = parsePressure(v, this.ambientPa);
    return this.checked(node, r.ok ? { ok: true, value: r.abs } : r, what, bounds, 'Pa absolute');
  }

  /** A pressure saying gauge or abs; returns Pa gauge. */
  gaugePressure(node: YNode, what: string): number | undefined {
    const abs = this.absolutePressure(node, what);
    return abs === undefined ? undefined : abs - this.ambientPa;
  }

  pressureDifference(node: YNode, what: string, bounds?: Bounds): number | undefined {
    const v = this.scalar(node, what, 'write a pressure difference, e.g. `20 kPa`');
    if (v === undefined) return undefined;
    return this.checked(node, parsePressureDifference(v), what, bounds, 'Pa');
  }

  fraction(node: YNode, what: string, bounds?: Bounds): number | undefined {
    const v = this.scalar(node, what, 'write a percentage such as `40%` or a number between 0 and 1');
    if (v === undefined) return undefined;
    return this.checked(node, parseFraction(v), what, bounds);
  }

  integer(node: YNode, what: string, bounds?: Bounds): number | undefined {
    const v = this.scalar(node, what, 'write a whole number');
    if (v === undefined) return undefined;
    if (typeof v !== 'number' || !Number.isInteger(v)) {
      this.error(node, typeof v === 'number' && !Number.isFinite(v) ? 'not-finite' : 'wrong-type', `${what} must be a whole number, got ${shown(node)}`, 'write a whole number such as `10000`');
      return undefined;
    }
    return this.checked(node, { ok: true, value: v }, what, bounds);
  }

  enumValue(node: YNode, values: readonly string[], what: string, code = 'unknown-value'): string | undefined {
    const v = this.text(node, what, `write one of ${listChoices(values)}`);
    if (v === undefined) return undefined;
    if (!values.includes(v)) {
      const close = didYouMean(v, values);
      this.error(node, code, `unknown ${what} \`${v}\``, close ? `${close} (one of ${listChoices(values)})` : `write one of ${listChoices(values)}`);
      return undefined;
    }
    return v;
  }

  // ---- table-driven ------------------------------------------------------------------------

  /**
   * Reads one parameter of `map` as its table entry says. Missing required parameters are
   * reported at the map; missing optional ones take their default (recorded in `defaulted`).
   * Structures are returned as nodes for dedicated code.
   */
  param(map: YMap, spec: ParamSpec): unknown {
    let node = this.get(map, spec.name);
    if (node === undefined || (node.kind === 'scalar' && node.empty)) {
      // a key written with no value is a slip whether or not the key is required (only an
      // empty structure, such as `limits:`, may stand for "none")
      if (spec.required || (node && spec.dimension !== 'structure')) {
        if (node) this.error(node, 'missing-key', `\`${spec.name}\` is empty`, `give \`${spec.name}\` a value (${spec.doc})${spec.required ? '' : ', or remove the key'}`);
        else this.missing(map, spec.name, `\`${spec.name}\` is required here`, `add \`${spec.name}:\` (${spec.doc})`);
        return undefined;
      }
      if (spec.default === undefined) return undefined;
      this.defaulted.push([...map.path, spec.name].join('.'));
      node = { kind: 'scalar', value: spec.default, empty: false, path: [...map.path, spec.name], pos: map.keyPos ?? map.pos };
    }
    return this.value(node, spec);
  }

  value(node: YNode, spec: ParamSpec): unknown {
    const what = `\`${spec.name}\``;
    switch (spec.dimension) {
      case 'structure':
        return node;
      case 'absolute-pressure':
        return this.absolutePressure(node, what, spec.bounds);
      case 'gauge-pressure':
        return this.gaugePressure(node, what);
      case 'pressure-difference':
        return this.pressureDifference(node, what, spec.bounds);
      case 'fraction':
        return this.fraction(node, what, spec.bounds);
      case 'integer':
        return this.integer(node, what, spec.bounds);
      case 'name':
        return this.name(node, what);
      case 'enum':
        return this.enumValue(node, spec.values ?? [], what);
      case 'text':
        return this.text(node, what, 'write text');
      case 'ambient-pressure': {
        const v = this.scalar(node, what, 'write e.g. `101.325 kPa`');
        return v === undefined ? undefined : this.checked(node, parseAmbientPressure(v), what, spec.bounds, 'Pa');
      }
      default:
        return this.quantity(node, spec.dimension, what, spec.bounds);
    }
  }

  /** Reads every parameter of a table into an object keyed by parameter name. */
  params(map: YMap, specs: readonly ParamSpec[]): Record<string, unknown> {
    const out: Record<string, unknown> = {};
    for (const spec of specs) out[spec.name] = this.param(map, spec);
    return out;
  }
}

