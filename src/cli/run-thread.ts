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
import { getHeapStatistics } from 'node:v8';
import { Worker } from 'node:worker_threads';
import { STOP_FLAG, type Finished, type Loaded, type RunJobData, type RunJobMessage } from './run-protocol.js';
import { UsageError } from './io.js';

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

/** What a command asks of the simulating side (run-job.ts); the rest of RunJobData is filled in here. */
export type SimulationRequest = Omit<RunJobData, 'control' | 'progress' | 'heapBytes'>;

/** A simulation started from the netlist text: the netlist is read once, on the simulating side. */
export interface StartedSimulation {
  /** The reading of the netlist: diagnostics, or warnings and what stops the run before it starts. */
  loaded(): Promise<Loaded>;
  /** The result, after a `loaded` that lets the run go on (see `runnable`). */
  result(): Promise<Finished>;
  /** Stops the worker (when this thread refuses to go on); resolves once it has stopped. */
  cancel(): Promise<void>;
}

/**
 * Starts the worker on the netlist text at once. The worker alone reads the netlist; it reports
 * its diagnostics (or its warnings) before it simulates, while this thread loads what it needs
 * to write the outputs. Reading it on both threads cost a large netlist its reading twice in
 * CPU and memory (10 000 chambers: 0.65 s and a syntax tree on each thread).
 */
export function startSimulation(request: SimulationRequest, stop: Interrupter, progress?: (t: number, tEnd: number) => void): StartedSimulation {
  const data: RunJobData = { ...request, control: stop.control, progress: Boolean(progress), heapBytes: getHeapStatistics().heap_size_limit };
  const csvFailed = (code: string): UsageError => new UsageError(`cannot write the CSV trace (${code}); nothing was written`);
  const finished = (f: Finished): Finished => {
    if (f.csvError) throw csvFailed(f.csvError);
    return f;
  };
  const entry = workerFile();
  if (!entry) {
    // running from the TypeScript sources: the same job on this thread (Ctrl-C cannot stop it)
    const job = import('./run-job.js').then(({ RunJob }) => new RunJob(data, (m) => { if (m.kind === 'progress') progress?.(m.t, m.tEnd); }));
    const loaded = job.then((j) => j.load());
    return { loaded: () => loaded, result: async () => finished(await (await job).run()), cancel: async () => {} };
  }
  const worker = new Worker(entry, { workerData: data });
  let onLoaded: (l: Loaded) => void = () => {};
  const loaded = new Promise<Loaded>((resolve) => { onLoaded = resolve; });
  const done = new Promise<Finished>((resolve, reject) => {
    let settled = false;
    const finish = (f: () => void): void => {
      if (settled) return;
      settled = true;
      f();
    };
    worker.on('message', (m: RunJobMessage) => {
      if (m.kind === 'loaded') onLoaded(m.loaded);
      else if (m.kind === 'progress') progress?.(m.t, m.tEnd);
      else if (m.kind === 'result') finish(() => { try { resolve(finished(m)); } catch (e) { reject(e); } });
      else finish(() => reject(new Error(m.message)));
    });
    worker.on('error', (e) => finish(() => reject(e)));
    worker.on('exit', (code) => finish(() => reject(new Error(`the simulation thread ended (code ${code}) without a result`))));
  });
  done.catch(() => {}); // observed by `result`; a cancelled run's rejection is not an error
  // a worker that fails before it has read the netlist leaves `loaded` to the failure of `done`
  const loadedOrFailed = Promise.race([loaded, done.then(() => new Promise<Loaded>(() => {}))]);
  return { loaded: () => loadedOrFailed, result: () => done, cancel: async () => { await worker.terminate(); } };
}

export { runnable } from './run-protocol.js';
