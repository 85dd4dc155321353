/**
 * Worker-thread entry of a study (bundled to dist/studies/sweep-worker.js): holds one
 * CaseRunner for the study's netlist and runs the cases the pool sends, one at a time.
 *
 * Messages in:  { spec: CaseSpec }.  Messages out: { result: CaseResult }.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { crashedCase } from './sweep-pool.js';
import { CaseRunner } from './sweep-case.js';
import type { CaseSpec } from './sweep-spec.js';

interface WorkerInit { source: string; file: string }

const init = workerData as WorkerInit;
const runner = new CaseRunner(init.source, init.file);
const port = parentPort;
if (!port) throw new Error('sweep-worker.ts must run in a worker thread');

port.on('message', (msg: { spec: CaseSpec }) => {
  let result;
  try {
    result = runner.run(msg.spec);
  } catch (e) {
    result = crashedCase(msg.spec, e);
  }
  port.postMessage({ result });
});
