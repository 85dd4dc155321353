/**
 * Worker thread of `plenum check`. The main thread and its workers share a counter: each takes
 * the next netlist index until none are left, so no thread waits for another to hand out work.
 * A shared flag set by the main thread (Ctrl-C) stops the run in progress.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { performance } from 'node:perf_hooks';
import { checkNetlist, internalError, NEXT, STOP, type CheckMessage, type CheckWorkerData } from './check-one.js';

const { files, control } = workerData as CheckWorkerData;
const ctl = new Int32Array(control);
const interrupt = (): string | null => (Atomics.load(ctl, STOP) ? 'interrupted (Ctrl-C)' : null);

for (let i = Atomics.add(ctl, NEXT, 1); i < files.length; i = Atomics.add(ctl, NEXT, 1)) {
  parentPort!.postMessage({ kind: 'start', index: i } satisfies CheckMessage);
  const started = performance.now();
  let check;
  try {
    check = checkNetlist(files[i], interrupt);
  } catch (e) {
    check = internalError(files[i], e, (performance.now() - started) / 1000);
  }
  parentPort!.postMessage({ kind: 'done', index: i, check } satisfies CheckMessage);
}
