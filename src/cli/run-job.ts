/**
 * The simulating side of `plenum run` and `plenum report`: the only reading of the netlist in
 * those commands. It reads, checks and builds the netlist, reports its diagnostics or warnings
 * (`load`), then simulates and makes what else needs the model (`run`): the report's topology,
 * wall curves, rest states and recording overlays. The main thread keeps only the text, the
 * messages and the result, never a syntax tree or a model: reading a netlist on both threads
 * cost 0.65 s of CPU and some 100 MB at 10 000 chambers (docs/dev-performance.md).
 *
 * Runs in the worker thread (run-worker.ts), or in the main thread when the bundled worker is
 * missing (running from the TypeScript sources); the messages are the same either way.
 */
import type { Model } from '../model/types.js';
import { loadModelFor } from '../transient/load.js';
import type { MeasuredOverlay } from '../transient/report-input.js';
import { traceMemoryDiagnostic } from '../transient/trace-memory.js';
import { simulate } from '../transient/transient.js';
import { CsvFile } from './csv-file.js';
import { STOP_FLAG, type Finished, type Loaded, type ReportParts, type RunJobData, type RunJobMessage } from './run-protocol.js';

export class RunJob {
  private model: Model | undefined;
  private measured: MeasuredOverlay[] | undefined;

  constructor(private readonly data: RunJobData, private readonly post: (m: RunJobMessage) => void) {}

  /** Reads, checks and builds the netlist (and the recordings against it). */
  async load(): Promise<Loaded> {
    const d = this.data;
    const m = loadModelFor(d.source, d.file, d.heapBytes);
    if (!m.ok) return { ok: false, diagnostics: m.diagnostics };
    this.model = m.value;
    const loaded: Loaded = { ok: true, warnings: m.warnings };
    if (d.csvText) {
      // the CSV text of the history costs memory too: refuse what cannot be written
      const refused = traceMemoryDiagnostic(m.value, { csv: true, heapBytes: d.heapBytes });
      if (refused) loaded.csvRefused = refused;
    }
    if (d.recordings?.length && !loaded.csvRefused) {
      const { measuredOverlays } = await import('../studies/measured-overlay.js');
      const o = measuredOverlays(m.value, d.recordings);
      if (!o.ok) loaded.recordingErrors = o.diagnostics;
      else {
        this.measured = o.value.overlays;
        loaded.recordingNotes = o.value.notes;
      }
    }
    return loaded;
  }

  /** Simulates the model `load` built; the result (and the report's parts) come back as one message. */
  async run(): Promise<Finished> {
    const d = this.data;
    const model = this.model;
    if (!model) throw new Error('RunJob.run before a successful load');
    this.model = undefined;
    const flag = new Int32Array(d.control);
    const csv = d.csvPath ? new CsvFile(d.csvPath) : undefined;
    const result = simulate(model, {
      samples: csv,
      // a trace nobody writes records only what the outcome analysis reads (transient/samples.ts)
      record: d.keepTrace === false ? 'outcomes' : 'all',
      interrupt: () => (Atomics.load(flag, STOP_FLAG) ? 'interrupted (Ctrl-C)' : null),
      progress: d.progress ? (t, tEnd) => this.post({ kind: 'progress', t, tEnd }) : undefined,
    });
    const csvError = csv?.close();
    let report: ReportParts | undefined;
    if (d.report) {
      const { reportInput } = await import('../transient/report-input.js');
      const rest = d.report === 'report' ? (await import('./rest-marks.js')).restMarks(model, result) : {};
      const { result: _, ...parts } = reportInput(model, result, { measured: this.measured, ...rest });
      report = parts;
    }
    // the trace's values stay here unless the caller writes them (see RunJobData.keepTrace)
    const sent = d.keepTrace === false ? { ...result, trace: { ...result.trace, times: [], values: [] } } : result;
    return { result: sent, ...(csvError ? { csvError } : {}), ...(report ? { report } : {}) };
  }
}
