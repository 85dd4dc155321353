/**
 * Parameter tables: one per section, element kind, wall law, valve rating and valve operation.
 * Plain data. The same tables drive validation (unknown keys, required keys, dimensions,
 * bounds, defaults), the JSON Schema (`schema.ts`), `plenum kinds` and the README's table.
 *
 * `default` is written as in a netlist and goes through the same parser as a given value.
 * `bounds` are in SI.
 *
 * Longer than 500 lines on purpose: it is plain data, one table per kind, and keeping every table
 * in one file is what lets a reader see the whole netlist format (and a new kind add one entry).
 */
import type { Dimension } from '../units/dimensions.js';

export type ParamDimension =
  | Dimension
  /** Must say gauge or abs; stored Pa absolute. */
  | 'absolute-pressure'
  /** Must say gauge or abs; stored Pa gauge. */
  | 'gauge-pressure'
  /** Absolute by definition, `abs` optional (the ambient pressure); stored Pa. */
  | 'ambient-pressure'
  /** A plain pressure (a difference); stored Pa. */
  | 'pressure-difference'
  /** "40%" or a number 0..1. */
  | 'fraction'
  | 'integer'
  /** The name of another element. */
  | 'name'
  /** One of `values`. */
  | 'enum'
  | 'text'
  /** A nested structure described by `shape` (validated by dedicated code). */
  | 'structure';

export interface Bounds {
  gt?: number;
  ge?: number;
  lt?: number;
  le?: number;
}

export interface ParamSpec {
  name: string;
  dimension: ParamDimension;
  required: boolean;
  default?: string | number;
  doc: string;
  bounds?: Bounds;
  values?: readonly string[];
  /** For `structure`: the name of its schema definition. */
  shape?: string;
}

export type Section =
  | 'top'
  | 'ambient'
  | 'gas'
  | 'chamber'
  | 'wall'
  | 'start'
  | 'limits'
  | 'reservoir'
  | 'line'
  | 'valve'
  | 'valve-rating'
  | 'valve-operation'
  | 'schedule-step'
  | 'feed'
  | 'cylinder'
  | 'controller'
  | 'element'
  | 'simulate'
  | 'expect';

export interface KindTable {
  kind: string;
  section: Section;
  doc: string;
  params: ParamSpec[];
}

const POSITIVE: Bounds = { gt: 0 };
const NON_NEGATIVE: Bounds = { ge: 0 };

function p(name: string, dimension: ParamDimension, doc: string, extra: Partial<ParamSpec> = {}): ParamSpec {
  return { name, dimension, required: true, doc, ...extra };
}
function opt(name: string, dimension: ParamDimension, doc: string, extra: Partial<ParamSpec> = {}): ParamSpec {
  return { name, dimension, required: false, doc, ...extra };
}

export const GAS_NAMES = ['air', 'nitrogen', 'helium', 'carbon-dioxide'] as const;
export const HEAT_MODES = ['isothermal', 'adiabatic', 'exchange'] as const;
export const LINE_MODELS = ['lumped', 'wave'] as const;
export const METHODS = ['auto', 'explicit', 'implicit'] as const;
export const STATS = ['max', 'min', 'mean', 'overshoot'] as const;
/** What a `settles` band is a fraction of. */
export const SETTLE_REFERENCES = ['excursion', 'final-value'] as const;
export const SPHERE_LAWS = ['neo-hookean', 'mooney-rivlin', 'gent'] as const;
export const CONTROLLER_KINDS = ['pid'] as const;
export const ANTI_WINDUP = ['clamping', 'back-calculation'] as const;

// ---- walls ---------------------------------------------------------------------------------

const RADIUS = p('radius', 'length', 'unstretched inner radius r0', { bounds: POSITIVE });
const THICKNESS = p('thickness', 'length', 'unstretched wall thickness t0 (thin wall: t0 < r0)', { bounds: POSITIVE });

export const WALL_LAWS: KindTable[] = [
  {
    kind: 'rigid',
    section: 'wall',
    doc: 'rigid vessel: V constant',
    params: [p('volume', 'volume', 'internal volume', { bounds: POSITIVE })],
  },
  {
    kind: 'linear',
    section: 'wall',
    doc: 'linearly compliant vessel: V = V0 + C·p_gauge',
    params: [
      p('volume', 'volume', 'volume V0 at zero gauge pressure', { bounds: POSITIVE }),
      p('compliance', 'compliance', 'compliance C, volume per pressure', { bounds: POSITIVE }),
    ],
  },
  {
    kind: 'neo-hookean',
    section: 'wall',
    doc: 'thin rubber sphere, neo-Hookean: Δp = (2μt0/r0)(λ⁻¹ − λ⁻⁷)',
    params: [RADIUS, THICKNESS, p('shear-modulus', 'pressure', 'shear modulus μ', { bounds: POSITIVE })],
  },
  {
    kind: 'mooney-rivlin',
    section: 'wall',
    doc: 'thin rubber sphere, Mooney–Rivlin: Δp = (4t0/r0)(C1 + λ²C2)(λ⁻¹ − λ⁻⁷)',
    params: [
      RADIUS,
      THICKNESS,
      p('c1', 'pressure', 'Mooney–Rivlin constant C1', { bounds: POSITIVE }),
      p('c2', 'pressure', 'Mooney–Rivlin constant C2', { bounds: NON_NEGATIVE }),
    ],
  },
  {
    kind: 'gent',
    section: 'wall',
    doc: 'thin rubber sphere, Gent: neo-Hookean ÷ (1 − (2λ² + λ⁻⁴ − 3)/Jm)',
    params: [
      RADIUS,
      THICKNESS,
      p('shear-modulus', 'pressure', 'shear modulus μ', { bounds: POSITIVE }),
      p('limit', 'dimensionless', 'Gent locking parameter Jm (about 97 for natural rubber)', { bounds: POSITIVE }),
    ],
  },
  {
    kind: 'measured',
    section: 'wall',
    doc: 'measured pressure–volume curve, monotone interpolation; hysteresis when deflation is given',
    params: [
      p('points', 'structure', 'inflation curve: at least 3 [volume, gauge pressure] pairs, volume strictly increasing', { shape: 'points' }),
      opt('deflation', 'structure', 'deflation curve, same form as points', { shape: 'points' }),
    ],
  },
];

// ---- chambers ------------------------------------------------------------------------------

export const CHAMBER: KindTable = {
  kind: 'chamber',
  section: 'chamber',
  doc: 'a gas chamber (state-holding node); the wall law’s parameters sit beside `wall`',
  params: [
    p('wall', 'enum', 'pressure–volume law of the wall', { values: WALL_LAWS.map((w) => w.kind) }),
    p('start', 'structure', 'initial state: exactly one of pressure, stretch, volume, mass', { shape: 'start' }),
    opt('temperature', 'temperature', 'initial gas temperature (default ambient); may also be given in start', { bounds: POSITIVE }),
    opt('limits', 'structure', 'safety limits that raise warnings when exceeded', { shape: 'limits' }),
    opt('heat-transfer', 'heat-conductance', 'h·A between gas and surroundings, for heat: exchange', { bounds: NON_NEGATIVE }),
  ],
};

export const START: KindTable = {
  kind: 'start',
  section: 'start',
  doc: 'initial state of a chamber: exactly one of pressure, stretch, volume, mass; optional temperature',
  params: [
    opt('pressure', 'absolute-pressure', 'initial pressure (gauge or abs)', { bounds: POSITIVE }),
    opt('stretch', 'dimensionless', 'initial stretch λ = r/r0 (spheres only; 1 or more: a sphere starts at or above its unstretched size)', { bounds: POSITIVE }),
    opt('volume', 'volume', 'initial volume', { bounds: POSITIVE }),
    opt('mass', 'mass', 'initial gas mass', { bounds: POSITIVE }),
    opt('temperature', 'temperature', 'initial gas temperature (default ambient)', { bounds: POSITIVE }),
  ],
};

export const LIMITS: KindTable = {
  kind: 'limits',
  section: 'limits',
  doc: 'safety limits: a warning is raised when exceeded',
  params: [
    opt('pressure', 'absolute-pressure', 'highest safe pressure (gauge or abs)'),
    opt('stretch', 'dimensionless', 'highest safe stretch (spheres only)', { bounds: { gt: 1 } }),
  ],
};

// ---- boundaries and branches ---------------------------------------------------------------

export const RESERVOIR: KindTable = {
  kind: 'reservoir',
  section: 'reservoir',
  doc: 'fixed-pressure boundary node; `ambient` is always available',
  params: [
    p('pressure', 'structure', 'a constant (`300 kPa gauge`), a time table [[t, p], ...], or an expression in t', { shape: 'pressure-series' }),
    opt('temperature', 'temperature', 'temperature of gas leaving the reservoir (default ambient)', { bounds: POSITIVE }),
  ],
};

export const LINE: KindTable = {
  kind: 'line',
  section: 'line',
  doc: 'a tube between two nodes: laminar (Hagen–Poiseuille) to turbulent friction',
  params: [
    p('from', 'name', 'upstream node (chamber, reservoir or ambient); positive flow is from → to'),
    p('to', 'name', 'downstream node (chamber, reservoir or ambient)'),
    p('diameter', 'length', 'inner diameter', { bounds: POSITIVE }),
    p('length', 'length', 'tube length', { bounds: POSITIVE }),
    opt('roughness', 'length', 'absolute wall roughness; 0 is hydraulically smooth (polymer tubing; drawn metal tube is about 1.5 µm, common practice)', {
      default: 0,
      bounds: NON_NEGATIVE,
    }),
    opt('model', 'enum', 'lumped: one resistance, the line volume split between its ends; wave: segments of gas mass, momentum and energy, so pressure waves travel at the speed of sound', { values: LINE_MODELS, default: 'lumped' }),
    opt('segments', 'integer', 'segments of a wave line (default from its length and the fastest valve ramp: docs/wave-lines.md)', { bounds: { ge: 1, le: 2000 } }),
  ],
};

export const VALVE: KindTable = {
  kind: 'valve',
  section: 'valve',
  doc: 'a valve between two nodes, or inside a line; needs one rating and one way of opening',
  params: [
    opt('from', 'name', 'upstream node; may be omitted with in-line (then the line’s from)'),
    opt('to', 'name', 'downstream node; may be omitted with in-line (then the line’s to)'),
    opt('in-line', 'name', 'the line this valve sits in (series combination)'),
  ],
};

export const VALVE_RATINGS: KindTable[] = [
  {
    kind: 'iso6358',
    section: 'valve-rating',
    doc: 'ISO 6358-1 flow-rate characteristic: sonic conductance C, critical pressure ratio b, subsonic index m',
    params: [
      p('conductance', 'conductance', 'sonic conductance C, e.g. `0.9 L/(s*bar)`', { bounds: POSITIVE }),
      p('critical-ratio', 'dimensionless', 'critical pressure ratio b', { bounds: { gt: 0, lt: 1 } }),
      opt('subsonic-index', 'dimensionless', 'subsonic index m (ISO 6358-1 default 0.5)', { default: 0.5, bounds: POSITIVE }),
    ],
  },
  {
    kind: 'orifice',
    section: 'valve-rating',
    doc: 'sharp orifice: compressible nozzle flow, choked and subsonic',
    params: [
      p('orifice', 'length', 'orifice diameter', { bounds: POSITIVE }),
      p('discharge-coefficient', 'dimensionless', 'discharge coefficient Cd', { bounds: { gt: 0, le: 1 } }),
    ],
  },
];

export const VALVE_OPERATIONS: KindTable[] = [
  {
    kind: 'schedule',
    section: 'valve-operation',
    doc: 'opened and closed in time: an initial opening and/or a schedule of ramps',
    params: [
      opt('initially', 'structure', '`open`, `closed` or an opening (default closed with a schedule)', { shape: 'opening' }),
      opt('schedule', 'structure', 'list of { at, open, over }: from `at`, ramp to `open` over `over`', { shape: 'schedule' }),
    ],
  },
  {
    kind: 'check',
    section: 'valve-operation',
    doc: 'check valve: open while p_from − p_to exceeds the cracking pressure',
    params: [p('check', 'structure', '{ cracking: <pressure difference> }', { shape: 'check' })],
  },
  {
    kind: 'relief',
    section: 'valve-operation',
    doc: 'relief valve: pop action (opens above opens-above, recloses below reseats-below) or proportional lift (opens in proportion from opens-above to full-lift-at, recloses on the same curve); discharges from → to only',
    params: [p('relief', 'structure', '{ opens-above, reseats-below } (pop action) or { opens-above, full-lift-at } (proportional lift), gauge or abs', { shape: 'relief' })],
  },
  {
    kind: 'regulator',
    section: 'valve-operation',
    doc: 'pressure-reducing valve: opening follows the downstream gauge pressure, fully open at set − band, shut at set (proportional, with droop)',
    params: [
      p('regulates', 'structure', '{ set, band }: set pressure (gauge or abs) and proportional band (a pressure difference)', { shape: 'regulates' }),
      opt('relieving', 'structure', '`true`: above the set pressure it vents downstream gas to ambient through its own rating', { shape: 'boolean', default: 'false' }),
      opt('time-constant', 'time', 'first-order lag of the opening behind the downstream pressure (0: none)', { default: 0, bounds: NON_NEGATIVE }),
    ],
  },
];

export const REGULATES: KindTable = {
  kind: 'regulates',
  section: 'valve-operation',
  doc: 'regulator settings (downstream gauge pressure)',
  params: [
    p('set', 'gauge-pressure', 'downstream pressure at which it shuts (lock-up)'),
    p('band', 'pressure-difference', 'proportional band: fully open at set − band', { bounds: { gt: 0 } }),
  ],
};

export const CHECK: KindTable = {
  kind: 'check-settings',
  section: 'valve-operation',
  doc: 'check valve settings',
  params: [p('cracking', 'pressure-difference', 'pressure difference p_from − p_to at which it opens', { bounds: NON_NEGATIVE })],
};

export const RELIEF: KindTable = {
  kind: 'relief-settings',
  section: 'valve-operation',
  doc: 'relief valve settings (upstream gauge pressure)',
  params: [
    p('opens-above', 'gauge-pressure', 'set pressure: opens when the upstream pressure rises above this'),
    opt('reseats-below', 'gauge-pressure', 'pop action: closes again when the upstream pressure falls below this (< opens-above)'),
    opt('full-lift-at', 'gauge-pressure', 'proportional lift: fully open at this upstream pressure (> opens-above; about 10 % above the set pressure is common practice)'),
  ],
};

export const SCHEDULE_STEP: KindTable = {
  kind: 'schedule-step',
  section: 'schedule-step',
  doc: 'from time `at`, ramp linearly to `open` over `over`',
  params: [
    p('at', 'time', 'start of the ramp', { bounds: NON_NEGATIVE }),
    p('open', 'structure', 'target opening: `open`, `closed`, `40%` or 0..1', { shape: 'opening' }),
    opt('over', 'time', 'ramp duration (0: a step)', { default: 0, bounds: NON_NEGATIVE }),
  ],
};

export const FEED: KindTable = {
  kind: 'feed',
  section: 'feed',
  doc: 'a mass source into a chamber',
  params: [
    p('into', 'name', 'the chamber fed'),
    opt('rate', 'structure', 'mass flow (`0.5 g/s`) or standard volume flow at ISO 8778 (`10 L/min ANR`); required unless `curve` is given', { shape: 'rate' }),
    opt('curve', 'structure', 'delivered flow against the fed chamber’s pressure: [[pressure, flow], ...] (a compressor or pump); pressures gauge or abs, increasing; flows as `rate`', { shape: 'feed-curve' }),
    opt('shut-off', 'absolute-pressure', 'pressure at which delivery has stopped (dead-head): the curve falls linearly from its last point to zero here; needs `curve`'),
    opt('temperature', 'temperature', 'temperature of the entering gas (default ambient)', { bounds: POSITIVE }),
    opt('initially', 'structure', 'initial fraction of the rate (default 100%)', { shape: 'opening', default: '100%' }),
    opt('schedule', 'structure', 'list of { at, open, over } scaling the rate', { shape: 'schedule' }),
  ],
};

// ---- control ------------------------------------------------------------------------------

export const CONTROLLER: KindTable = {
  kind: 'controller',
  section: 'controller',
  doc: 'a PI/PID controller: measures a probe, drives a valve’s opening (u = kp·e + ∫ki·e dt + D, e = target − measure)',
  params: [
    p('kind', 'enum', 'control law', { values: CONTROLLER_KINDS }),
    p('measure', 'text', 'the probe it measures, `<element>.<quantity>` (e.g. `cell.gauge`)'),
    p('target', 'structure', 'set point in the probe’s dimension: a constant, a time table [[t, value], ...] or an expression in t (pressures say gauge or abs)', { shape: 'target' }),
    p('drives', 'name', 'the valve whose opening it sets (that valve has no schedule, check, relief or regulator of its own)'),
    p('kp', 'structure', 'proportional gain: opening per unit of the measure, e.g. `2 %/kPa` (a bare number is SI: 1/Pa for a pressure)', { shape: 'gain' }),
    opt('ki', 'structure', 'integral gain: opening per unit of the measure and second, e.g. `5 %/(kPa*s)`', { shape: 'gain', default: 0 }),
    opt('kd', 'structure', 'derivative gain (on the measure, filtered): opening·s per unit of the measure, e.g. `0.1 %*s/kPa`', { shape: 'gain', default: 0 }),
    opt('derivative-filter', 'time', 'time constant of the derivative filter (default kd/(10·kp), or 1 ms without kp)', { bounds: POSITIVE }),
    opt('limits', 'structure', '{ min, max }: output (opening) limits, default 0 % and 100 %', { shape: 'output-limits' }),
    opt('anti-windup', 'enum', 'clamping (integration stops once the output saturates with the error driving it further, until the error turns) or back-calculation', { values: ANTI_WINDUP, default: 'clamping' }),
    opt('tracking-time', 'time', 'back-calculation tracking time Tt (default √(Ti·Td), or Ti = kp/ki without kd)', { bounds: POSITIVE }),
    opt('sample', 'time', 'sample period of a discrete controller (output held between samples); absent: continuous', { bounds: POSITIVE }),
    opt('initially', 'structure', 'integral part at t = 0: the output at zero error, as if it had held the plant before the run (default the lower limit); an error at t = 0 acts through kp at once', { shape: 'opening' }),
  ],
};

export const OUTPUT_LIMITS: KindTable = {
  kind: 'output-limits',
  section: 'controller',
  doc: 'controller output limits',
  params: [
    opt('min', 'fraction', 'lowest opening', { default: '0%' }),
    opt('max', 'fraction', 'highest opening', { default: '100%' }),
  ],
};

// ---- cylinders -----------------------------------------------------------------------------

export const CYLINDER: KindTable = {
  kind: 'cylinder',
  section: 'cylinder',
  doc: 'a pneumatic cylinder: a piston moving a load; its gas volumes are the nodes `<name>.cap` and `<name>.rod`',
  params: [
    p('bore', 'length', 'piston (bore) diameter D', { bounds: POSITIVE }),
    opt('rod', 'length', 'rod diameter d, thinner than the bore; absent: single-acting, the rod side open to ambient', { bounds: POSITIVE }),
    p('stroke', 'length', 'stroke s: the piston moves over 0 ≤ x ≤ s (x = 0 retracted)', { bounds: POSITIVE }),
    p('dead-volume', 'structure', 'gas volume left at each end with the piston against it (ports, cushions): one value for both, or { cap, rod }', { shape: 'dead-volume' }),
    p('moving-mass', 'mass', 'mass M of piston, rod and the load they carry', { bounds: POSITIVE }),
    opt('spring', 'structure', '{ rate, preload }: a spring that retracts the piston, force preload + rate·x', { shape: 'spring' }),
    opt('force', 'structure', 'external load opposing extension: a constant (`40 N`), a table [[t, F], ...] or an expression in t', { shape: 'force-series' }),
    opt('friction', 'structure', '{ static, sliding, viscous }: stick–slip friction of piston and seals (Karnopp)', { shape: 'friction' }),
    opt('mounting', 'structure', '{ angle }: the extending direction’s angle above the horizontal; gravity acts along the axis', { shape: 'mounting' }),
    opt('start', 'structure', '{ position, cap: { pressure }, rod: { pressure } }; default retracted with both sides at ambient', { shape: 'cylinder-start' }),
    opt('heat-transfer', 'heat-conductance', 'h·A between the gas of each side and the surroundings, for heat: exchange (default 0: adiabatic sides)', { bounds: NON_NEGATIVE }),
  ],
};

export const DEAD_VOLUME: KindTable = {
  kind: 'dead-volume',
  section: 'cylinder',
  doc: 'dead volumes of a cylinder’s two sides',
  params: [
    p('cap', 'volume', 'cap-side gas volume at x = 0', { bounds: POSITIVE }),
    opt('rod', 'volume', 'rod-side gas volume at x = s (double-acting only)', { bounds: POSITIVE }),
  ],
};

export const SPRING: KindTable = {
  kind: 'spring',
  section: 'cylinder',
  doc: 'a return spring acting to retract: force preload + rate·x',
  params: [
    p('rate', 'spring-rate', 'spring rate k', { bounds: NON_NEGATIVE }),
    opt('preload', 'force', 'spring force F0 at x = 0 (retracted)', { default: '0 N', bounds: NON_NEGATIVE }),
  ],
};

export const FRICTION: KindTable = {
  kind: 'friction',
  section: 'cylinder',
  doc: 'Karnopp stick–slip friction: static (breakaway) and sliding (Coulomb) levels and a viscous part',
  params: [
    opt('static', 'force', 'breakaway force F_s: a piston at rest moves once the net force exceeds it (default: the sliding level)', { bounds: NON_NEGATIVE }),
    opt('sliding', 'force', 'Coulomb force F_c ≤ F_s against the motion (default: the static level)', { bounds: NON_NEGATIVE }),
    opt('viscous', 'damping', 'viscous coefficient c: c·v against the motion', { default: '0 N*s/m', bounds: NON_NEGATIVE }),
  ],
};

export const MOUNTING: KindTable = {
  kind: 'mounting',
  section: 'cylinder',
  doc: 'how the cylinder is mounted',
  params: [p('angle', 'angle', 'angle of the extending direction above the horizontal (`90 deg`: extends upwards, against gravity)', { bounds: { ge: -Math.PI, le: Math.PI } })],
};

export const CYLINDER_START: KindTable = {
  kind: 'cylinder-start',
  section: 'cylinder',
  doc: 'initial state of a cylinder: piston position (at rest) and each side’s gas',
  params: [
    opt('position', 'length', 'initial piston position x within 0..stroke', { default: '0 m' }),
    opt('cap', 'structure', '{ pressure, temperature } of the cap-side gas (default ambient)', { shape: 'port-start' }),
    opt('rod', 'structure', '{ pressure, temperature } of the rod-side gas (default ambient; double-acting only)', { shape: 'port-start' }),
  ],
};

export const PORT_START: KindTable = {
  kind: 'port-start',
  section: 'cylinder',
  doc: 'initial gas of one side of a cylinder: pressure or mass, optional temperature',
  params: [
    opt('pressure', 'absolute-pressure', 'initial pressure (gauge or abs)', { bounds: POSITIVE }),
    opt('mass', 'mass', 'initial gas mass', { bounds: POSITIVE }),
    opt('temperature', 'temperature', 'initial gas temperature (default ambient)', { bounds: POSITIVE }),
  ],
};

// ---- element kinds read from their table alone -------------------------------------------

/**
 * An element kind that needs no reading code of its own: the netlist section `key` maps names to
 * entries whose keys are the table's parameters (a `name` parameter names a chamber, a reservoir
 * or `ambient`). Its element lives in src/elements/ and is made by elements/registry.ts; see
 * DEVELOPERS.md, "How to add an element kind".
 */
export interface ElementTable extends KindTable {
  section: 'element';
  /** The netlist section, e.g. `leaks`. */
  key: string;
  /** Quantities its channels offer to expectations (`<name>.<quantity>`), with their dimensions. */
  probes: Readonly<Record<string, Dimension>>;
  /** It exchanges gas with the surroundings: a group of chambers it touches is open. */
  boundary?: boolean;
}

export const LEAK: ElementTable = {
  kind: 'leak',
  section: 'element',
  key: 'leaks',
  doc: 'a fixed leak: a sharp orifice from a chamber to the surroundings (compressible nozzle flow, choked and subsonic)',
  probes: { flow: 'mass-flow', lost: 'mass' },
  boundary: true,
  params: [
    p('from', 'name', 'the chamber that leaks'),
    p('diameter', 'length', 'orifice diameter', { bounds: POSITIVE }),
    opt('discharge-coefficient', 'dimensionless', 'discharge coefficient Cd (about 0.6 for a sharp-edged hole, common practice)', { default: 0.6, bounds: { gt: 0, le: 1 } }),
  ],
};

/** Element kinds read from their table alone, in the order their sections are read. */
export const ELEMENT_TABLES: ElementTable[] = [LEAK];

// ---- top level -----------------------------------------------------------------------------

export const AMBIENT: KindTable = {
  kind: 'ambient',
  section: 'ambient',
  doc: 'the surroundings; also the reservoir named `ambient`',
  params: [
    opt('pressure', 'ambient-pressure', 'ambient pressure, absolute by definition (`abs` optional)', { default: '101.325 kPa', bounds: POSITIVE }),
    opt('temperature', 'temperature', 'ambient temperature', { default: '20 degC', bounds: POSITIVE }),
  ],
};

export const CUSTOM_GAS: KindTable = {
  kind: 'custom-gas',
  section: 'gas',
  doc: 'a gas given by its properties (ideal gas, constant γ, Sutherland viscosity)',
  params: [
    opt('name', 'text', 'a name for reports'),
    p('molar-mass', 'molar-mass', 'molar mass', { bounds: POSITIVE }),
    p('gamma', 'dimensionless', 'ratio of specific heats cp/cv', { bounds: { gt: 1 } }),
    p('viscosity', 'structure', '{ value, at, sutherland }: μ at temperature `at`, Sutherland constant', { shape: 'viscosity' }),
  ],
};

export const VISCOSITY: KindTable = {
  kind: 'viscosity',
  section: 'gas',
  doc: 'Sutherland law μ(T) = μref (T/Tref)^1.5 (Tref + S)/(T + S)',
  params: [
    p('value', 'viscosity', 'dynamic viscosity μref', { bounds: POSITIVE }),
    p('at', 'temperature', 'reference temperature Tref', { bounds: POSITIVE }),
    p('sutherland', 'temperature-difference', 'Sutherland constant S (in K)', { bounds: NON_NEGATIVE }),
  ],
};

export const SIMULATE: KindTable = {
  kind: 'simulate',
  section: 'simulate',
  doc: 'how long and how precisely to simulate',
  params: [
    p('duration', 'time', 'simulated time', { bounds: POSITIVE }),
    opt('sample', 'time', 'output interval (≤ duration; default chosen by the solver)', { bounds: POSITIVE }),
    opt('method', 'enum', 'integrator family', { values: METHODS, default: 'auto' }),
    opt('tolerance', 'dimensionless', 'relative tolerance', { default: 1e-6, bounds: { ge: 1e-12, le: 0.1 } }),
    opt('max-steps', 'integer', 'step budget: the run stops with status failed when exhausted', { bounds: POSITIVE }),
    opt('max-wall', 'time', 'wall-clock budget', { bounds: POSITIVE }),
  ],
};

export const EXPECT: KindTable = {
  kind: 'expect',
  section: 'expect',
  doc: 'a check for CI: a probe, when to look, and a comparison; or settles',
  params: [
    opt('name', 'text', 'name shown in reports (default: generated from the check)'),
    opt('probe', 'text', '<element>.<quantity> or total.mass'),
    opt('at', 'structure', 'a time or `end`', { shape: 'at' }),
    opt('over', 'structure', '[t0, t1], with stat', { shape: 'over' }),
    opt('stat', 'enum', 'statistic over the interval; `overshoot`: how far the probe passes its final value, as a fraction of its step over the interval (compare with e.g. `below: 10%`)', { values: STATS }),
    opt('below', 'structure', 'passes when the value is below this (in the probe’s dimension)', { shape: 'probe-value' }),
    opt('above', 'structure', 'passes when the value is above this', { shape: 'probe-value' }),
    opt('near', 'structure', '{ value, within: <abs or %> }', { shape: 'near' }),
    opt('settles', 'structure', '{ within: <time>, band: <%> }: every chamber (or, with `probe`, that probe) stays within band (of its excursion) of its final value after `within`', { shape: 'settles' }),
  ],
};

export const NEAR: KindTable = {
  kind: 'near',
  section: 'expect',
  doc: 'near comparison',
  params: [
    p('value', 'structure', 'target value in the probe’s dimension', { shape: 'probe-value' }),
    p('within', 'structure', 'allowed deviation: absolute (same dimension) or relative (`5%`)', { shape: 'within' }),
  ],
};

export const SETTLES: KindTable = {
  kind: 'settles',
  section: 'expect',
  doc: 'settling check',
  params: [
    p('within', 'time', 'time after which every chamber stays in the band', { bounds: NON_NEGATIVE }),
    p('band', 'fraction', 'band around the final value, as a fraction of each quantity’s excursion over the run (floor: 0.1 % of the final value)', { bounds: POSITIVE }),
    opt('relative-to', 'enum', 'what the band is a fraction of: `excursion` (default; as the run’s outcome judges settling) or `final-value` (the absolute final pressure and volume)', { values: SETTLE_REFERENCES, default: 'excursion' }),
  ],
};

export const TOP: KindTable = {
  kind: 'netlist',
  section: 'top',
  doc: 'a plenum netlist, format 1',
  params: [
    p('format', 'integer', 'netlist format version: 1'),
    opt('title', 'text', 'title for reports (default: the file name)'),
    opt('description', 'text', 'free text describing the rig and the purpose of the run, shown in reports'),
    opt('gas', 'structure', 'air (default), nitrogen, helium, carbon-dioxide, or { molar-mass, gamma, viscosity }', { shape: 'gas', default: 'air' }),
    opt('ambient', 'structure', 'ambient pressure and temperature', { shape: 'ambient' }),
    opt('heat', 'enum', 'heat model: isothermal, adiabatic, or exchange (uses each chamber’s heat-transfer)', { values: HEAT_MODES, default: 'isothermal' }),
    opt('chambers', 'structure', 'chambers by name', { shape: 'chambers' }),
    opt('reservoirs', 'structure', 'reservoirs by name', { shape: 'reservoirs' }),
    opt('lines', 'structure', 'lines by name', { shape: 'lines' }),
    opt('valves', 'structure', 'valves by name', { shape: 'valves' }),
    opt('feeds', 'structure', 'feeds by name', { shape: 'feeds' }),
    opt('cylinders', 'structure', 'cylinders by name', { shape: 'cylinders' }),
    opt('controllers', 'structure', 'controllers by name', { shape: 'controllers' }),
    ...ELEMENT_TABLES.map((k) => opt(k.key, 'structure', `${k.kind}s by name`, { shape: k.key })),
    p('simulate', 'structure', 'duration and solver settings', { shape: 'simulate' }),
    opt('expect', 'structure', 'checks for CI', { shape: 'expect' }),
  ],
};

/** Every table, for `plenum kinds` and the README. */
export const ALL_TABLES: KindTable[] = [
  TOP, AMBIENT, CUSTOM_GAS, VISCOSITY, CHAMBER, ...WALL_LAWS, START, LIMITS, RESERVOIR, LINE, VALVE,
  ...VALVE_RATINGS, ...VALVE_OPERATIONS, CHECK, RELIEF, REGULATES, SCHEDULE_STEP, FEED, CONTROLLER, OUTPUT_LIMITS, CYLINDER, DEAD_VOLUME, SPRING, FRICTION,
  MOUNTING, CYLINDER_START, PORT_START, ...ELEMENT_TABLES, SIMULATE, EXPECT, NEAR, SETTLES,
];

/** The table of a wall law, or undefined. */
export function wallLaw(kind: string): KindTable | undefined {
  return WALL_LAWS.find((w) => w.kind === kind);
}

/** Probe quantities by element kind (kinds read from their table bring their own). */
export const PROBE_QUANTITIES: Readonly<Record<string, readonly string[]>> = {
  chamber: ['pressure', 'gauge', 'volume', 'mass', 'temperature', 'stretch'],
  line: ['flow', 'reynolds'],
  valve: ['flow', 'reynolds'],
  cylinder: ['position', 'velocity', 'stroke-time', 'impact-velocity', 'dissipated'],
  port: ['pressure', 'gauge', 'volume', 'mass', 'temperature'],
  controller: ['output', 'error'],
  total: ['mass'],
  ...Object.fromEntries(ELEMENT_TABLES.map((k) => [k.kind, Object.keys(k.probes)])),
};
