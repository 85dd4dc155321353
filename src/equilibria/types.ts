/**
 * Result types and shared constants of the equilibria analysis (equilibria.ts and the files it
 * is built from: rest.ts, enumerate.ts, deflation.ts, steady.ts, group.ts).
 */
import type { HeatMode } from '../model/types.js';
import type { GroupOutcome } from '../transient/results.js';
import type { Stability, StabilityVerdict } from './stability.js';
import type { CylinderRest } from './cylinder-rest.js';

/** Samples per wall segment for bracketing roots (Chebyshev–Lobatto in V or ln V). */
export const SAMPLES = 128;
/** Branch combinations per closed group searched exhaustively before switching to deflation. */
export const DEFAULT_MAX_COMBINATIONS = 4096;
/** Wall-clock budget of `findEquilibria` and `traceEquilibria` by default, seconds. */
export const DEFAULT_MAX_WALL = 30;
/** Share of the budget the transient may use (the search has the rest, at least). */
export const TRANSIENT_SHARE = 0.5;
/** Network equilibria listed at most (the count is always reported). */
export const DEFAULT_MAX_LISTED = 1000;
/** Two rest states are the same when every chamber's mass agrees to this fraction of the group's gas. */
export const SAME = 1e-9;
/** The transient reached an equilibrium when its end state is this close (fraction of group gas). */
export const REACHED = 1e-2;

export type ValveState = 'open' | 'closed' | 'end';
export type GasSource = 'start' | 'end';

export interface EquilibriaOptions {
  valves?: ValveState;
  gas?: GasSource;
  /** Run the transient to see which equilibrium it reaches (default true; needed for gas: end). */
  transient?: boolean;
  maxCombinations?: number;
  maxListed?: number;
  /**
   * Wall-clock budget in seconds (default 30): the transient may use half of it; when it runs out
   * the search stops and the result lists the equilibria found and analysed so far, marked
   * incomplete (`complete: false`, `timed_out: true`). Infinity for none.
   */
  maxWall?: number;
  /** Starts for the deflated Newton search of large groups (default 64 + 16 per chamber). */
  starts?: number;
  /** Per-chamber gas masses (kg) to use instead of the start or end state. */
  masses?: ArrayLike<number>;
}

export interface ChamberRest {
  pressure: number;   // Pa abs
  gauge: number;      // Pa
  volume: number;     // m³
  stretch?: number;   // spheres
  mass: number;       // kg, incl. lumped line volume
  /** Monotone segment of the wall curve, counted from the smallest volume. */
  segment: number;
  branch: 'rising' | 'falling' | 'rigid';
}

export interface GroupEquilibrium {
  chambers: ChamberRest[];
  stability: Stability;
  /** How a one-way valve stands at this state, when it matters. */
  note?: string;
}

export interface GroupResult {
  chambers: string[];
  kind: 'closed' | 'open' | 'fed';
  /** Gas the group holds (closed groups), kg. */
  mass: number | null;
  method: 'enumeration' | 'deflation' | 'steady-flow' | 'closed-loop' | 'none';
  /** Branch combinations examined, or starts of the deflated search. */
  combinations: number;
  /** Branch combinations the group has for its gas (closed groups: the product of each chamber's branches, 2^N for N spheres), or the volume combinations at its steady pressures (open groups). */
  branch_combinations: number;
  /** Branch combinations enumerated, or starts of the deflated search actually tried. */
  examined: number;
  /** True when the time budget stopped the search. */
  timed_out: boolean;
  /** False when the method cannot promise that every equilibrium is listed. */
  complete: boolean;
  equilibria: GroupEquilibrium[];
  /** Check or relief valves passing gas in this group's steady state. */
  flowing: string[];
  notes: string[];
}

export interface NetworkEquilibrium {
  chambers: Record<string, ChamberRest>;
  stable: boolean;
  stability: StabilityVerdict;
  growth_rate: number | null;
  time_constant: number | null;
  eigenvalues: { re: number; im: number }[];
  /** Index into each group's equilibria. */
  members: number[];
  /** False when a check or relief valve would open at this state. */
  consistent: boolean;
  warnings: string[];
  /** How one-way valves stand (cracked, reseated, open) where it matters. */
  notes: string[];
}

export interface TransientMatch {
  status: 'completed' | 'failed';
  end: number;
  outcomes: GroupOutcome[];
  /** Index of the equilibrium the transient settled at, or null. */
  reached: number | null;
  /** Nearest listed equilibrium and its distance (largest chamber mass difference / group gas). */
  nearest: number | null;
  distance: number | null;
  message: string;
}

export interface EquilibriaResult {
  format: 1;
  title: string;
  file: string;
  status: 'ok' | 'failed';
  message: string;
  valves: ValveState;
  gas: GasSource;
  heat: HeatMode;
  ambient: number;
  groups: GroupResult[];
  equilibria: NetworkEquilibrium[];
  /** Number of network equilibria (combinations of the groups'); may exceed the listed ones. */
  count: number;
  transient: TransientMatch | null;
  notes: string[];
  /** False when some group's list may be incomplete (a deflated search, or the time budget ran out). */
  complete: boolean;
  /** The time budget, seconds. */
  max_wall: number;
  /** True when the time budget stopped the search. */
  timed_out: boolean;
  /** Rest positions of cylinders and their stability with the load (cylinder-rest.ts). */
  cylinders?: CylinderRest[];
}
