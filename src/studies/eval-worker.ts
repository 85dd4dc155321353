/**
 * Worker-thread entry of calibration and sizing (bundled to dist/studies/eval-worker.js): holds
 * one Evaluator and runs the jobs the pool sends, one at a time.
 * Messages in: { id, job: EvalJob }. Messages out: { id, result: EvalResult }.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { crashedEval, Evaluator, type EvalJob, type EvalSetup } from './evaluate.js';

const evaluator = new Evaluator(workerData as EvalSetup);
const port = parentPort;
if (!port) throw new Error('eval-worker.ts must run in a worker thread');

port.on('message', (msg: { id: number; job: EvalJob }) => {
  let result;
  try {
    result = evaluator.run(msg.job);
  } catch (e) {
    result = crashedEval(e);
  }
  port.postMessage({ id: msg.id, result });
});
