/**
 * A study's results: summary statistics, JSON and CSV output, and merging of shards.
 *
 * Output is a pure function of the study and its cases (no times, no job counts), written in a
 * fixed key order, so a merge of shards writes exactly the bytes of a single run. Numbers are
 * SI; non-finite numbers are written as null (JSON has no NaN).
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { display, type DisplayKind } from '../units/display.js';
import type { CaseResult, ChamberOutcome, CylinderOutcome } from './sweep-case.js';
import type { ParamValue } from './sweep-spec.js';
import { summarise, wilson, type NumericSummary, type Proportion } from './sweep-stats.js';
import { keepLargest } from '../transient/select.js';
import type { Shard, Study, SweepResult } from './sweep.js';
import { printable } from '../diag/text.js';

export interface NumericField extends NumericSummary {
  key: string;
  unit: string;
}

/**
 * A categorical outcome's share of the cases. The Wilson interval (`low`, `high`) is there only
 * for a study with random draws: the cases of a deterministic grid are not a sample of
 * anything, so its shares are exact and `low`/`high` are null.
 */
export interface CategoryValue extends Omit<Proportion, 'low' | 'high'> {
  value: string;
  low: number | null;
  high: number | null;
}

export interface CategoricalField {
  key: string;
  values: CategoryValue[];
}

export interface SweepSummary {
  cases: number;
  numeric: NumericField[];
  categorical: CategoricalField[];
}

export interface GroupSummary {
  group: number;
  /** The grid values of this group. */
  params: ParamValue[];
  summary: SweepSummary;
}

const NOT_COMPLETED = '(not completed)';
const CHAMBER_FIELDS: { field: keyof ChamberOutcome; unit: string; display: DisplayKind }[] = [
  { field: 'gauge', unit: 'Pa', display: 'gauge' },
  { field: 'volume', unit: 'm^3', display: 'volume' },
  { field: 'stretch', unit: '-', display: 'stretch' },
  { field: 'peak_gauge', unit: 'Pa', display: 'gauge' },
];

const CYLINDER_FIELDS: { field: keyof CylinderOutcome; unit: string }[] = [
  { field: 'position', unit: 'm' },
  { field: 'peak_speed', unit: 'm/s' },
  { field: 'stroke_time', unit: 's' },
  { field: 'impact_speed', unit: 'm/s' },
];

function finite(x: number | null | undefined): number {
  return typeof x === 'number' ? x : NaN;
}

/**
 * Counts of each value, as proportions of all cases, most frequent first (ties by value), with
 * Wilson intervals when the cases are random draws (`random`), none for a deterministic grid.
 */
function categorical(key: string, values: string[], random: boolean): CategoricalField {
  const counts = new Map<string, number>();
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1);
  const out = [...counts.entries()]
    .sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0))
    .map(([value, count]): CategoryValue => {
      const w = wilson(count, values.length);
      return { value, ...w, low: random ? w.low : null, high: random ? w.high : null };
    });
  return { key, values: out };
}

/** True when a study's cases are random draws (Monte Carlo, alone or on a grid). */
function isRandom(study: Study): boolean {
  return study.seed !== null;
}

/** Whether any case has a value for a chamber field (stretch exists for spheres only). */
function hasField(cases: readonly CaseResult[], chamber: string, field: keyof ChamberOutcome): boolean {
  return cases.some((c) => c.chambers[chamber] && c.chambers[chamber][field] !== null && c.chambers[chamber][field] !== undefined);
}

/** Statistics of numeric outcomes and probabilities (Wilson 95 % intervals) of categorical ones. */
export function summariseCases(study: Study, cases: readonly CaseResult[]): SweepSummary {
  const numeric: NumericField[] = [];
  study.vary.forEach((v, i) => {
    if (v.unit === null) return;
    numeric.push({ key: v.path, unit: v.unit, ...summarise(cases.map((c) => finite(c.params[i]?.si))) });
  });
  for (const name of study.chambers) {
    for (const f of CHAMBER_FIELDS) {
      if (f.field === 'stretch' && !hasField(cases, name, 'stretch')) continue;
      numeric.push({ key: `${name}.${f.field}`, unit: f.unit, ...summarise(cases.map((c) => finite(c.chambers[name]?.[f.field]))) });
    }
  }
  for (const name of study.cylinders ?? []) {
    for (const f of CYLINDER_FIELDS) numeric.push({ key: `${name}.${f.field}`, unit: f.unit, ...summarise(cases.map((c) => finite(c.cylinders?.[name]?.[f.field]))) });
  }
  numeric.push({ key: 'settling_time', unit: 's', ...summarise(cases.map((c) => finite(c.settling_time))) });
  const cat: CategoricalField[] = [];
  const random = isRandom(study);
  cat.push(categorical('status', cases.map((c) => c.status), random));
  cat.push(categorical('largest', cases.map((c) => c.largest ?? NOT_COMPLETED), random));
  cat.push(categorical('outcome', cases.map((c) => c.outcome ?? NOT_COMPLETED), random));
  if (study.expectations.length) {
    cat.push(categorical('all expectations passed', cases.map((c) => (c.status !== 'completed' ? NOT_COMPLETED : c.expectations.every((e) => e.passed) ? 'yes' : 'no')), random));
    study.expectations.forEach((name, i) => {
      cat.push(categorical(`expect: ${name}`, cases.map((c) => (c.status !== 'completed' || !c.expectations[i] ? NOT_COMPLETED : c.expectations[i].passed ? 'passed' : 'failed')), random));
    });
  }
  cat.push(categorical('warnings', cases.map((c) => (c.warnings.length ? 'some' : 'none')), random));
  return { cases: cases.length, numeric, categorical: cat };
}

/** Per grid point, when the study has both a grid and random draws. */
export function groupSummaries(study: Study, cases: readonly CaseResult[]): GroupSummary[] {
  if (!(study.groups > 1 && study.samples > 1)) return [];
  const gridPaths = new Set(study.vary.filter((v) => v.kind === 'list' || v.kind === 'range').map((v) => v.path));
  const byGroup = new Map<number, CaseResult[]>();
  for (const c of cases) {
    const list = byGroup.get(c.group) ?? [];
    list.push(c);
    byGroup.set(c.group, list);
  }
  return [...byGroup.keys()].sort((a, b) => a - b).map((g) => {
    const members = byGroup.get(g) as CaseResult[];
    return { group: g, params: members[0].params.filter((p) => gridPaths.has(p.path)), summary: summariseCases(study, members) };
  });
}

// ---- JSON ------------------------------------------------------------------------------------

function paramJson(p: ParamValue): ParamValue {
  return { path: p.path, text: p.text, si: p.si };
}

/** A case in the canonical key order. */
function caseJson(study: Study, c: CaseResult): CaseResult {
  const chambers: Record<string, ChamberOutcome> = {};
  for (const name of study.chambers) {
    const ch = c.chambers[name];
    if (ch) chambers[name] = { gauge: ch.gauge, volume: ch.volume, stretch: ch.stretch, peak_gauge: ch.peak_gauge };
  }
  return {
    index: c.index,
    group: c.group,
    params: c.params.map(paramJson),
    status: c.status,
    message: c.message,
    largest: c.largest,
    outcome: c.outcome,
    settling_time: c.settling_time,
    expectations: c.expectations.map((e) => ({ name: e.name, passed: e.passed, actual: e.actual })),
    chambers,
    ...(c.cylinders ? { cylinders: c.cylinders } : {}),
    mass_drift: c.mass_drift,
    warnings: [...c.warnings],
  };
}

function studyJson(s: Study): Study {
  return {
    id: s.id,
    netlist: { file: s.netlist.file, sha256: s.netlist.sha256 },
    title: s.title,
    vary: s.vary.map((v) => ({ path: v.path, values: v.values, kind: v.kind, unit: v.unit })),
    seed: s.seed,
    samples: s.samples,
    groups: s.groups,
    cases: s.cases,
    chambers: [...s.chambers],
    expectations: [...s.expectations],
  };
}

/** The study as JSON: study, shard (for a slice), summary, groups (grid × random), cases. */
export function sweepJson(r: SweepResult): string {
  const out: Record<string, unknown> = { format: 1, kind: 'plenum-sweep', study: studyJson(r.study) };
  if (r.shard) out.shard = { index: r.shard.index, count: r.shard.count };
  out.summary = summariseCases(r.study, r.cases);
  const groups = groupSummaries(r.study, r.cases);
  if (groups.length) out.groups = groups;
  out.cases = r.cases.map((c) => caseJson(r.study, c));
  return JSON.stringify(out, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}

// ---- CSV -------------------------------------------------------------------------------------

function num(x: number | null | undefined): string {
  if (typeof x !== 'number' || !Number.isFinite(x)) return '';
  if (x === 0) return '0';
  return String(Number(x.toPrecision(12)));
}

/** RFC 4180: quote a field holding a comma, a quote or a line break. */
function field(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** One row per case: parameters (SI), outcome, per-chamber final and peak values. */
export function sweepCsv(r: SweepResult): string {
  const { study, cases } = r;
  const head: string[] = ['case'];
  study.vary.forEach((v) => head.push(v.unit === null ? v.path : `${v.path} [${v.unit}]`));
  head.push('status', 'largest', 'outcome', 'settling time [s]', 'expectations passed', 'expectations failed');
  const chamberCols: { name: string; field: keyof ChamberOutcome }[] = [];
  for (const name of study.chambers) {
    for (const f of CHAMBER_FIELDS) {
      if (f.field === 'stretch' && !hasField(cases, name, 'stretch')) continue;
      chamberCols.push({ name, field: f.field });
      head.push(`${name}.${f.field} [${f.unit}]`);
    }
  }
  const cylinderCols: { name: string; field: keyof CylinderOutcome }[] = [];
  for (const name of study.cylinders ?? []) {
    for (const f of CYLINDER_FIELDS) {
      cylinderCols.push({ name, field: f.field });
      head.push(`${name}.${f.field} [${f.unit}]`);
    }
  }
  head.push('mass drift [-]', 'message');
  const lines = [head.map(field).join(',')];
  for (const c of cases) {
    const row: string[] = [String(c.index)];
    study.vary.forEach((v, i) => row.push(v.unit === null ? field(c.params[i]?.text ?? '') : num(c.params[i]?.si)));
    row.push(c.status, field(c.largest ?? ''), field(c.outcome ?? ''), num(c.settling_time));
    const passed = c.expectations.filter((e) => e.passed).length;
    row.push(String(passed), String(c.expectations.length - passed));
    for (const col of chamberCols) row.push(num(c.chambers[col.name]?.[col.field] as number | null | undefined));
    for (const col of cylinderCols) row.push(num(c.cylinders?.[col.name]?.[col.field]));
    row.push(num(c.mass_drift), field(c.message));
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}

// ---- text ------------------------------------------------------------------------------------

function percent(x: number): string {
  return `${(100 * x).toFixed(1)} %`;
}

/** A unit for people and the factor from SI to it, chosen from the largest magnitude shown. */
function displayUnit(key: string, unit: string, big: number): { unit: string; factor: number } {
  if (key.endsWith('.gauge') || key.endsWith('.peak_gauge')) return { unit: 'kPa gauge', factor: 1e-3 };
  if (unit === 'm^3') return big < 1e-3 ? { unit: 'mL', factor: 1e6 } : { unit: 'L', factor: 1e3 };
  const base = /^(m|Pa|s)( gauge| abs)?$/.exec(unit);
  if (!base || !(big > 0)) return { unit, factor: 1 };
  const prefixes: [string, number][] = base[1] === 'Pa' ? [['M', 1e-6], ['k', 1e-3], ['', 1]] : [['', 1], ['m', 1e3], ['u', 1e6]];
  for (const [pre, factor] of prefixes) if (big * factor >= 1 || factor === prefixes[prefixes.length - 1][1]) return { unit: `${pre}${base[1]}${base[2] ?? ''}`, factor };
  return { unit, factor: 1 };
}

function cell(x: number): string {
  if (!Number.isFinite(x)) return '—';
  return String(Number(x.toPrecision(4)));
}

/** A short report for the terminal: cases, probabilities with intervals, numeric ranges. */
export function sweepSummaryText(r: SweepResult): string {
  const s = summariseCases(r.study, r.cases);
  const out: string[] = [];
  const shard = r.shard ? ` (shard ${r.shard.index}/${r.shard.count}: ${r.cases.length} of ${r.study.cases} cases)` : '';
  out.push(`${printable(r.study.title)}: study ${r.study.id}, ${r.study.cases} cases${shard}`);
  for (const c of s.categorical) {
    if (c.key === 'warnings' && c.values.length === 1 && c.values[0].value === 'none') continue;
    out.push(`  ${c.key}:`);
    for (const v of c.values) {
      const interval = v.low !== null && v.high !== null ? `  [${percent(v.low)}, ${percent(v.high)}]` : '';
      out.push(`    ${shortValue(v.value).padEnd(24)} ${percent(v.p).padStart(7)}${interval}  (${v.count} of ${v.n})`);
    }
  }
  out.push(`  ${'values (completed cases)'.padEnd(44)} ${['mean', 'sd', 'min', 'max'].map((h) => h.padStart(10)).join(' ')}`);
  // a large network gives four rows a chamber: show the varied parameters, the settling time
  // and the outputs that vary most relative to their size; --csv and --json carry them all
  const varied = new Set(r.study.vary.map((v) => v.path));
  const isOutput = (f: NumericField): boolean => !varied.has(f.key) && f.key !== 'settling_time';
  const spread = (f: NumericField): number => (Number.isFinite(f.sd) ? f.sd / Math.max(Math.abs(f.mean), 1e-300) : -1);
  const keep = new Set(keepLargest(s.numeric.filter(isOutput), spread, MAX_SUMMARY_ROWS));
  const rows = s.numeric.filter((f) => !isOutput(f) || keep.has(f));
  for (const f of rows) {
    const u = displayUnit(f.key, f.unit, Math.max(Math.abs(f.min), Math.abs(f.max)));
    const label = u.unit === '-' ? f.key : `${f.key} [${u.unit}]`;
    out.push(`    ${label.padEnd(42)} ${[f.mean, f.sd, f.min, f.max].map((x) => cell(x * u.factor).padStart(10)).join(' ')}`);
  }
  if (rows.length < s.numeric.length) {
    out.push(`    ... ${s.numeric.length - rows.length} more outputs, which vary less (all of them in --csv and --json)`);
  }
  out.push(isRandom(r.study)
    ? '  (probabilities with Wilson 95 % intervals: the cases are random draws)'
    : '  (shares of a deterministic grid: exact, no confidence intervals)');
  return out.join('\n') + '\n';
}

/** A categorical value for the terminal: a tie of many chambers (`c0=c2=…`) by its ends and count. */
function shortValue(v: string): string {
  const parts = v.split('=');
  return v.length <= 60 || parts.length < 4 ? v : `${parts.slice(0, 2).join('=')}=…=${parts[parts.length - 1]} (${parts.length} chambers)`;
}

/** Output rows the terminal summary shows at most (besides the varied parameters). */
const MAX_SUMMARY_ROWS = 40;

// ---- merge -----------------------------------------------------------------------------------

function fail(file: string, message: string, hint: string): { ok: false; diagnostics: Diagnostic[] } {
  return { ok: false, diagnostics: [{ code: 'merge', severity: 'error', message, file, line: 0, column: 0, path: [], hint }] };
}

type Shape = 'string' | 'number' | 'boolean' | 'int' | 'string?' | 'number?' | ((v: unknown) => string | null);

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Where `v` departs from `shape` (a field name and what it should be), or null. */
function misfit(v: unknown, shape: Record<string, Shape>): string | null {
  if (!isObject(v)) return 'not an object';
  for (const [key, want] of Object.entries(shape)) {
    const x = v[key];
    if (typeof want === 'function') {
      const why = want(x);
      if (why) return `\`${key}\` ${why}`;
      continue;
    }
    const optional = want.endsWith('?');
    const base = optional ? want.slice(0, -1) : want;
    if (optional && x === null) continue;
    const ok = base === 'int' ? Number.isSafeInteger(x) && (x as number) >= 0 : base === 'number' ? typeof x === 'number' || x === null : typeof x === base;
    if (!ok) return `\`${key}\` is not ${base === 'int' ? 'a whole number' : `a ${base}`}${optional ? ' or null' : ''}`;
  }
  return null;
}

const listOf = (shape: Shape) => (v: unknown): string | null => {
  if (!Array.isArray(v)) return 'is not a list';
  for (let i = 0; i < v.length; i++) {
    const why = typeof shape === 'string' ? misfit({ x: v[i] }, { x: shape }) : shape(v[i]);
    if (why) return `[${i}]: ${why}`;
  }
  return null;
};
const objectOf = (shape: Record<string, Shape>) => (v: unknown): string | null => misfit(v, shape);
const mapOf = (shape: Record<string, Shape>) => (v: unknown): string | null => {
  if (!isObject(v)) return 'is not an object';
  for (const [k, x] of Object.entries(v)) {
    const why = misfit(x, shape);
    if (why) return `.${k}: ${why}`;
  }
  return null;
};

const STUDY_SHAPE: Record<string, Shape> = {
  id: 'string', netlist: objectOf({ file: 'string', sha256: 'string' }), title: 'string',
  vary: listOf(objectOf({ path: 'string', values: 'string', kind: 'string', unit: 'string?' })),
  seed: 'number?', samples: 'int', groups: 'int', cases: 'int', chambers: listOf('string'), expectations: listOf('string'),
};
const CASE_SHAPE: Record<string, Shape> = {
  index: 'int', group: 'int', params: listOf(objectOf({ path: 'string', text: 'string', si: 'number?' })),
  status: 'string', message: 'string', largest: 'string?', outcome: 'string?', settling_time: 'number?',
  expectations: listOf(objectOf({ name: 'string', passed: 'boolean', actual: 'number?' })),
  chambers: mapOf({ gauge: 'number?', volume: 'number?', stretch: 'number?', peak_gauge: 'number?' }),
  mass_drift: 'number?', warnings: listOf('string'),
};
const SHARD_SHAPE: Record<string, Shape> = { index: 'int', count: 'int' };

/** Reads a study JSON written by sweepJson (a shard or a whole study). */
export function parseSweepJson(text: string, file: string): Result<SweepResult> {
  let j: unknown;
  try {
    j = JSON.parse(text);
  } catch (e) {
    return fail(file, `not JSON: ${e instanceof Error ? e.message : String(e)}`, 'give the files `plenum sweep --json` wrote');
  }
  const o = j as { format?: unknown; kind?: unknown; study?: Study; shard?: Shard; cases?: CaseResult[] };
  if (!o || typeof o !== 'object' || o.kind !== 'plenum-sweep' || o.format !== 1 || !o.study || !Array.isArray(o.cases)) {
    return fail(file, 'not a study written by `plenum sweep --json`', 'give the files `plenum sweep --json` wrote');
  }
  const bad = misfit(o.study, STUDY_SHAPE) ?? (o.shard !== undefined ? misfit(o.shard, SHARD_SHAPE) : null);
  if (bad) return fail(file, `is not a study as \`plenum sweep --json\` writes it: ${o.shard !== undefined && !misfit(o.study, STUDY_SHAPE) ? 'shard' : 'study'}: ${bad}`, 'give the files `plenum sweep --json` wrote, unedited');
  if (o.shard && !(o.shard.index >= 1 && o.shard.index <= o.shard.count)) return fail(file, `is shard ${o.shard.index}/${o.shard.count}, which cannot be`, 'give the files `plenum sweep --json` wrote, unedited');
  const badCase = listOf(objectOf(CASE_SHAPE))(o.cases);
  if (badCase) return fail(file, `is not a study as \`plenum sweep --json\` writes it: cases${badCase}`, 'give the files `plenum sweep --json` wrote, unedited');
  const value: SweepResult = o.shard ? { study: o.study, shard: o.shard, cases: o.cases } : { study: o.study, cases: o.cases };
  return { ok: true, value, warnings: [] };
}

/**
 * Joins the shards of one study: they must share the study (netlist, vary, seed, samples),
 * be shards of the same count, and hold every case exactly once in its own shard.
 */
export function mergeSweeps(parts: { file: string; result: SweepResult }[]): Result<SweepResult> {
  if (!parts.length) return fail('merge', 'nothing to merge', 'give the shard files, e.g. `plenum merge s1.json s2.json --json study.json`');
  const first = parts[0];
  const study = first.result.study;
  const same = JSON.stringify(studyJson(study));
  for (const p of parts.slice(1)) {
    if (p.result.study.id !== study.id || JSON.stringify(studyJson(p.result.study)) !== same) {
      return fail(p.file, `belongs to study ${p.result.study.id}, not to study ${study.id} of ${first.file}`, 'merge shards run with the same netlist, --vary, --samples and --seed');
    }
  }
  const count = first.result.shard?.count ?? 1;
  const seenShards = new Map<number, string>();
  for (const p of parts) {
    const sh = p.result.shard ?? { index: 1, count: 1 };
    if (sh.count !== count) return fail(p.file, `is shard ${sh.index}/${sh.count}, but ${first.file} is one of ${count}`, 'merge the shards of one split');
    const prev = seenShards.get(sh.index);
    if (prev !== undefined) return fail(p.file, `is shard ${sh.index}/${count} again (also ${prev})`, 'give each shard once');
    seenShards.set(sh.index, p.file);
  }
  const missingShards = [];
  for (let k = 1; k <= count; k++) if (!seenShards.has(k)) missingShards.push(k);
  if (missingShards.length) return fail('merge', `shard${missingShards.length > 1 ? 's' : ''} ${missingShards.map((k) => `${k}/${count}`).join(', ')} missing`, 'run the missing shards with `--shard K/N` and merge all of them');

  const cases = new Array<CaseResult | undefined>(study.cases);
  for (const p of parts) {
    const sh = p.result.shard ?? { index: 1, count: 1 };
    for (const c of p.result.cases) {
      const k = c.index;
      if (!Number.isInteger(k) || k < 0 || k >= study.cases) return fail(p.file, `has a case ${k} outside the study's 0..${study.cases - 1}`, 'the file is not as `plenum sweep` wrote it');
      if (k % count !== sh.index - 1) return fail(p.file, `holds case ${k}, which belongs to shard ${(k % count) + 1}/${count}`, 'the file is not as `plenum sweep` wrote it');
      if (cases[k]) return fail(p.file, `holds case ${k} twice`, 'the file is not as `plenum sweep` wrote it');
      cases[k] = c;
    }
  }
  const missing = cases.findIndex((c) => c === undefined);
  if (missing >= 0) return fail(seenShards.get((missing % count) + 1) ?? 'merge', `case ${missing} is missing`, 'rerun that shard; it did not finish');
  return { ok: true, value: { study, cases: cases as CaseResult[] }, warnings: [] };
}

