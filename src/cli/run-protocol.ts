/**
 * What the main thread of `plenum run` / `plenum report` and the simulating side (run-job.ts,
 * in the worker thread) tell each other. Light on purpose: the main thread imports it before
 * anything heavy.
 */
import type { Diagnostic } from '../diag/diagnostic.js';
import type { ReportInput } from '../transient/report-input.js';
import type { RunResult } from '../transient/results.js';

/** Index of the stop flag in the shared control array. */
export const STOP_FLAG = 0;

export interface RunJobData {
  source: string;
  /** The netlist's name in diagnostics (`<stdin>` for `-`). */
  file: string;
  control: SharedArrayBuffer;
  /** Post progress messages. */
  progress: boolean;
  /**
   * Send the sampled trace back (a CSV text, plots, baselines, the report need it). Without,
   * only its channel list is sent: copying a large trace between threads costs seconds (10 000
   * chambers: 1.4 s).
   */
  keepTrace?: boolean;
  /** A new file to write the CSV trace into as the samples are taken (see csv-file.ts). */
  csvPath?: string;
  /** The main thread's heap limit, bytes: the memory refusal is judged against it. */
  heapBytes: number;
  /** The main thread will make the CSV text of the whole history (standard output, a device, a pipe). */
  csvText?: boolean;
  /**
   * What of a report to make beside the result: `plots` the figures' input (`run --plots`),
   * `report` also the rest states and the recordings' overlays (`plenum report`).
   */
  report?: 'plots' | 'report';
  /** Bench recordings to overlay (`report --data`), read by the main thread. */
  recordings?: { file: string; text: string }[];
}

/** The reading of the netlist: its diagnostics when invalid, else its warnings and what stops the run before it starts. */
export type Loaded =
  | { ok: false; diagnostics: Diagnostic[] }
  | {
    ok: true;
    warnings: Diagnostic[];
    /** The run's history cannot be held with its CSV text (only with `csvText`). */
    csvRefused?: Diagnostic;
    /** Problems of the recordings (`report --data`). */
    recordingErrors?: Diagnostic[];
    /** Notes on the recordings. */
    recordingNotes?: string[];
  };

/** What a report needs beside the run's result (made where the model is). */
export type ReportParts = Omit<ReportInput, 'result'>;

export interface Finished {
  result: RunResult;
  /** The first write error of the CSV file (e.g. ENOSPC). */
  csvError?: string;
  report?: ReportParts;
}

export type RunJobMessage =
  | { kind: 'loaded'; loaded: Loaded }
  | { kind: 'progress'; t: number; tEnd: number }
  | ({ kind: 'result' } & Finished)
  | { kind: 'error'; message: string };

/** True when a Loaded lets the run go on. */
export function runnable(l: Loaded): boolean {
  return l.ok && !l.csvRefused && !l.recordingErrors?.length;
}
