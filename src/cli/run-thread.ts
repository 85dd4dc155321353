/**
 * Ctrl-C for `plenum run`: the simulation runs on a worker thread (run-worker.ts) while the
 * main thread listens for SIGINT. The first Ctrl-C sets a shared flag; the run stops at its
 * next step with status `failed` and everything computed so far, which the command then
 * writes as usual (exit 3). A second Ctrl-C ends the process at once (exit 130); outputs are
 * written by rename, so none is left half-written.
 *
 * When the bundled worker cannot be found (running from the TypeScript sources) the run
 * happens on this thread, where Ctrl-C cannot interrupt it.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { Diagnostic } from '../diag/diagnostic.js';
import type { RunResult } from '../transient/results.js';
import type { Model } from '../model/types.js';
import type { NetlistDoc } from '../netlist/types.js';

/** Index of the stop flag in the shared control array. */
export const STOP_FLAG = 0;

export interface RunWorkerData {
  source: string;
  file: string;
  control: SharedArrayBuffer;
  /** Post progress messages. */
  progress: boolean;
  /**
   * Send the sampled trace back (CSV, plots, baselines need it). Without, only its channel list
   * is sent: copying a large trace between threads costs seconds (10 000 chambers: 1.4 s).
   */
  keepTrace?: boolean;
  /** Send the checked document back (this thread builds the model from it for the plots). */
  keepDoc?: boolean;
}

/** The worker's reading of the netlist: its warnings, or its diagnostics when it is invalid. */
export type Loaded =
  | { ok: true; warnings: Diagnostic[]; doc?: NetlistDoc }
  | { ok: false; diagnostics: Diagnostic[] };

export type RunWorkerMessage =
  | { kind: 'loaded'; loaded: Loaded }
  | { kind: 'progress'; t: number; tEnd: number }
  | { kind: 'result'; result: RunResult }
  | { kind: 'error'; message: string };

/** Where the bundled worker may be, relative to the module holding this code. */
const WORKER_CANDIDATES = ['./cli/run-worker.js', './run-worker.js'];

function workerFile(): string | undefined {
  for (const rel of WORKER_CANDIDATES) {
    const url = new URL(rel, import.meta.url);
    if (url.protocol === 'file:' && existsSync(fileURLToPath(url))) return fileURLToPath(url);
  }
  return undefined;
}

/** The SIGINT handling of one command: a shared stop flag, released by `dispose`. */
export interface Interrupter {
  control: SharedArrayBuffer;
  /** True once Ctrl-C was pressed. */
  readonly requested: boolean;
  dispose(): void;
}

/**
 * Starts listening for Ctrl-C. Installed before the netlist is read, so that a Ctrl-C at any
 * time after start-up stops the run rather than killing the process.
 */
export function interruptOnSigint(): Interrupter {
  const control = new SharedArrayBuffer(4);
  const flag = new Int32Array(control);
  const onSigint = (): void => {
    if (Atomics.load(flag, STOP_FLAG)) {
      process.stderr.write('\nplenum: interrupted twice; stopping without writing results\n');
      process.exit(130);
    }
    Atomics.store(flag, STOP_FLAG, 1);
    process.stderr.write('\nplenum: interrupted; stopping and writing the results so far (Ctrl-C again to quit at once)\n');
  };
  process.on('SIGINT', onSigint);
  return {
    control,
    get requested() { return Atomics.load(flag, STOP_FLAG) !== 0; },
    dispose: () => { process.off('SIGINT', onSigint); },
  };
}

/** Simulates `model` on a worker thread; the run stops early when the interrupter's flag is set. */
export async function simulateInterruptibly(model: Model, stop: Interrupter, progress?: (t: number, tEnd: number) => void): Promise<RunResult> {
  const started = startSimulation(model.doc.source, model.doc.file, stop, progress);
  return started ? started.result() : simulateHere(model, stop, progress);
}

/** The same run on this thread (no bundled worker: running from the TypeScript sources); Ctrl-C cannot stop it. */
export async function simulateHere(model: Model, stop: Interrupter, progress?: (t: number, tEnd: number) => void): Promise<RunResult> {
  const { simulate } = await import('../transient/transient.js');
  return simulate(model, { interrupt: () => (stop.requested ? 'interrupted (Ctrl-C)' : null), progress });
}

/** A simulation started on a worker thread from the netlist text. */
export interface StartedSimulation {
  /** The worker's reading of the netlist (this thread does not read it again). */
  loaded(): Promise<Loaded>;
  /** The result (after a valid `loaded`). */
  result(): Promise<RunResult>;
  cancel(): void;
}

/**
 * Starts the worker on the netlist text at once; undefined when there is no bundled worker.
 * The netlist is read once, by the worker, which reports its diagnostics (or warnings, and
 * with `keepDoc` the checked document) before it simulates; meanwhile this thread loads the
 * reports. Reading it on both threads cost a large netlist its reading twice in CPU and memory
 * (10 000 chambers: 0.65 s and the syntax tree on each thread).
 */
export function startSimulation(source: string, file: string, stop: Interrupter, progress?: (t: number, tEnd: number) => void, keepTrace = true, keepDoc = false): StartedSimulation | undefined {
  const entry = workerFile();
  if (!entry) return undefined;
  const data: RunWorkerData = { source, file, control: stop.control, progress: Boolean(progress), keepTrace, keepDoc };
  const worker = new Worker(entry, { workerData: data });
  let onLoaded: (l: Loaded) => void = () => {};
  const loaded = new Promise<Loaded>((resolve) => { onLoaded = resolve; });
  const done = new Promise<RunResult>((resolve, reject) => {
    let settled = false;
    const finish = (f: () => void): void => {
      if (settled) return;
      settled = true;
      f();
    };
    worker.on('message', (m: RunWorkerMessage) => {
      if (m.kind === 'loaded') onLoaded(m.loaded);
      else if (m.kind === 'progress') progress?.(m.t, m.tEnd);
      else if (m.kind === 'result') finish(() => resolve(m.result));
      else finish(() => reject(new Error(m.message)));
    });
    worker.on('error', (e) => finish(() => reject(e)));
    worker.on('exit', (code) => finish(() => reject(new Error(`the simulation thread ended (code ${code}) without a result`))));
  });
  done.catch(() => {}); // observed by `result`; a cancelled run's rejection is not an error
  // a worker that dies before reading leaves `loaded` to the failure of `done`
  const loadedOrFailed = Promise.race([loaded, done.then(() => new Promise<Loaded>(() => {}))]);
  return { loaded: () => loadedOrFailed, result: () => done, cancel: () => { void worker.terminate(); } };
}
