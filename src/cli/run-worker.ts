/**
 * Worker thread of `plenum run` (bundled to dist/cli/run-worker.js): rebuilds the model from
 * the netlist text the main thread has already checked, simulates it, and posts the result.
 *
 * The run happens here rather than on the main thread so that Ctrl-C works: a signal handler
 * runs only when the main thread's event loop is free, which it never is during a synchronous
 * simulation. The main thread's handler sets a shared flag that the run polls every step.
 *
 * Messages out: { kind: 'progress', t, tEnd }, then { kind: 'result', result } or
 * { kind: 'error', message }.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { simulate } from '../transient/transient.js';
import { buildModel } from '../model/build.js';
import { readNetlist } from '../netlist/read.js';
import { CsvFile } from './csv-file.js';
import { STOP_FLAG, type RunWorkerData, type RunWorkerMessage } from './run-thread.js';

const { source, file, control, progress, keepTrace, csvPath } = workerData as RunWorkerData;
const flag = new Int32Array(control);
const post = (m: RunWorkerMessage): void => parentPort!.postMessage(m);

const doc = readNetlist(source, file);
const model = doc.ok ? buildModel(doc.value) : undefined;
if (!model?.ok) {
  post({ kind: 'error', message: 'the netlist did not load in the worker thread although it did on the main thread' });
} else {
  const csv = csvPath ? new CsvFile(csvPath) : undefined;
  const result = simulate(model.value, {
    samples: csv,
    // a trace nobody writes records only what the outcome analysis reads (transient/samples.ts)
    record: keepTrace === false ? 'outcomes' : 'all',
    interrupt: () => (Atomics.load(flag, STOP_FLAG) ? 'interrupted (Ctrl-C)' : null),
    progress: progress ? (t, tEnd) => post({ kind: 'progress', t, tEnd }) : undefined,
  });
  // the trace's values stay here unless the caller writes them (see RunWorkerData.keepTrace)
  const csvError = csv?.close();
  post({ kind: 'result', result: keepTrace === false ? { ...result, trace: { ...result.trace, times: [], values: [] } } : result, ...(csvError ? { csvError } : {}) });
}
