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
import type { Diagnostic } from '../diag/diagnostic.js';
import { CaseRunner, type CaseResult } from './sweep-case.js';
import type { CaseSpec, ParamValue } from './sweep-spec.js';

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

/** Work for a worker: check one preflight parameter set (read and build only), or run a case. */
export type PoolTask = { preflight: ParamValue[] } | { spec: CaseSpec };
export type PoolAnswer = { diagnostics: Diagnostic[] } | { result: CaseResult };

/** What a CaseRunner answers to a task (in a worker or in this thread). */
export function answer(runner: CaseRunner, task: PoolTask): PoolAnswer {
  if ('preflight' in task) {
    const m = runner.model(task.preflight);
    return { diagnostics: m.ok ? [] : m.diagnostics.filter((d) => d.severity === 'error') };
  }
  try {
    return { result: runner.run(task.spec) };
  } catch (e) {
    return { result: crashedCase(task.spec, e) };
  }
}

/** Tasks a message carries: a few per worker and round, so that the last ones still spread. */
function batchSize(remaining: number, jobs: number): number {
  return Math.max(1, Math.min(16, Math.floor(remaining / (4 * jobs))));
}

/**
 * The threads of one study, kept for all its tasks (preflight, then cases): this thread and
 * jobs − 1 workers each read the netlist once (CaseRunner) and take batches of tasks from one
 * queue; this thread takes one task at a time and lets the workers' answers in between, so
 * that it never holds them up. One job runs everything in this thread, with no worker.
 */
export class CasePool {
  private readonly workers: Worker[] = [];
  private runner: CaseRunner | undefined;
  readonly jobs: number;

  constructor(private readonly source: string, private readonly file: string, jobs: number, worker?: URL, maxTasks = Infinity) {
    const script = worker ?? workerScript();
    this.jobs = script ? Math.max(1, Math.min(Math.floor(jobs), maxTasks)) : 1;
    for (let j = 1; j < this.jobs; j++) this.workers.push(new Worker(script!, { workerData: { source, file } }));
  }

  private answerHere(task: PoolTask): PoolAnswer {
    this.runner ??= new CaseRunner(this.source, this.file);
    return answer(this.runner, task);
  }

  /** Answers to the tasks, in task order. */
  async run(tasks: readonly PoolTask[], progress?: (done: number, total: number) => void): Promise<PoolAnswer[]> {
    if (this.jobs <= 1) {
      return tasks.map((t, i) => {
        const a = this.answerHere(t);
        progress?.(i + 1, tasks.length);
        return a;
      });
    }
    const answers = new Array<PoolAnswer>(tasks.length);
    if (!tasks.length) return answers;
    let next = 0;
    let done = 0;
    const listeners: (() => void)[] = [];
    try {
      await new Promise<void>((resolve, reject) => {
        const feed = (w: Worker): void => {
          if (next >= tasks.length) return;
          const from = next;
          next = Math.min(tasks.length, next + batchSize(tasks.length - next, this.jobs));
          w.postMessage({ from, tasks: tasks.slice(from, next) });
        };
        for (const w of this.workers) {
          const onMessage = (msg: { from: number; answers: PoolAnswer[] }): void => {
            msg.answers.forEach((a, k) => { answers[msg.from + k] = a; });
            done += msg.answers.length;
            progress?.(done, tasks.length);
            if (done === tasks.length) resolve();
            else feed(w);
          };
          const onExit = (code: number): void => {
            reject(new Error(`a sweep worker stopped (exit code ${code}) with ${tasks.length - done} tasks left`));
          };
          w.on('message', onMessage);
          w.on('error', reject);
          w.on('exit', onExit);
          listeners.push(() => { w.off('message', onMessage); w.off('error', reject); w.off('exit', onExit); });
          feed(w);
        }
        // this thread's share, one task at a time, yielding to the workers' messages between tasks
        const here = (): void => {
          if (next >= tasks.length) return;
          const i = next++;
          answers[i] = this.answerHere(tasks[i]);
          done++;
          progress?.(done, tasks.length);
          if (done === tasks.length) resolve();
          else setImmediate(here);
        };
        setImmediate(here);
      });
    } finally {
      for (const off of listeners) off();
    }
    return answers;
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/** Runs the cases; results[i] belongs to specs[i]. */
export async function runCases(source: string, file: string, specs: readonly CaseSpec[], opts: PoolOptions): Promise<CaseResult[]> {
  const pool = new CasePool(source, file, opts.jobs, opts.worker, specs.length);
  try {
    const answers = await pool.run(specs.map((spec) => ({ spec })), opts.progress);
    return answers.map((a) => (a as { result: CaseResult }).result);
  } finally {
    await pool.close();
  }
}
