/**
 * The robustness properties, shared by the default tests (fuzz.test.ts, a moderate number of
 * runs with a fixed seed) and `npm run fuzz` (run.ts, many runs with fresh seeds):
 *
 * 1. A random valid network reads, builds and simulates without throwing; a completed run
 *    conserves mass (relative drift < 1e-9) and ends with finite values; a run that stops
 *    early says why (a fault with a cause and a message).
 * 2. Random mutations of a valid netlist give diagnostics (each with a code, a position and a
 *    hint) or a netlist that runs as in 1; nothing ever throws.
 */
import fc from 'fast-check';
import { simulate } from '../../src/transient/transient.js';
import type { RunResult } from '../../src/transient/results.js';
import type { Diagnostic } from '../../src/diag/diagnostic.js';
import { buildModel } from '../../src/model/build.js';
import type { Model } from '../../src/model/types.js';
import { readNetlist } from '../../src/netlist/read.js';
import { mutate, mutation, validNetlist } from './arbitraries.js';

/** Budgets for runs of mutated netlists, whose durations and sizes may be anything. */
const MUTANT_BUDGET = { maxSteps: 20_000, maxWall: 5 };

export interface Tally { accepted: number; rejected: number; completed: number; failed: number; causes: Record<string, number> }

export function newTally(): Tally {
  return { accepted: 0, rejected: 0, completed: 0, failed: 0, causes: {} };
}

function fail(why: string, text: string): never {
  throw new Error(`${why}\n--- netlist ---\n${text}`);
}

/** readNetlist + buildModel, as the CLI does. */
export function load(text: string): { ok: true; model: Model } | { ok: false; diagnostics: Diagnostic[] } {
  const doc = readNetlist(text, 'fuzz.yaml');
  if (!doc.ok) return { ok: false, diagnostics: doc.diagnostics };
  const model = buildModel(doc.value);
  return model.ok ? { ok: true, model: model.value } : { ok: false, diagnostics: model.diagnostics };
}

function checkDiagnostics(ds: Diagnostic[], text: string): void {
  if (!ds.some((d) => d.severity === 'error')) fail('rejected without an error', text);
  for (const d of ds) {
    if (!/^[a-z0-9-]+$/.test(d.code) || !(d.line >= 1) || !(d.column >= 1) || !d.hint || !d.message) {
      fail(`a diagnostic without code, position or hint: ${JSON.stringify(d)}`, text);
    }
  }
}

/**
 * Slack allowed past a wall-time budget (docs/robustness.md): the step under way is finished,
 * then diagnosis and summaries run; for these small networks a fraction of a second, so 2 s is
 * generous (a machine shared with other jobs included) and a run far past it is a finding.
 */
const WALL_SLACK_MS = 2000;

function checkRun(r: RunResult, text: string, tally: Tally, maxWall?: number): void {
  if (maxWall !== undefined && r.stats.wall_ms > maxWall * 1000 + WALL_SLACK_MS) {
    fail(`the run took ${r.stats.wall_ms} ms against max-wall = ${maxWall} s`, text);
  }
  if (r.status === 'completed') {
    tally.completed++;
    if (!(Math.abs(r.mass.drift) < 1e-9)) fail(`mass drift ${r.mass.drift}`, text);
    for (const [name, c] of Object.entries(r.chambers)) {
      for (const [k, v] of Object.entries(c.final)) if (!Number.isFinite(v)) fail(`${name}.${k} = ${v} at the end of a completed run`, text);
    }
  } else {
    tally.failed++;
    if (!r.fault || !r.message) fail(`a failed run without a fault: ${r.message}`, text);
    tally.causes[r.fault.cause] = (tally.causes[r.fault.cause] ?? 0) + 1;
    if (!(r.end >= 0) || r.trace.times.some((t) => t > r.end)) fail(`samples after the end ${r.end}`, text);
  }
}

/** Property 1: valid networks simulate and conserve mass. */
export function validNetworksRun(tally: Tally): fc.IProperty<[{ text: string; chambers: number }]> {
  return fc.property(validNetlist, ({ text }) => {
    const m = load(text);
    if (!m.ok) {
      tally.rejected++;
      // the generator makes valid netlists; a rejection is a finding (of the generator or the reader)
      fail(`a generated netlist was rejected:\n${m.diagnostics.map((d) => `${d.line}:${d.column} ${d.code} ${d.message}`).join('\n')}`, text);
    }
    tally.accepted++;
    checkRun(simulate(m.model), text, tally, m.model.simulate.maxWall);
  });
}

/** Property 2: mutations give diagnostics or a run, never an exception. */
export function mutantsAreHandled(tally: Tally): fc.IProperty<[{ text: string; chambers: number }, Parameters<typeof mutate>[1][]]> {
  return fc.property(validNetlist, fc.array(mutation, { minLength: 1, maxLength: 4 }), ({ text }, ms) => {
    const damaged = ms.reduce(mutate, text);
    const m = load(damaged);
    if (!m.ok) {
      tally.rejected++;
      checkDiagnostics(m.diagnostics, damaged);
      return;
    }
    tally.accepted++;
    const s = m.model.simulate;
    const model: Model = { ...m.model, simulate: { ...s, maxSteps: Math.min(s.maxSteps ?? Infinity, MUTANT_BUDGET.maxSteps), maxWall: Math.min(s.maxWall ?? Infinity, MUTANT_BUDGET.maxWall) } };
    checkRun(simulate(model), damaged, tally, model.simulate.maxWall);
  });
}
