/**
 * Worker-thread entry of a study (bundled to dist/studies/sweep-worker.js): holds one
 * CaseRunner for the study's netlist (read once) and answers the batches of tasks the pool
 * sends: preflight parameter sets (read and build) and cases (run).
 *
 * Messages in:  { from, tasks: PoolTask[] }.  Messages out: { from, answers: PoolAnswer[] }.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { answer, type PoolTask } from './sweep-pool.js';
import { CaseRunner } from './sweep-case.js';

interface WorkerInit { source: string; file: string }

const init = workerData as WorkerInit;
const runner = new CaseRunner(init.source, init.file);
const port = parentPort;
if (!port) throw new Error('sweep-worker.ts must run in a worker thread');

port.on('message', (msg: { from: number; tasks: PoolTask[] }) => {
  port.postMessage({ from: msg.from, answers: msg.tasks.map((t) => answer(runner, t)) });
});
