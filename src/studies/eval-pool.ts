/**
 * A pool of worker threads that stays up for the whole of a calibration or sizing run (many
 * small batches: the 2n + 1 simulations of a finite-difference Jacobian, the poll points of a
 * pattern search), each worker holding one Evaluator. With one job, or without the bundled
 * worker (dist/studies/eval-worker.js), everything runs in this thread. Results come back in
 * the order of the jobs.
 */
import { Worker } from 'node:worker_threads';
import { crashedEval, Evaluator, type EvalJob, type EvalResult, type EvalSetup } from './evaluate.js';
import { workerScript } from './sweep-pool.js';

export interface EvalPoolOptions {
  /** Worker threads; 1 runs in this thread. */
  jobs: number;
  /** Called after each finished evaluation with the running count. */
  progress?: (done: number) => void;
  /** Worker script (tests); found next to the bundle otherwise. */
  worker?: URL;
}

export class EvalPool {
  private readonly workers: Worker[] = [];
  private readonly local?: Evaluator;
  private done = 0;
  /** Evaluations run so far. */
  get count(): number { return this.done; }

  constructor(setup: EvalSetup, private readonly opts: EvalPoolOptions) {
    const script = opts.worker ?? workerScript('eval-worker');
    const jobs = Math.max(1, Math.floor(opts.jobs));
    if (jobs <= 1 || !script) this.local = new Evaluator(setup);
    else for (let j = 0; j < jobs; j++) this.workers.push(new Worker(script, { workerData: setup }));
  }

  /** Runs the jobs; results[i] belongs to jobs[i]. */
  async map(jobs: readonly EvalJob[]): Promise<EvalResult[]> {
    const out = new Array<EvalResult>(jobs.length);
    if (this.local) {
      jobs.forEach((job, i) => {
        try {
          out[i] = this.local!.run(job);
        } catch (e) {
          out[i] = crashedEval(e);
        }
        this.opts.progress?.(++this.done);
      });
      return out;
    }
    let next = 0;
    let finished = 0;
    await new Promise<void>((resolve, reject) => {
      if (!jobs.length) { resolve(); return; }
      const cleanups: (() => void)[] = [];
      const end = (e?: Error): void => {
        cleanups.forEach((c) => c());
        if (e) reject(e); else resolve();
      };
      for (const w of this.workers) {
        let slot = -1;
        const feed = (): void => {
          if (next >= jobs.length) return;
          slot = next++;
          w.postMessage({ id: slot, job: jobs[slot] });
        };
        const onMessage = (msg: { id: number; result: EvalResult }): void => {
          out[msg.id] = msg.result;
          finished++;
          this.opts.progress?.(++this.done);
          if (finished === jobs.length) end();
          else feed();
        };
        const onError = (e: Error): void => end(e);
        const onExit = (code: number): void => end(new Error(`a study worker stopped (exit code ${code})`));
        w.on('message', onMessage);
        w.on('error', onError);
        w.on('exit', onExit);
        cleanups.push(() => { w.off('message', onMessage); w.off('error', onError); w.off('exit', onExit); });
        feed();
      }
    });
    return out;
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
