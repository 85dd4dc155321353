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
  | { kind: 'relief'; opensAbove: number /* Pa gauge */; reseatsBelow: number /* Pa gauge */; fullLiftAt?: number /* Pa gauge */ }
  /**
   * Pressure-reducing valve: opening = clamp((set − p_to,gauge)/band, 0, 1); with `relieving`,
   * a vent from `to` to ambient at opening clamp((p_to,gauge − set)/band, 0, 1); the opening
   * lags the law by `timeConstant` (s, 0 = none).
   */
  | { kind: 'regulator'; set: number /* Pa gauge */; band: number /* Pa */; relieving: boolean; timeConstant: number }
  /** Opening set by a controller (controllers.<controller>). */
  | { kind: 'driven'; controller: string };

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

export type FlowValue = { kind: 'mass'; value: number /* kg/s */ } | { kind: 'anr'; value: number /* m³/s at ISO 8778 */ };

/** Delivered flow against the fed chamber's pressure (Pa absolute, strictly increasing). */
export interface FeedCurve {
  pressure: number[];
  flow: FlowValue[];
  /** Pa absolute where delivery has fallen to zero (the last point's pressure when it ends at zero flow). */
  shutOff: number;
}

export interface FeedSpec {
  name: string;
  into: string;
  /** For a feed with a curve: the flow at the curve's first point (for reports). */
  rate: FlowValue;
  curve?: FeedCurve;
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

/** A controller's set point: SI in the measured quantity's dimension (pressures absolute Pa). */
export interface ControllerSpec {
  name: string;
  kind: 'pid';
  measure: Probe;
  target: TimeSeries;
  drives: string;
  /** Gains in SI: 1/[measure], 1/([measure]·s), s/[measure]. */
  kp: number;
  ki: number;
  kd: number;
  /** Derivative filter time constant (s). */
  filter: number;
  limits: { min: number; max: number };
  antiWindup: 'clamping' | 'back-calculation';
  /** Back-calculation tracking time (s). */
  tracking: number;
  /** Sample period (s) of a discrete controller; undefined: continuous. */
  sample?: number;
  /** Output at t = 0. */
  initially: number;
  pos: SourcePos;
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
  | 'position' | 'velocity' | 'stroke-time' | 'impact-velocity' | 'dissipated'
  | 'output' | 'error' | (string & {});

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
      /**
       * `overshoot`: how far the probe goes past its final value (at t1) beyond the step from its
       * value at t0, as a fraction of that step: max over [t0, t1] of (x − x1)·sgn(x1 − x0)/|x1 − x0|, ≥ 0.
       */
      when: { at: number | 'end' } | { over: [number, number]; stat: 'max' | 'min' | 'mean' | 'overshoot' };
      compare: Comparison;
      pos: SourcePos;
    }
  | {
    kind: 'settles'; name: string; within: number;
    /** Fraction of each quantity's excursion over the run (or of its final value, below). */
    band: number;
    /** `excursion` (default): |q − q_end| ≤ band·max(E, 0.1 %·|q_end|); `final-value`: ≤ band·|q_end|. */
    relativeTo?: 'excursion' | 'final-value';
    /** With `probe`: that one probe instead of every chamber's pressure and volume. */
    probe?: Probe;
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
  controllers: ControllerSpec[];
  /** Elements of kinds read from their table alone. */
  elements?: ElementSpec[];
  simulate: SimulateSpec;
  expect: ExpectSpec[];
  /** Dotted netlist paths of optional parameters that took their default (e.g. `lines.supply.roughness`). */
  defaulted?: string[];
}
