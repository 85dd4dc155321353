/**
 * Engineering studies: run a netlist over a grid of parameter values and/or random draws
 * (Monte Carlo), in parallel, and summarise the outcomes.
 *
 *   const s = await runSweep({ source, file, vary: ['chambers.cell_a.thickness=1.5 mm±3%'], samples: 200, seed: 7 });
 *   if (s.ok) writeFileSync('study.json', sweepJson(s.value));
 *
 * A study is identified by a hash of the netlist text, the `--vary` arguments, the seed and
 * the number of samples. A shard K of N runs the cases k with k mod N = K − 1; mergeSweeps
 * joins the shards into exactly the result (to the byte, once written) of a single run.
 */
import { createHash } from 'node:crypto';
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { formatDiagnostic } from '../diag/diagnostic.js';
import { buildModel } from '../model/build.js';
import { checkPath } from '../netlist/override.js';
import { readNetlist } from '../netlist/read.js';
import { ALL_TABLES } from '../netlist/kinds.js';
import { DIMENSIONS, type Dimension } from '../units/dimensions.js';
import { CaseRunner, type CaseResult } from './sweep-case.js';
import { CasePool, defaultJobs } from './sweep-pool.js';
import { caseSpec, parseVary, planStudy, preflightSpecs, type CaseSpec, type StudyPlan, type VaryKind, type VarySpec } from './sweep-spec.js';

export interface Study {
  /** First 16 hex digits of the SHA-256 of the netlist hash, vary arguments, seed and samples. */
  id: string;
  netlist: { file: string; sha256: string };
  title: string;
  vary: { path: string; values: string; kind: VaryKind; unit: string | null }[];
  /** The seed of the random draws; null when nothing is random. */
  seed: number | null;
  samples: number;
  groups: number;
  cases: number;
  chambers: string[];
  /** Present when the netlist has cylinders. */
  cylinders?: string[];
  expectations: string[];
}

export interface Shard {
  /** 1-based. */
  index: number;
  count: number;
}

export interface SweepResult {
  study: Study;
  /** Present when this is one slice of the study. */
  shard?: Shard;
  /** In case order. */
  cases: CaseResult[];
}

export interface SweepOptions {
  /** Netlist text and its file name (as shown in messages). */
  source: string;
  file: string;
  /** `PATH=VALUES` arguments, as for `plenum sweep --vary`. */
  vary: string[];
  samples?: number;
  seed?: number;
  shard?: Shard;
  /** Worker threads (default: the available cores); 1 runs in this thread. */
  jobs?: number;
  progress?: (done: number, total: number) => void;
  /** Worker script, for tests (see sweep-pool.ts). */
  worker?: URL;
}

export interface PreparedSweep {
  plan: StudyPlan;
  study: Study;
  /** The case indices this run (or shard) computes. */
  indices: number[];
}

function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

function baseName(file: string): string {
  return file.split(/[\\/]/).pop() || file;
}

function usage(code: string, message: string, hint: string, path: string[] = []): Diagnostic {
  return { code, severity: 'error', message, file: '--vary', line: 0, column: 0, path, hint };
}

/** The study's identity: what must agree for two shards to belong together. */
export function studyId(netlistSha: string, vary: readonly string[], seed: number | null, samples: number): string {
  return sha256(JSON.stringify({ netlist: netlistSha, vary, seed, samples })).slice(0, 16);
}

/** The case indices of shard K of N (k mod N = K − 1), or all of them. */
export function shardIndices(cases: number, shard?: Shard): number[] {
  const out: number[] = [];
  const step = shard ? shard.count : 1;
  for (let k = shard ? shard.index - 1 : 0; k < cases; k += step) out.push(k);
  return out;
}

/** The first error of each kind among the preflight answers, in preflight order. */
function preflightErrors(answers: readonly Diagnostic[][]): Diagnostic[] {
  const seen = new Set<string>();
  const out: Diagnostic[] = [];
  for (const list of answers) {
    for (const d of list) {
      const key = formatDiagnostic(d);
      if (d.severity === 'error' && !seen.has(key)) { seen.add(key); out.push(d); }
    }
  }
  return out;
}

/**
 * Checks everything before a case runs: the netlist, every `--vary` (syntax, path, units) and,
 * by reading and building the netlist with them, every grid value and each random parameter's
 * centre and range ends. Diagnostics of overridden values name the override. In this thread;
 * runSweep does the same with the reading and building spread over its workers.
 */
export function prepareSweep(opts: SweepOptions): Result<PreparedSweep> {
  const planned = planSweep(opts);
  if (!planned.ok) return planned;
  const runner = new CaseRunner(opts.source, opts.file);
  const errors = preflightErrors(preflightSpecs(planned.value.plan).map((params) => {
    const m = runner.model(params);
    return m.ok ? [] : m.diagnostics;
  }));
  return errors.length ? { ok: false, diagnostics: errors } : planned;
}

/** prepareSweep without the preflight of the varied values. */
function planSweep(opts: SweepOptions): Result<PreparedSweep> {
  const doc = readNetlist(opts.source, opts.file);
  if (!doc.ok) return doc;
  const model = buildModel(doc.value);
  if (!model.ok) return model;
  const diagnostics: Diagnostic[] = [];
  const vary: VarySpec[] = [];
  if (!opts.vary.length) diagnostics.push(usage('vary-missing', 'nothing is varied', 'add e.g. `--vary chambers.cell_a.thickness=1.2 mm,1.5 mm`'));
  for (const arg of opts.vary) {
    const v = parseVary(arg);
    if (!v.ok) { diagnostics.push(...v.diagnostics); continue; }
    const p = checkPath(opts.source, v.value.path);
    if (!p.ok) { diagnostics.push(usage('vary-path', `${p.message} (in --vary ${v.value.path})`, p.hint, [v.value.path])); continue; }
    const bare = bareDimensional(v.value);
    if (bare) { diagnostics.push(bare); continue; }
    vary.push(v.value);
  }
  if (opts.samples !== undefined && !(Number.isInteger(opts.samples) && opts.samples >= 1)) {
    diagnostics.push(usage('samples', `--samples ${opts.samples} is not a whole number of at least 1`, 'write e.g. `--samples 200`'));
  }
  if (opts.seed !== undefined && !(Number.isSafeInteger(opts.seed) && opts.seed >= 0)) {
    diagnostics.push(usage('seed', `--seed ${opts.seed} is not a whole number 0..2^53-1`, 'write e.g. `--seed 42`'));
  }
  if (diagnostics.length) return { ok: false, diagnostics };
  const planned = planStudy(vary, { samples: opts.samples, seed: opts.seed });
  if (!planned.ok) return planned;
  const plan = planned.value;
  if (opts.shard && !(Number.isInteger(opts.shard.count) && opts.shard.count >= 1 && Number.isInteger(opts.shard.index) && opts.shard.index >= 1 && opts.shard.index <= opts.shard.count)) {
    return { ok: false, diagnostics: [usage('shard', `shard ${opts.shard.index}/${opts.shard.count} does not exist`, 'write --shard K/N with 1 ≤ K ≤ N, e.g. `--shard 2/4`')] };
  }

  const random = plan.random.length > 0;
  const netlistSha = sha256(opts.source);
  const study: Study = {
    id: studyId(netlistSha, plan.vary.map((v) => v.arg.trim()), random ? plan.seed : null, plan.samples),
    netlist: { file: baseName(opts.file), sha256: netlistSha },
    title: doc.value.title,
    vary: plan.vary.map((v) => ({ path: v.path, values: v.arg.slice(v.arg.indexOf('=') + 1).trim(), kind: v.kind, unit: v.siLabel ?? null })),
    seed: random ? plan.seed : null,
    samples: plan.samples,
    groups: plan.groups,
    cases: plan.cases,
    chambers: model.value.chambers.map((c) => c.name),
    ...(model.value.cylinders.length ? { cylinders: model.value.cylinders.map((c) => c.name) } : {}),
    expectations: model.value.expect.map((e) => e.name),
  };
  return { ok: true, value: { plan, study, indices: shardIndices(plan.cases, opts.shard) }, warnings: [...doc.warnings, ...model.warnings] };
}

/**
 * A `--vary` of a dimensional parameter written in bare numbers. In a netlist a bare number
 * is SI, but on the command line `lines.hose.diameter=2,3` is almost always meant in mm and
 * would be 2 m and 3 m: such values must carry a unit. Undefined when the values are fine.
 */
function bareDimensional(v: VarySpec): Diagnostic | undefined {
  if (v.siLabel !== '-' || /%/.test(v.arg)) return undefined;
  const name = v.path.split('.').pop() ?? '';
  const dims = new Set(ALL_TABLES.flatMap((t) => t.params).filter((q) => q.name === name).map((q) => q.dimension as string));
  if (dims.size !== 1) return undefined;
  const dim = [...dims][0] as Dimension;
  if (!(dim in DIMENSIONS) || dim === 'dimensionless') return undefined;
  const info = DIMENSIONS[dim];
  const body = v.arg.slice(v.arg.indexOf('=') + 1).trim();
  const si = (v.values ?? []).slice(0, 3).map((x) => `${x} ${info.label}`).join(', ');
  return usage('vary-unit', `${v.path}: the values \`${body}\` have no unit; a bare number is SI, so they would be read as ${si || `${info.label}`}`,
    `write the unit, e.g. \`${v.path}=${body.split(',').map((x) => `${x.trim()} ${info.example.replace(/^[\d.]+\s*/, '')}`).join(',')}\` (or \`${info.label}\` if that is meant)`, [v.path]);
}

/** Runs a study (or one shard of it). Diagnostics when the netlist or a `--vary` is invalid. */
export async function runSweep(opts: SweepOptions): Promise<Result<SweepResult>> {
  const prepared = planSweep(opts);
  if (!prepared.ok) return prepared;
  const { plan, study, indices } = prepared.value;
  const specs: CaseSpec[] = indices.map((k) => caseSpec(plan, k));
  const preflight = preflightSpecs(plan);
  // one pool for the preflight and the cases: each worker reads the netlist once
  const pool = new CasePool(opts.source, opts.file, opts.jobs ?? defaultJobs(), opts.worker, Math.max(specs.length, preflight.length));
  try {
    const checked = await pool.run(preflight.map((params) => ({ preflight: params })));
    const errors = preflightErrors(checked.map((a) => ('diagnostics' in a ? a.diagnostics : [])));
    if (errors.length) return { ok: false, diagnostics: errors };
    const answers = await pool.run(specs.map((spec) => ({ spec })), opts.progress);
    const cases = answers.map((a) => (a as { result: CaseResult }).result);
    const value: SweepResult = opts.shard ? { study, shard: opts.shard, cases } : { study, cases };
    return { ok: true, value, warnings: prepared.warnings };
  } finally {
    await pool.close();
  }
}
