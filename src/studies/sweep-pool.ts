/**
 * Runs the cases of a study on a pool of worker threads (or in this thread for one job) and
 * returns their results in case order, whatever order they finish in.
 *
 * The worker is the bundled dist/studies/sweep-worker.js (scripts/build.mjs). It is found
 * next to the bundle that holds this code, or, when running from the TypeScript sources
 * (tests), in the package's dist/ folder.
 */
import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { CaseRunner, type CaseResult } from './sweep-case.js';
import type { CaseSpec } from './sweep-spec.js';

/** Where a bundled worker of src/studies may be, relative to the module holding this code. */
const WORKER_CANDIDATES = [
  './studies/NAME.js', // from dist/index.js or a chunk in dist/
  './NAME.js', // from a bundle in dist/studies/
  '../studies/NAME.js', // from dist/cli/
  '../../dist/studies/NAME.js', // from src/studies/ (tests)
];

/** The worker script, or undefined when it cannot be found (the pool then runs in-thread). */
export function workerScript(name = 'sweep-worker'): URL | undefined {
  for (const rel of WORKER_CANDIDATES) {
    const url = new URL(rel.replace('NAME', name), import.meta.url);
    if (url.protocol === 'file:' && existsSync(fileURLToPath(url))) return url;
  }
  return undefined;
}

/** The default number of jobs: the cores this process may use. */
export function defaultJobs(): number {
  return Math.max(1, availableParallelism());
}

/** A case whose run threw: a bug in plenum, reported as a failed case rather than ending the study. */
export function crashedCase(spec: CaseSpec, e: unknown): CaseResult {
  const why = e instanceof Error ? e.message : String(e);
  return {
    index: spec.index, group: spec.group, params: spec.params, status: 'failed',
    message: `internal error: ${why} (a bug in plenum; please report it with the netlist and the case's parameters)`,
    largest: null, outcome: null, settling_time: null, expectations: [], chambers: {}, mass_drift: null, warnings: [],
  };
}

export interface PoolOptions {
  /** Worker threads; 1 runs every case in this thread. */
  jobs: number;
  progress?: (done: number, total: number) => void;
  /** Worker script (tests); found with workerScript() otherwise. */
  worker?: URL;
}

function runInThread(source: string, file: string, specs: readonly CaseSpec[], opts: PoolOptions): CaseResult[] {
  const runner = new CaseRunner(source, file);
  return specs.map((spec, i) => {
    let r: CaseResult;
    try {
      r = runner.run(spec);
    } catch (e) {
      r = crashedCase(spec, e);
    }
    opts.progress?.(i + 1, specs.length);
    return r;
  });
}

/** Runs the cases; results[i] belongs to specs[i]. */
export async function runCases(source: string, file: string, specs: readonly CaseSpec[], opts: PoolOptions): Promise<CaseResult[]> {
  const jobs = Math.min(Math.max(1, Math.floor(opts.jobs)), specs.length);
  const script = opts.worker ?? workerScript();
  if (jobs <= 1 || !script) return runInThread(source, file, specs, opts);

  const results = new Array<CaseResult>(specs.length);
  const workers: Worker[] = [];
  let next = 0;
  let done = 0;
  try {
    await new Promise<void>((resolve, reject) => {
      const feed = (w: Worker, slot: { i: number }): void => {
        if (next >= specs.length) return;
        slot.i = next++;
        w.postMessage({ spec: specs[slot.i] });
      };
      for (let j = 0; j < jobs; j++) {
        const w = new Worker(script, { workerData: { source, file } });
        workers.push(w);
        const slot = { i: -1 };
        w.on('message', (msg: { result: CaseResult }) => {
          results[slot.i] = msg.result;
          done++;
          opts.progress?.(done, specs.length);
          if (done === specs.length) resolve();
          else feed(w, slot);
        });
        w.on('error', reject);
        w.on('exit', (code) => {
          if (done < specs.length) reject(new Error(`a sweep worker stopped (exit code ${code}) with ${specs.length - done} cases left`));
        });
        feed(w, slot);
      }
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return results;
}
