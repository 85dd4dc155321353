/**
 * Worker thread of `plenum run` (bundled to dist/cli/run-worker.js): reads and checks the
 * netlist text (the only reading of it in a run), posts its diagnostics or warnings (and with
 * keepDoc the checked document), then simulates the model and posts the result.
 *
 * The run happens here rather than on the main thread so that Ctrl-C works: a signal handler
 * runs only when the main thread's event loop is free, which it never is during a synchronous
 * simulation. The main thread's handler sets a shared flag that the run polls every step.
 *
 * Messages out: { kind: 'loaded', loaded }, then { kind: 'progress', t, tEnd } and
 * { kind: 'result', result } (or { kind: 'error', message }).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { simulate } from '../transient/transient.js';
import { loadModel } from '../model/load.js';
import { STOP_FLAG, type RunWorkerData, type RunWorkerMessage } from './run-thread.js';

const { source, file, control, progress, keepTrace, keepDoc } = workerData as RunWorkerData;
const flag = new Int32Array(control);
const post = (m: RunWorkerMessage): void => parentPort!.postMessage(m);

const model = loadModel(source, file);
if (!model.ok) {
  post({ kind: 'loaded', loaded: { ok: false, diagnostics: model.diagnostics } });
} else {
  post({ kind: 'loaded', loaded: { ok: true, warnings: model.warnings, ...(keepDoc ? { doc: model.value.doc } : {}) } });
  const result = simulate(model.value, {
    interrupt: () => (Atomics.load(flag, STOP_FLAG) ? 'interrupted (Ctrl-C)' : null),
    progress: progress ? (t, tEnd) => post({ kind: 'progress', t, tEnd }) : undefined,
    record: keepTrace === false ? 'outcomes' : 'all',
  });
  // the trace's values stay here unless the caller writes them (see RunWorkerData.keepTrace)
  post({ kind: 'result', result: keepTrace === false ? { ...result, trace: { ...result.trace, times: [], values: [] } } : result });
}
