/** Result types of a transient run. `report/` reads only these. All numbers SI. */

export interface ChamberSummary {
  final: { pressure: number; gauge: number; volume: number; mass: number; temperature: number; stretch?: number };
  peak: { gauge: number; at: number };
  least: { gauge: number; at: number };
}

export interface LineSummary { peak_flow: number; peak_reynolds: number; regime: 'laminar' | 'transitional' | 'turbulent' }
export interface ValveSummary { peak_flow: number; choked: boolean }

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

export interface RunResult {
  format: 1;
  title: string;
  file: string;
  status: 'completed' | 'failed';
  message: string;
  end: number;
  stats: RunStats;
  chambers: Record<string, ChamberSummary>;
  lines: Record<string, LineSummary>;
  valves: Record<string, ValveSummary>;
  mass: { initial: number; final: number; through_boundaries: number; drift: number };
  events: { t: number; what: string }[];
  warnings: string[];
  expectations: ExpectationResult[];
  trace: Trace;
  /** Ambient pressure (Pa) used for gauge values, for printing. */
  ambient: number;
}
