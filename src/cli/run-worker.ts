/**
 * Worker thread of `plenum run` and `plenum report` (bundled to dist/cli/run-worker.js): reads
 * the netlist (the only reading of it in those commands), posts its diagnostics or warnings,
 * and when it may run, simulates and posts the result (run-job.ts).
 *
 * The run happens here rather than on the main thread so that Ctrl-C works: a signal handler
 * runs only when the main thread's event loop is free, which it never is during a synchronous
 * simulation. The main thread's handler sets a shared flag that the run polls every step.
 *
 * Messages out: { kind: 'loaded', loaded }, then (when it may run) { kind: 'progress', t, tEnd }
 * and { kind: 'result', result, csvError?, report? }, or { kind: 'error', message }.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { RunJob } from './run-job.js';
import { runnable, type RunJobData, type RunJobMessage } from './run-protocol.js';

const post = (m: RunJobMessage): void => parentPort!.postMessage(m);
const job = new RunJob(workerData as RunJobData, post);
const loaded = await job.load();
post({ kind: 'loaded', loaded });
if (runnable(loaded)) post({ kind: 'result', ...(await job.run()) });
