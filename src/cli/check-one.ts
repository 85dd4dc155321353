/**
 * Checks one netlist for `plenum check`: read, build, simulate, judge the expectations. Runs in
 * the main thread or in a worker (check-worker.ts); never throws for user or numerical trouble.
 * Also the small protocol the two share.
 */
import { performance } from 'node:perf_hooks';
import type { Diagnostic } from '../diag/diagnostic.js';
import { loadModel } from '../transient/load.js';
import { simulate } from '../transient/transient.js';
import type { NetlistCheck } from '../report/junit.js';
import { readBounded } from './netlist-file.js';

/** Layout of the control block the main thread shares with the workers: [next index to take, stop flag]. */
export const NEXT = 0;
export const STOP = 1;

export interface CheckWorkerData { files: string[]; control: SharedArrayBuffer }
export type CheckMessage = { kind: 'start'; index: number } | { kind: 'done'; index: number; check: NetlistCheck };

function invalid(file: string, diagnostics: Diagnostic[], started: number): NetlistCheck {
  const n = diagnostics.filter((d) => d.severity === 'error').length;
  return {
    file, status: 'invalid', message: `${n} error${n === 1 ? '' : 's'} in the netlist; nothing was simulated`,
    diagnostics, expectations: [], unjudged: [], warnings: [], seconds: (performance.now() - started) / 1000,
  };
}

function unreadable(file: string, why: string): Diagnostic {
  return { code: 'unreadable', severity: 'error', message: `cannot read the netlist (${why})`, file, line: 0, column: 0, path: [] };
}

export function checkNetlist(file: string, interrupt?: () => string | null): NetlistCheck {
  const started = performance.now();
  // bounded: a huge file or an endless device is refused, not read into memory
  const read = readBounded(file);
  if ('unreadable' in read) return invalid(file, [unreadable(file, read.unreadable)], started);
  if ('tooLarge' in read) return invalid(file, [read.tooLarge], started);
  const m = loadModel(read.text, file);
  if (!m.ok) return invalid(file, m.diagnostics, started);
  const model = m.value;
  const r = simulate(model, { interrupt, record: 'outcomes' }); // check reports expectations, not traces
  const out: NetlistCheck = {
    file, status: r.status, message: r.message, diagnostics: m.warnings,
    expectations: r.expectations,
    unjudged: r.status === 'completed' ? [] : model.expect.map((e) => ({ name: e.name, file: e.pos.file, line: e.pos.line, column: e.pos.column })),
    warnings: r.warnings, seconds: (performance.now() - started) / 1000, end: r.end, method: r.stats.method,
  };
  if (r.status === 'failed') out.message = `the simulation stopped before the end (${model.simulate.duration} s): ${r.message}`;
  return out;
}

/** A bug met while checking (an exception): reported like a simulation that could not complete. */
export function internalError(file: string, e: unknown, seconds: number): NetlistCheck {
  const what = e instanceof Error ? e.stack ?? e.message : String(e);
  return {
    file, status: 'failed', message: `internal error (a bug in plenum; please report it with the netlist): ${what}`,
    diagnostics: [], expectations: [], unjudged: [], warnings: [], seconds,
  };
}

/**
 * A netlist whose check ran out of memory in its worker thread: an error case like a
 * simulation that could not complete; the other netlists carry on.
 */
export function outOfMemory(file: string, heapMb: number, seconds: number): NetlistCheck {
  return {
    file, status: 'failed',
    message: `ran out of memory (the worker's heap of ${heapMb} MB) and was stopped; the other netlists were checked: reduce the number of samples (a longer \`sample\`) or split the network`,
    diagnostics: [], expectations: [], unjudged: [], warnings: [], seconds,
  };
}
