/** Options and result types of `plenum trace` (continuation.ts). */
import type { StabilityVerdict } from './stability.js';
import type { ChamberRest, ValveState } from './types.js';

export interface TraceOptions {
  /** `mass:<chamber>` or a netlist path. */
  vary: string;
  from: string;
  to: string;
  valves?: ValveState;
  /** Start values strictly between the ends (default 3). */
  interior?: number;
  /** Largest step in scaled arclength (default 0.05). */
  maxStep?: number;
  /** Points per branch at most (default 1000). */
  maxPoints?: number;
  /** Wall-clock budget in seconds (default 30); then the branches traced so far are returned, marked `timed_out`. */
  maxWall?: number;
}

export interface TracePoint {
  /** Parameter value in the unit of --from/--to. */
  parameter: number;
  chambers: Record<string, ChamberRest>;
  stable: boolean;
  stability: StabilityVerdict;
  growth_rate: number | null;
  /** Set on located special points and on the ends of a branch. */
  special?: 'fold' | 'branch-point' | 'stability-change' | 'end';
}

export interface TraceBranch {
  id: number;
  chambers: string[];
  points: TracePoint[];
  /** Why tracing stopped at each end. */
  ends: [string, string];
}

export interface TraceResult {
  format: 1;
  title: string;
  file: string;
  status: 'ok' | 'failed';
  message: string;
  parameter: { vary: string; from: number; to: number; unit: string };
  valves: ValveState;
  branches: TraceBranch[];
  notes: string[];
  /** The time budget, seconds. */
  max_wall: number;
  /** True when the time budget stopped the tracing (branches may be cut short or missing). */
  timed_out: boolean;
}

export type TraceOutcome = { ok: true; value: TraceResult } | { ok: false; message: string; hint: string };
