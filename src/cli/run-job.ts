/**
 * The simulating side of `plenum run` and `plenum report`: the only reading of the netlist in
 * those commands. It reads, checks and builds the netlist, reports its diagnostics or warnings
 * (`load`), then simulates and makes the output texts from the result and the model (`run`):
 * summary, JSON, CSV, baseline, figures, the HTML report with its rest states and recording
 * overlays. The main thread keeps only the netlist's text and these texts, never a syntax tree,
 * a model or a result, and writes the outputs together: reading a netlist on both threads cost
 * 0.65 s of CPU and some 100 MB at 10 000 chambers, and a copy of the result on the main thread
 * another 50 MB at the end of the run (docs/dev-performance.md).
 *
 * Runs in the worker thread (run-worker.ts), or in the main thread when the bundled worker is
 * missing (running from the TypeScript sources); the messages are the same either way.
 */
import { formatDiagnostic } from '../diag/diagnostic.js';
import type { Model } from '../model/types.js';
import { loadModelFor } from '../transient/load.js';
import type { MeasuredOverlay } from '../transient/report-input.js';
import type { RunResult } from '../transient/results.js';
import { traceMemoryDiagnostic } from '../transient/trace-memory.js';
import { simulate } from '../transient/transient.js';
import { baselineJson } from '../report/baseline.js';
import { traceCsv } from '../report/csv.js';
import { resultJson } from '../report/json.js';
import { summaryText } from '../report/table.js';
import { CsvFile } from './csv-file.js';
import { STOP_FLAG, type Finished, type Loaded, type RunJobData, type RunJobMessage } from './run-protocol.js';

export class RunJob {
  private model: Model | undefined;
  private measured: MeasuredOverlay[] | undefined;
  /** The netlist's warnings, formatted (the HTML report lists them). */
  private warnings: string[] = [];

  constructor(private readonly data: RunJobData, private readonly post: (m: RunJobMessage) => void) {}

  /** Reads, checks and builds the netlist (and the recordings against it). */
  async load(): Promise<Loaded> {
    const d = this.data;
    const m = loadModelFor(d.source, d.file, d.heapBytes);
    if (!m.ok) return { ok: false, diagnostics: m.diagnostics };
    this.model = m.value;
    const loaded: Loaded = { ok: true, warnings: m.warnings };
    this.warnings = m.warnings.map(formatDiagnostic);
    if (d.make.csv) {
      // the CSV text of the history costs memory too: refuse what cannot be written
      const refused = traceMemoryDiagnostic(m.value, { csv: true, heapBytes: d.heapBytes });
      if (refused) loaded.csvRefused = refused;
    }
    if (d.recordings?.length && !loaded.csvRefused) {
      const o = (await import('./run-report.js')).measuredOverlays(m.value, d.recordings);
      if (!o.ok) loaded.recordingErrors = o.diagnostics;
      else {
        this.measured = o.value.overlays;
        loaded.recordingNotes = o.value.notes;
      }
    }
    return loaded;
  }

  /** Simulates the model `load` built and makes the texts asked for. */
  async run(): Promise<Finished> {
    const d = this.data;
    const make = d.make;
    const model = this.model;
    if (!model) throw new Error('RunJob.run before a successful load');
    this.model = undefined;
    const flag = new Int32Array(d.control);
    const csv = d.csvPath ? new CsvFile(d.csvPath) : undefined;
    const result = simulate(model, {
      samples: csv,
      // a trace nobody writes records only what the outcome analysis reads (transient/samples.ts)
      record: make.csv || make.baseline || make.plots || make.html ? 'all' : 'outcomes',
      interrupt: () => (Atomics.load(flag, STOP_FLAG) ? 'interrupted (Ctrl-C)' : null),
      progress: d.progress ? (t, tEnd) => this.post({ kind: 'progress', t, tEnd }) : undefined,
    });
    const csvError = csv?.close();
    const texts: Finished['texts'] = {};
    if (make.summary) texts.summary = summaryText(result);
    if (make.json) texts.json = resultJson(result);
    if (make.csv) texts.csv = traceCsv(result.trace);
    if (make.baseline) texts.baseline = baselineJson(result);
    let figures: Finished['figures'];
    if (make.plots || make.html) {
      const made = (await import('./run-report.js')).reportTexts(model, result, { measured: this.measured, html: make.html, plots: make.plots, netlistWarnings: this.warnings });
      if (made.html !== undefined) texts.html = made.html;
      figures = made.figures;
    }
    return { verdict: verdict(result), ...(csvError ? { csvError } : {}), texts, ...(figures ? { figures } : {}) };
  }
}

/** How a run ended, for the command's message and exit code. */
function verdict(r: RunResult): Finished['verdict'] {
  return { status: r.status, end: r.end, message: r.message, passed: r.expectations.every((e) => e.passed) };
}
