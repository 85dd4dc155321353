/**
 * One evaluation of a calibration or sizing study: the netlist with an experiment's overrides
 * and the trial parameter values, read and built like a user's netlist, simulated, and boiled
 * down to the probed channels at the measured times and each expectation's margin. Runs in a
 * worker thread (eval-worker.ts) or in the main thread; the result depends only on its inputs.
 */
import { formatDiagnostic } from '../diag/diagnostic.js';
import { buildModel } from '../model/build.js';
import { readWithOverrides, splitPath, overrideValue, type Override } from '../netlist/override.js';
import { simulate } from '../transient/transient.js';
import { expectationMargin } from './margins.js';

/** A value set by path, written as netlist text. */
export interface PathValue { path: string; text: string }

export interface EvalExperiment {
  /** The experiment's own conditions. */
  overrides: PathValue[];
  /** Channels to read at these times (calibration); absent for sizing. */
  probe?: { times: number[]; keys: string[] };
}

export interface EvalSetup {
  source: string;
  file: string;
  experiments: EvalExperiment[];
  /** Relative tolerance to run at when tighter than the netlist's (finite differences need smooth outputs). */
  tolerance?: number;
}

export interface EvalJob {
  experiment: number;
  /** Trial values (after the experiment's overrides: they win). */
  params: PathValue[];
}

export interface EvalResult {
  status: 'completed' | 'failed' | 'invalid';
  message: string;
  /** probed[c][k], as EvalExperiment.probe asked (NaN where the run did not reach). */
  probed?: Float64Array[];
  expectations: { name: string; passed: boolean; actual: number; margin: number; message: string }[];
  /** Ambient pressure of the run, Pa. */
  ambient: number;
  /** The run's end time, s. */
  end: number;
}

function overridesOf(values: readonly PathValue[]): Override[] {
  return values.map((p) => ({ path: splitPath(p.path), value: overrideValue(p.text), label: `${p.path} = ${p.text}` }));
}

export class Evaluator {
  constructor(readonly setup: EvalSetup) {}

  run(job: EvalJob): EvalResult {
    const ex = this.setup.experiments[job.experiment];
    const byPath = new Map<string, PathValue>();
    for (const v of [...ex.overrides, ...job.params]) byPath.set(v.path, v);
    const overrides = overridesOf([...byPath.values()]);
    const doc = readWithOverrides(this.setup.source, this.setup.file, overrides);
    const fail = (message: string): EvalResult => ({ status: 'invalid', message, expectations: [], ambient: Number.NaN, end: 0 });
    if (!doc.ok) return fail(doc.diagnostics.filter((d) => d.severity === 'error').map(formatDiagnostic).join('\n'));
    const built = buildModel(doc.value);
    if (!built.ok) return fail(built.diagnostics.filter((d) => d.severity === 'error').map(formatDiagnostic).join('\n'));
    let model = built.value;
    const tol = this.setup.tolerance;
    if (tol !== undefined && tol < model.simulate.tolerance) model = { ...model, simulate: { ...model.simulate, tolerance: tol } };
    const r = simulate(model, ex.probe ? { probe: ex.probe } : {});
    return {
      status: r.status,
      message: r.message,
      probed: r.probed,
      expectations: r.expectations.map((e, i) => ({ name: e.name, passed: e.passed, actual: e.actual, message: e.message, margin: expectationMargin(model.expect[i], e.actual, model.pa) })),
      ambient: model.pa,
      end: r.end,
    };
  }
}

/** What a job that threw reports: a bug, not a reason to end the study. */
export function crashedEval(e: unknown): EvalResult {
  const why = e instanceof Error ? e.message : String(e);
  return { status: 'failed', message: `internal error: ${why} (a bug in plenum; please report it with the netlist)`, expectations: [], ambient: Number.NaN, end: 0 };
}
