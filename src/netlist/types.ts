/**
 * NetlistDoc: a validated netlist. Every number is SI (Pa absolute unless a field says gauge,
 * m, m³, kg, K, s, kg/s). Produced by `readNetlist`; consumed by `model/`.
 */

/** Where something came from in the source text. */
export interface SourcePos {
  file: string;
  line: number;   // 1-based
  column: number; // 1-based
  path: (string | number)[];
}

/** A function of time with its kinks (where an integrator must restart). */
export interface TimeSeries {
  at(t: number): number;
  /** Times (s) where the function or its slope is discontinuous, ascending. */
  breakpoints: number[];
  constant: boolean;
  /** The text it came from, for reports. */
  text: string;
}

export interface GasSpec {
  name: string;          // air | nitrogen | helium | carbon-dioxide | custom
  molarMass: number;     // kg/mol
  gamma: number;         // cp/cv
  viscosity: { value: number; at: number; sutherland: number }; // Pa·s at K, Sutherland constant K
}

export type WallSpec =
  | { law: 'rigid'; volume: number }
  | { law: 'linear'; volume: number; compliance: number }           // m³, m³/Pa
  | { law: 'neo-hookean'; radius: number; thickness: number; shearModulus: number }
  | { law: 'mooney-rivlin'; radius: number; thickness: number; c1: number; c2: number }
  | { law: 'gent'; radius: number; thickness: number; shearModulus: number; limit: number }
  | { law: 'measured'; points: [number, number][]; deflation?: [number, number][] }; // [m³, Pa gauge]

export type StartSpec =
  | { by: 'pressure'; value: number }   // Pa absolute
  | { by: 'stretch'; value: number }    // -
  | { by: 'volume'; value: number }     // m³
  | { by: 'mass'; value: number };      // kg

export interface ChamberSpec {
  name: string;
  wall: WallSpec;
  start: StartSpec;
  /** K; undefined means ambient. */
  temperature?: number;
  limits?: { pressure?: number /* Pa absolute */; stretch?: number };
  /** h·A in W/K, for heat: exchange. */
  heatTransfer?: number;
  pos: SourcePos;
  /** Positions of individual keys, e.g. fieldPos['wall.radius']. */
  fieldPos: Record<string, SourcePos>;
}

export interface ReservoirSpec {
  name: string;
  pressure: TimeSeries;  // Pa absolute
  temperature?: number;  // K; undefined means ambient
  pos: SourcePos;
}

export interface LineSpec {
  name: string;
  from: string;
  to: string;
  diameter: number;   // m
  length: number;     // m
  roughness: number;  // m
  /** `lumped` (one resistance) or `wave` (segments; elements/wave-line.ts). */
  model: 'lumped' | 'wave';
  /** Segments of a wave line when given (else the default of model/wave.ts). */
  segments?: number;
  pos: SourcePos;
}

export type ValveRating =
  | { kind: 'iso6358'; conductance: number /* m³/(s·Pa) */; criticalRatio: number; subsonicIndex: number }
  | { kind: 'orifice'; diameter: number /* m */; dischargeCoefficient: number };

/** One schedule step: from time `at`, ramp linearly to `open` (0..1) over `over` seconds. */
export interface ScheduleStep { at: number; open: number; over: number }

export type ValveOperation =
  | { kind: 'schedule'; initially: number /* 0..1 */; steps: ScheduleStep[] }
  | { kind: 'check'; cracking: number /* Pa */ }
  /**
   * Pop action (`fullLiftAt` absent): discrete, opens above `opensAbove`, reseats below
   * `reseatsBelow`. Proportional lift: opening (p_gauge − opensAbove)/(fullLiftAt − opensAbove)
   * clamped to 0..1, the same curve both ways; `reseatsBelow` then equals `opensAbove`.
   */
  | { kind: 'relief'; opensAbove: number /* Pa gauge */; reseatsBelow: number /* Pa gauge */; fullLiftAt?: number /* Pa gauge */ };

export interface ValveSpec {
  name: string;
  from: string;
  to: string;
  rating: ValveRating;
  operation: ValveOperation;
  /** Name of the line this valve sits in (series combination); from/to then equal the line's. */
  inLine?: string;
  pos: SourcePos;
}

export interface FeedSpec {
  name: string;
  into: string;
  rate: { kind: 'mass'; value: number /* kg/s */ } | { kind: 'anr'; value: number /* m³/s at ISO 8778 */ };
  /** Temperature of the entering gas, K; undefined means ambient. */
  temperature?: number;
  initially: number;       // 0..1
  steps: ScheduleStep[];   // same semantics as a valve schedule, scaling the rate
  pos: SourcePos;
}

/** Initial gas of one side of a cylinder. */
export type PortStartSpec = { by: 'pressure'; value: number /* Pa absolute */; temperature?: number } | { by: 'mass'; value: number /* kg */; temperature?: number };

export interface CylinderSpec {
  name: string;
  bore: number;            // m
  /** Rod diameter, m; undefined for a single-acting cylinder (rod side open to ambient). */
  rod?: number;
  stroke: number;          // m
  deadVolume: { cap: number; rod: number }; // m³ (rod 0 for a single-acting cylinder)
  movingMass: number;      // kg
  spring: { rate: number /* N/m */; preload: number /* N */ };
  /** External load opposing extension, N, as a function of time; undefined: none. */
  force?: TimeSeries;
  friction: { static: number; sliding: number; viscous: number }; // N, N, N·s/m
  /** Angle of the extending direction above the horizontal, rad. */
  angle: number;
  start: { position: number /* m */; cap: PortStartSpec; rod?: PortStartSpec };
  /** h·A of each side in W/K, for heat: exchange. */
  heatTransfer?: number;
  pos: SourcePos;
  /** Positions of individual keys, e.g. fieldPos['start.position']. */
  fieldPos: Record<string, SourcePos>;
}

export interface SimulateSpec {
  duration: number;        // s
  sample?: number;         // s
  method: 'auto' | 'explicit' | 'implicit';
  tolerance: number;       // relative
  maxSteps?: number;
  maxWall?: number;        // s
  /** Where `sample` was written (or the `simulate` section when it was not), for diagnostics about the output grid. */
  samplePos?: SourcePos;
}

/** Quantities of the built-in kinds; kinds read from their table bring their own (kinds.ts). */
export type ProbeQuantity =
  | 'pressure' | 'gauge' | 'volume' | 'mass' | 'temperature' | 'stretch'
  | 'flow' | 'reynolds'
  | 'position' | 'velocity' | 'stroke-time' | 'impact-velocity' | 'dissipated' | (string & {});

export interface Probe {
  /** Element name (a cylinder's side: `clamp.cap`), or 'total' with quantity 'mass'. */
  element: string;
  quantity: ProbeQuantity;
  text: string;
}

/**
 * Comparison values are SI; for pressure quantities (`pressure`, `gauge`) values are
 * absolute Pa (the evaluator subtracts ambient for `gauge`).
 */
export type Comparison =
  | { kind: 'below'; value: number }
  | { kind: 'above'; value: number }
  | { kind: 'near'; value: number; within: { abs: number } | { rel: number } };

export type ExpectSpec =
  | {
      kind: 'probe';
      name: string;
      probe: Probe;
      when: { at: number | 'end' } | { over: [number, number]; stat: 'max' | 'min' | 'mean' };
      compare: Comparison;
      pos: SourcePos;
    }
  | {
    kind: 'settles'; name: string; within: number;
    /** Fraction of each quantity's excursion over the run (or of its final value, below). */
    band: number;
    /** `excursion` (default): |q − q_end| ≤ band·max(E, 0.1 %·|q_end|); `final-value`: ≤ band·|q_end|. */
    relativeTo?: 'excursion' | 'final-value';
    pos: SourcePos;
  };

/**
 * An element of a kind read from its table alone (kinds.ts: ELEMENT_TABLES): its parameters as
 * the table reads them (SI numbers, names as text), by parameter name.
 */
export interface ElementSpec {
  kind: string;
  name: string;
  values: Record<string, unknown>;
  pos: SourcePos;
}

export interface NetlistDoc {
  file: string;
  /** The source text, kept for reports. */
  source: string;
  format: 1;
  title: string;
  /** Free text about the rig and the run (top-level `description:`), shown in reports. */
  description?: string;
  gas: GasSpec;
  ambient: { pressure: number; temperature: number };
  heat: 'isothermal' | 'adiabatic' | 'exchange';
  chambers: ChamberSpec[];
  reservoirs: ReservoirSpec[];
  lines: LineSpec[];
  valves: ValveSpec[];
  feeds: FeedSpec[];
  cylinders: CylinderSpec[];
  /** Elements of kinds read from their table alone. */
  elements?: ElementSpec[];
  simulate: SimulateSpec;
  expect: ExpectSpec[];
  /** Dotted netlist paths of optional parameters that took their default (e.g. `lines.supply.roughness`). */
  defaulted?: string[];
}
