/**
 * What the main thread of `plenum run` / `plenum report` and the simulating side (run-job.ts,
 * in the worker thread) tell each other. Light on purpose: the main thread imports it before
 * anything heavy.
 */
import type { Diagnostic } from '../diag/diagnostic.js';
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
  /** A new file to write the CSV trace into as the samples are taken (see csv-file.ts). */
  csvPath?: string;
  /** The main thread's heap limit, bytes: the memory refusal is judged against it. */
  heapBytes: number;
  /**
   * The texts to make from the result. They are made here, where the result is, and only they
   * cross to the main thread: a copy of a large result was the peak of a run's memory (10 000
   * chambers: some 50 MB more on the main thread's heap, while the simulating thread still held
   * its own).
   */
  make: {
    /** The printed summary. */
    summary?: boolean;
    json?: boolean;
    /** The CSV text of the trace (standard output, a device, a pipe; a file is written as the samples come: `csvPath`). */
    csv?: boolean;
    baseline?: boolean;
    /** The figures of `--plots`, one SVG text each. */
    plots?: boolean;
    /** The HTML report of `plenum report` (with the rest states and the recordings' overlays). */
    html?: { version?: string };
  };
  /** Bench recordings to overlay (`report --data`), read by the main thread. */
  recordings?: { file: string; text: string }[];
}

/** The reading of the netlist: its diagnostics when invalid, else its warnings and what stops the run before it starts. */
export type Loaded =
  | { ok: false; diagnostics: Diagnostic[] }
  | {
    ok: true;
    warnings: Diagnostic[];
    /** The run's history cannot be held with its CSV text (only with `make.csv`). */
    csvRefused?: Diagnostic;
    /** Problems of the recordings (`report --data`). */
    recordingErrors?: Diagnostic[];
    /** Notes on the recordings. */
    recordingNotes?: string[];
  };

/** How a run ended, for the command's message and exit code. */
export interface Verdict {
  status: RunResult['status'];
  end: number;
  message: string;
  /** Every expectation passed. */
  passed: boolean;
}

export interface Finished {
  verdict: Verdict;
  /** The first write error of the CSV file (e.g. ENOSPC). */
  csvError?: string;
  /** The texts asked for in `make`. */
  texts: { summary?: string; json?: string; csv?: string; baseline?: string; html?: string };
  /** The figures of `--plots` (`make.plots`). */
  figures?: { id: string; svg: string }[];
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
