/** Result types of a transient run. `report/` reads only these. All numbers SI. */

export interface ChamberSummary {
  final: { pressure: number; gauge: number; volume: number; mass: number; temperature: number; stretch?: number };
  peak: { gauge: number; at: number };
  least: { gauge: number; at: number };
}

export interface LineSummary {
  peak_flow: number;
  peak_reynolds: number;
  regime: 'laminar' | 'transitional' | 'turbulent';
  /** The line was choked at its exit at some time in the run. */
  choked: boolean;
  /** Largest exit Mach number (isothermal lines choke at 1/√γ; physics/line-flow.ts). */
  peak_mach: number;
  /** Segments of a wave line (elements/wave-line.ts). */
  segments?: number;
}
export interface ValveSummary { peak_flow: number; choked: boolean }
export interface ValveSummary {
  peak_flow: number;
  choked: boolean;
  /** Opening 0–1 (schedule; relief state; check valve passing): at the end, least and most over the run. */
  opening?: { final: number; min: number; max: number };
  /** Relief and check valves: open at the end, and how often it opened (counted on samples and step ends). */
  open_at_end?: boolean;
  times_opened?: number;
}

/**
 * Summaries by section and element name, as the elements give them (elements/contract.ts:
 * `ElementSummary`): `chambers`, `lines`, `valves`, and the sections of other kinds.
 */
export type ElementSections = Record<string, Record<string, Record<string, unknown>>>;

export type { CylinderSummary } from '../elements/cylinder-summary.js';

/** A cylinder's summary in a run result (`sections.cylinders`), or undefined. */
export function cylinderSummary(r: Pick<RunResult, 'sections'>, name: string): import('../elements/cylinder-summary.js').CylinderSummary | undefined {
  return r.sections?.cylinders?.[name] as import('../elements/cylinder-summary.js').CylinderSummary | undefined;
}

export interface ExpectationResult {
  name: string;
  passed: boolean;
  actual: number;
  message: string;
  /** Where the expectation was written. */
  file: string;
  line: number;
  column: number;
}

export interface Trace {
  /** Channel keys `<name>.<quantity>` and their SI units. */
  channels: { key: string; unit: string }[];
  times: number[];
  /** values[c][k]: channel c at times[k]. */
  values: number[][];
}

export interface RunStats {
  method: string;
  steps: number;
  rejected: number;
  rhs: number;
  jacobians: number;
  lu: number;
  wall_ms: number;
}

/**
 * How one group of chambers (joined by branches that pass gas at some time) ends the run;
 * see analysis/outcome.ts for the criteria.
 */
export interface GroupOutcome {
  chambers: string[];
  /** No reservoir and no feed: the group conserves its gas. */
  closed: boolean;
  outcome: 'settled' | 'moving' | 'diverging' | 'oscillating';
  /** Time after which every chamber stays within the band of its final pressure and volume (s); settled only. */
  settling_time: number | null;
  /** Band as a fraction of each signal's excursion from its final value. */
  band: number;
  /** Rate at which the departure from the start grows (diverging), 1/s. */
  growth_rate?: number;
  /** Period of the oscillation (oscillating), s. */
  period?: number;
  evidence: string;
}

/** Why and where a run stopped early (status `failed`); see analysis/fault.ts. */
export interface RunFault {
  /** The element most likely at fault, or null (e.g. when interrupted). */
  element: string | null;
  kind: 'chamber' | 'line' | 'valve' | 'reservoir' | null;
  /** Time reached, s. */
  t: number;
  /** What stopped the run: the integrator's status, a budget, or the user. */
  cause: 'non-finite' | 'step-too-small' | 'singular' | 'budget-steps' | 'budget-wall' | 'interrupted' | 'stopped' | 'max-steps';
  /** The likely cause, in words. */
  likely: string;
}

/** How many events of one kind an element logged, and when first and last (s). */
export interface EventTally { element: string; kind: string; count: number; first: number; last: number }

export interface RunResult {
  format: 1;
  title: string;
  /** The netlist's `description:`, when it has one. */
  description?: string;
  file: string;
  status: 'completed' | 'failed';
  message: string;
  end: number;
  stats: RunStats;
  chambers: Record<string, ChamberSummary>;
  lines: Record<string, LineSummary>;
  valves: Record<string, ValveSummary>;
  /** Sections of element kinds beyond chambers, lines and valves (written after them in JSON). */
  sections?: ElementSections;
  /** Rows of the printed table for those sections, where the elements give them (not in JSON). */
  rows?: Record<string, Record<string, [string, string][]>>;
  mass: { initial: number; final: number; through_boundaries: number; drift: number };
  /**
   * The events in time order: all of them, or, in a run with more than 1 000, the first 500 and
   * the last 500 (see `events_omitted` and `event_counts`).
   */
  events: { t: number; what: string }[];
  /** Events left out of `events` (between the first and the last ones kept); absent when none. */
  events_omitted?: number;
  /** When events were left out: every event counted by element and kind, with its first and last time. */
  event_counts?: EventTally[];
  warnings: string[];
  expectations: ExpectationResult[];
  /** Set when the run stopped early (status `failed`): the element, the time and a likely cause. */
  fault?: RunFault;
  /** How each group of chambers ends the run (always set by `simulate`). */
  outcomes?: GroupOutcome[];
  trace: Trace;
  /** Channel values at the times of `SimulateOptions.probe` (probed[c][k]), from the dense output. */
  probed?: Float64Array[];
  /** Ambient pressure (Pa) used for gauge values, for printing. */
  ambient: number;
}
