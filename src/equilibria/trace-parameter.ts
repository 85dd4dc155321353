/**
 * The parameter of a continuation: read at both ends through the netlist override mechanism,
 * interpolated in SI between them, and a model for each value (see continuation.ts).
 */
import { formatDiagnostic } from '../diag/diagnostic.js';
import { buildModel } from '../model/build.js';
import type { Model } from '../model/types.js';
import { checkPath, overrideValue, readWithOverrides, splitPath } from '../netlist/override.js';
import type { NetlistDoc } from '../netlist/types.js';
import { parseYamlTree } from '../netlist/yaml-tree.js';
import { makeWall } from '../physics/wall.js';
import { readScalar, valueText } from '../units/scalar.js';
import { parseQuantity } from '../units/quantity.js';
import type { TraceOptions } from './trace-types.js';

/** Models kept for recent parameter values. */
export const CACHE = 24;

// ---- the parameter -----------------------------------------------------------------------

interface Leaf { path: (string | number)[]; a: number; b: number; series: boolean }

const SKIP = new Set(['pos', 'fieldPos', 'source', 'file', 'defaulted', 'title', 'expect', 'simulate']);

function isSeries(v: unknown): v is { at(t: number): number; constant: boolean; text: string } {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && typeof (v as { at?: unknown }).at === 'function' && 'constant' in v;
}

/** Numeric leaves that differ between two readings of the netlist; null when something else differs. */
function diffDocs(a: unknown, b: unknown, path: (string | number)[], out: Leaf[]): boolean {
  if (typeof a === 'number' && typeof b === 'number') {
    if (a !== b) out.push({ path, a, b, series: false });
    return true;
  }
  if (isSeries(a) && isSeries(b)) {
    if (a.constant && b.constant) {
      const va = a.at(0), vb = b.at(0);
      if (va !== vb) out.push({ path, a: va, b: vb, series: true });
      return true;
    }
    return a.text === b.text;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return false;
    return a.every((x, i) => diffDocs(x, b[i], [...path, i], out));
  }
  if (typeof a === 'object' && a !== null && typeof b === 'object' && b !== null) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) {
      if (SKIP.has(k)) continue;
      if (!diffDocs((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], [...path, k], out)) return false;
    }
    return true;
  }
  return a === b;
}

function setIn(obj: unknown, path: (string | number)[], value: unknown): unknown {
  if (path.length === 0) return value;
  const [k, ...rest] = path;
  if (Array.isArray(obj)) {
    const copy = obj.slice();
    copy[k as number] = setIn(obj[k as number], rest, value);
    return copy;
  }
  const o = obj as Record<string, unknown>;
  return { ...o, [k]: setIn(o[k as string], rest, value) };
}

function constantSeries(p: number): { at(t: number): number; breakpoints: number[]; constant: boolean; text: string } {
  return { at: () => p, breakpoints: [], constant: true, text: `${p} Pa abs` };
}

export interface Parameter {
  vary: string;
  from: number;
  to: number;
  unit: string;
  /** λ in the written unit at scaled value ℓ. */
  value(l: number): number;
  /** The model at ℓ, or an error message. */
  modelAt(l: number): Model | string;
  /** Gas of closed groups follows the netlist (start values), or the parameter is a group's gas. */
  gasFollows: boolean;
  /** For mass:<chamber>: that chamber's index and the SI gas at ℓ. */
  massOf?: { chamber: number; si(l: number): number };
  /** Chambers whose equations depend on the parameter (null: all). */
  touches: Set<string> | null;
}

function readEnds(vary: string, fromText: string, toText: string): { ok: true; a: number; b: number; unit: string; reference?: 'gauge' | 'abs'; text(x: number): string } | { ok: false; message: string; hint: string } {
  const fa = readScalar(fromText);
  if (!fa.ok) return { ok: false, message: `--from: ${fa.message}`, hint: fa.hint };
  const fb = readScalar(toText);
  if (!fb.ok) return { ok: false, message: `--to: ${fb.message}`, hint: fb.hint };
  const A = fa.value, B = fb.value;
  if (A.unit !== B.unit || (A.reference ?? '') !== (B.reference ?? '')) {
    return { ok: false, message: `--from \`${fromText}\` and --to \`${toText}\` are written in different units`, hint: `write both in the same unit, e.g. --to ${valueText(B.x, A)}` };
  }
  if (A.x === B.x) return { ok: false, message: `--from and --to are the same value for ${vary}`, hint: 'give a range to follow the equilibria across' };
  const label = A.unit === '%' ? '%' : [A.unit, A.reference].filter(Boolean).join(' ');
  return { ok: true, a: A.x, b: B.x, unit: label, reference: A.reference, text: (x: number) => valueText(x, A) };
}

export function makeParameter(model: Model, o: TraceOptions): { ok: true; value: Parameter } | { ok: false; message: string; hint: string } {
  const ends = readEnds(o.vary, o.from, o.to);
  if (!ends.ok) return ends;
  const { a, b, unit } = ends;
  const value = (l: number): number => a + l * (b - a);
  const massMatch = /^mass:(.+)$/.exec(o.vary.trim());
  if (massMatch) {
    const name = massMatch[1].trim();
    const chamber = model.chambers.findIndex((c) => c.name === name);
    if (chamber < 0) return { ok: false, message: `no chamber \`${name}\` in ${model.doc.file}`, hint: `chambers: ${model.chambers.map((c) => c.name).join(', ')}` };
    const sa = parseQuantity(o.from, 'mass');
    const sb = parseQuantity(o.to, 'mass');
    if (!sa.ok || !sb.ok) return { ok: false, message: `mass:${name} needs masses for --from and --to (got \`${o.from}\`, \`${o.to}\`)`, hint: 'write e.g. --from "0.5 g" --to "3 g"' };
    if (!(sa.value > 0 && sb.value > 0)) return { ok: false, message: 'the gas of a group must be positive', hint: 'give --from and --to above zero' };
    return {
      ok: true,
      value: {
        vary: o.vary, from: a, to: b, unit, value, modelAt: () => model, gasFollows: true, touches: new Set([name]),
        massOf: { chamber, si: (l) => sa.value + l * (sb.value - sa.value) },
      },
    };
  }
  const source = model.doc.source;
  const file = model.doc.file;
  const check = checkPath(source, o.vary);
  if (!check.ok) return { ok: false, message: check.message, hint: check.hint };
  const path = splitPath(o.vary);
  // the YAML is parsed once; each value is set in a copy-on-write edit of the tree
  const tree = parseYamlTree(source, file);
  const read = (x: number): NetlistDoc | string => {
    const text = ends.text(x);
    const r = readWithOverrides(source, file, [{ path, value: overrideValue(text), label: `${o.vary} = ${text}` }], tree);
    return r.ok ? r.value : r.diagnostics.map(formatDiagnostic).join('\n');
  };
  const docA = read(a);
  if (typeof docA === 'string') return { ok: false, message: `the netlist is not valid at --from:\n${docA}`, hint: 'choose a value inside the parameter\'s range' };
  const docB = read(b);
  if (typeof docB === 'string') return { ok: false, message: `the netlist is not valid at --to:\n${docB}`, hint: 'choose a value inside the parameter\'s range' };
  const leaves: Leaf[] = [];
  let affine = diffDocs(docA, docB, [], leaves);
  if (affine && leaves.length === 0) return { ok: false, message: `${o.vary} changes nothing between ${o.from} and ${o.to}`, hint: 'check the path and the values' };
  const interpolated = (l: number): NetlistDoc => {
    let doc: unknown = docA;
    for (const f of leaves) {
      const v = f.a + l * (f.b - f.a);
      doc = setIn(doc, f.path, f.series ? constantSeries(v) : v);
    }
    return doc as NetlistDoc;
  };
  if (affine) {
    const mid = read(value(0.5));
    if (typeof mid === 'string') affine = false;
    else {
      const check2: Leaf[] = [];
      affine = diffDocs(interpolated(0.5), mid, [], check2) && check2.every((f) => Math.abs(f.a - f.b) <= 1e-9 * Math.max(Math.abs(f.a), Math.abs(f.b)));
    }
  }
  // Fast path: when only wall parameters and constant reservoir pressures change, the model at ℓ
  // is the model at --from with those wall laws and pressures replaced (the ends were built and
  // checked in full); anything else goes through buildModel.
  const builtA = buildModel(docA);
  const wallLeaf = (f: Leaf): boolean => f.path[0] === 'chambers' && f.path[2] === 'wall' && !f.series
    && !(builtA.ok && builtA.value.chambers[f.path[1] as number]?.deflation);
  const pressureLeaf = (f: Leaf): boolean => f.path[0] === 'reservoirs' && f.path[2] === 'pressure' && f.series;
  const fast = affine && builtA.ok && leaves.every((f) => wallLeaf(f) || pressureLeaf(f));
  const quick = (l: number): Model => {
    const base = (builtA as { value: Model }).value;
    const doc = interpolated(l);
    const walls = new Set(leaves.filter(wallLeaf).map((f) => f.path[1] as number));
    const pressures = new Set(leaves.filter(pressureLeaf).map((f) => f.path[1] as number));
    return {
      ...base, doc,
      chambers: base.chambers.map((c, i) => (walls.has(i)
        ? { ...c, wall: makeWall(doc.chambers[i].wall, base.pa), spec: { ...c.spec, wall: doc.chambers[i].wall } }
        : c)),
      reservoirs: base.reservoirs.map((r, i) => (pressures.has(i) ? { ...r, pressure: doc.reservoirs[i].pressure } : r)),
    };
  };
  const cache = new Map<number, Model | string>();
  const modelAt = (l: number): Model | string => {
    const hit = cache.get(l);
    if (hit !== undefined) return hit;
    let m: Model | string;
    if (fast) m = quick(l);
    else {
      const doc = affine ? interpolated(l) : read(value(l));
      if (typeof doc === 'string') m = doc;
      else {
        const built = buildModel(doc);
        m = built.ok ? built.value : built.diagnostics.map(formatDiagnostic).join('\n');
      }
    }
    if (cache.size >= CACHE) cache.delete(cache.keys().next().value as number);
    cache.set(l, m);
    return m;
  };
  // which chambers the changed values belong to
  let touches: Set<string> | null = new Set<string>();
  for (const f of leaves) {
    const [section, index] = f.path;
    if (section === 'chambers') touches.add(docA.chambers[index as number].name);
    else if (section === 'lines') { const l = docA.lines[index as number]; touches.add(l.from).add(l.to); }
    else if (section === 'valves') { const v = docA.valves[index as number]; touches.add(v.from).add(v.to); }
    else if (section === 'feeds') touches.add(docA.feeds[index as number].into);
    else if (section === 'reservoirs') {
      const r = docA.reservoirs[index as number].name;
      for (const l of [...docA.lines, ...docA.valves]) if (l.from === r || l.to === r) touches.add(l.from).add(l.to);
    } else { touches = null; break; }
  }
  if (!affine) touches = null;
  return {
    ok: true,
    value: {
      vary: o.vary, from: a, to: b, unit, value, modelAt, touches,
      gasFollows: path.includes('start'),
    },
  };
}
