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
import type { RunResult } from '../transient/results.js';
import type { Model } from '../model/types.js';
import { CsvFile } from './csv-file.js';
import { UsageError } from './io.js';

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
  /** A new file to write the CSV trace into as the samples are taken (see csv-file.ts). */
  csvPath?: string;
}

export type RunWorkerMessage =
  | { kind: 'progress'; t: number; tEnd: number }
  | { kind: 'result'; result: RunResult; csvError?: string }
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
  return startSimulation(model.doc.source, model.doc.file, stop, progress).result(model);
}

/** A simulation started on a worker thread from the netlist text, before its model is needed here. */
export interface StartedSimulation {
  /** The result; `model` (loaded on this thread from the same text) is used only without a worker. */
  result(model: Model): Promise<RunResult>;
  /** Stops the worker (when this thread found the netlist invalid); resolves once it has stopped. */
  cancel(): Promise<void>;
}

/**
 * Starts the worker on the netlist text at once. The worker reads the text itself; started
 * before this thread reads it (for the diagnostics and the model that plots need), the two
 * readings overlap on a machine with two cores instead of following each other, which for a
 * large netlist saves seconds (docs/dev-performance.md).
 */
export function startSimulation(source: string, file: string, stop: Interrupter, progress?: (t: number, tEnd: number) => void, keepTrace = true, csvPath?: string): StartedSimulation {
  const entry = workerFile();
  const csvFailed = (code: string): UsageError => new UsageError(`cannot write the CSV trace (${code}); nothing was written`);
  if (!entry) {
    return {
      result: async (model) => {
        const { simulate } = await import('../transient/transient.js');
        const csv = csvPath ? new CsvFile(csvPath) : undefined;
        const r = simulate(model, { interrupt: () => (stop.requested ? 'interrupted (Ctrl-C)' : null), progress, samples: csv });
        const error = csv?.close();
        if (error) throw csvFailed(error);
        return r;
      },
      cancel: async () => {},
    };
  }
  const data: RunWorkerData = { source, file, control: stop.control, progress: Boolean(progress), keepTrace, csvPath };
  const worker = new Worker(entry, { workerData: data });
  const done = new Promise<RunResult>((resolve, reject) => {
    let settled = false;
    const finish = (f: () => void): void => {
      if (settled) return;
      settled = true;
      f();
    };
    worker.on('message', (m: RunWorkerMessage) => {
      if (m.kind === 'progress') progress?.(m.t, m.tEnd);
      else if (m.kind === 'result') finish(() => (m.csvError ? reject(csvFailed(m.csvError)) : resolve(m.result)));
      else finish(() => reject(new Error(m.message)));
    });
    worker.on('error', (e) => finish(() => reject(e)));
    worker.on('exit', (code) => finish(() => reject(new Error(`the simulation thread ended (code ${code}) without a result`))));
  });
  done.catch(() => {}); // observed by `result`; a cancelled run's rejection is not an error
  return { result: () => done, cancel: async () => { await worker.terminate(); } };
}
