/**
 * JSON Schema (draft-07) of netlist format 1, generated from the parameter tables, for
 * editors' YAML support (`# yaml-language-server: $schema=...`). Unit-bearing strings get a
 * pattern and a description naming the expected dimension; the schema checks shape, names and
 * enums, while `readNetlist` checks units, dimensions and cross-references.
 */
import { DIMENSIONS, type Dimension } from '../units/dimensions.js';
import {
  AMBIENT, CHAMBER, CHECK, CONTROLLER, CUSTOM_GAS, CYLINDER, CYLINDER_START, DEAD_VOLUME, ELEMENT_TABLES, EXPECT, FEED, FRICTION, GAS_NAMES, LIMITS,
  LINE, MOUNTING, NEAR, OUTPUT_LIMITS, PORT_START, REGULATES, RELIEF, RESERVOIR, SCHEDULE_STEP, SETTLES, SIMULATE, SPRING, START, TOP, VALVE,
  VALVE_OPERATIONS, VALVE_RATINGS, VISCOSITY, WALL_LAWS,
  type Bounds, type KindTable, type ParamSpec,
} from './kinds.js';

type Schema = Record<string, unknown>;

const NUMBER = '[-+]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][-+]?\\d+)?';
const WITH_UNIT = `^\\s*${NUMBER}\\s*\\S.*$`;
const NUMBER_TEXT = `^\\s*${NUMBER}(?:\\s*\\S.*)?$`;
const QUALIFIER = '(?:\\s(?:gauge|abs|absolute|GAUGE|ABS)|\\((?:g|a)\\)|(?:psi|bar)(?:g|a))\\s*$';
const QUALIFIED_PRESSURE = `^\\s*${NUMBER}\\s*(?:\\S.*)?${QUALIFIER}`;
const PERCENT = `^\\s*${NUMBER}\\s*%\\s*$`;
const IDENTIFIER = '^[A-Za-z][A-Za-z0-9_]*$';
/** A node: an identifier, or a cylinder's side (`clamp.cap`, `clamp.rod`). */
const NODE_NAME = '^[A-Za-z][A-Za-z0-9_]*(?:\\.(?:cap|rod))?$';

function numberBounds(b: Bounds | undefined): Schema {
  const s: Schema = {};
  if (b?.gt !== undefined) s.exclusiveMinimum = b.gt;
  if (b?.ge !== undefined) s.minimum = b.ge;
  if (b?.lt !== undefined) s.exclusiveMaximum = b.lt;
  if (b?.le !== undefined) s.maximum = b.le;
  return s;
}

function quantity(dimension: Dimension, doc: string, bounds?: Bounds): Schema {
  const d = DIMENSIONS[dimension];
  if (dimension === 'dimensionless') {
    return { description: `${doc}. A plain number.`, anyOf: [{ type: 'number', ...numberBounds(bounds) }, { type: 'string', pattern: `^\\s*${NUMBER}\\s*$` }] };
  }
  return {
    description: `${doc}. ${d.noun[0].toUpperCase()}${d.noun.slice(1)} with a unit, e.g. \`${d.example}\`; a bare number is in ${d.label}.`,
    anyOf: [{ type: 'number', ...numberBounds(bounds) }, { type: 'string', pattern: NUMBER_TEXT }],
  };
}

function qualifiedPressure(doc: string): Schema {
  return {
    description: `${doc}. A pressure that says gauge or absolute: \`200 kPa gauge\`, \`301.3 kPa abs\`, \`30 psig\`, \`6 bara\`.`,
    type: 'string',
    pattern: QUALIFIED_PRESSURE,
  };
}

const opening: Schema = {
  description: 'An opening: `open`, `closed`, a percentage (`40%`) or a number 0..1.',
  anyOf: [{ enum: ['open', 'closed'] }, { type: 'number', minimum: 0, maximum: 1 }, { type: 'string', pattern: PERCENT }],
};

function pair(first: Schema, second: Schema, description: string): Schema {
  return { type: 'array', description, items: [first, second], minItems: 2, maxItems: 2 };
}

const timeValue = quantity('time', 'A time');

/** Schemas of the structures named by `shape` in the tables (built on demand: they nest). */
function shapes(): Record<string, () => Schema> {
  const points: Schema = {
    type: 'array',
    description: 'At least 3 [volume, gauge pressure] pairs, volume strictly increasing, e.g. `[[0.1 L, 0 kPa], [0.5 L, 2 kPa], [1 L, 3 kPa]]`.',
    minItems: 3,
    items: pair(quantity('volume', 'Volume'), { description: 'Gauge pressure (plain, `gauge` or `abs`)', anyOf: [{ type: 'number' }, { type: 'string', pattern: WITH_UNIT }] }, '[volume, gauge pressure]'),
  };
  const probeValue: Schema = {
    description: 'A value in the probe’s dimension; pressures say gauge or abs (`30 kPa gauge`).',
    anyOf: [{ type: 'number' }, { type: 'string', pattern: NUMBER_TEXT }],
  };
  return {
    start: () => objectOf(START),
    limits: () => objectOf(LIMITS),
    'pressure-series': () => ({
      description: 'Pressure: a constant (`300 kPa gauge`), a time table [[t, p], ...] (linear, held outside), or an expression in t ending in gauge/abs (`300 kPa + 50 kPa * sin(2*pi*t/(1 s)) gauge`) or written `{ expr, reference }`.',
      anyOf: [
        { type: 'string', pattern: `${QUALIFIER}` },
        { type: 'array', minItems: 1, items: pair(timeValue, qualifiedPressure('Pressure'), '[time, pressure]') },
        {
          type: 'object',
          properties: {
            expr: { type: 'string', description: 'Expression in t (s): numbers, units, t, pi, e, + - * / ^, sin cos tan exp log sqrt abs min max floor ceil.' },
            reference: { enum: ['gauge', 'abs', 'absolute'], description: 'What the expression is measured from.' },
          },
          required: ['expr', 'reference'],
          additionalProperties: false,
        },
      ],
    }),
    points: () => points,
    opening: () => opening,
    schedule: () => ({ type: 'array', description: 'Steps in time order: from `at`, ramp to `open` over `over`.', items: objectOf(SCHEDULE_STEP) }),
    check: () => objectOf(CHECK),
    relief: () => objectOf(RELIEF),
    regulates: () => objectOf(REGULATES),
    boolean: () => ({ type: 'boolean' }),
    'feed-curve': () => ({
      type: 'array',
      description: 'Rows [pressure (gauge or abs), flow (mass flow or `L/min ANR`)], pressures increasing.',
      minItems: 1,
      items: pair(qualifiedPressure('Pressure of the fed chamber'), { anyOf: [{ type: 'number', minimum: 0 }, { type: 'string', pattern: WITH_UNIT }] }, '[pressure, flow]'),
    }),
    target: () => ({
      description: 'Set point in the measured quantity: a constant (pressures say gauge or abs), a time table [[t, value], ...], or an expression in t.',
      anyOf: [{ type: 'number' }, { type: 'string' }, { type: 'array', items: pair(timeValue, { anyOf: [{ type: 'number' }, { type: 'string' }] }, '[time, value]') }, { type: 'object' }],
    }),
    gain: () => ({ description: 'A gain with units, e.g. `2 %/kPa`, `5 %/(kPa*s)`; a bare number is SI.', anyOf: [{ type: 'number' }, { type: 'string', pattern: NUMBER_TEXT }] }),
    'output-limits': () => objectOf(OUTPUT_LIMITS),
    controllers: () => namedMap(objectOf(CONTROLLER), 'Controllers by name.'),
    rate: () => ({
      description: 'A mass flow (`0.5 g/s`; bare number kg/s) or a standard volume flow at ISO 8778 (`10 L/min ANR`).',
      anyOf: [{ type: 'number', exclusiveMinimum: 0 }, { type: 'string', pattern: WITH_UNIT }],
    }),
    gas: () => ({ description: 'A named gas or a custom gas.', anyOf: [{ enum: [...GAS_NAMES] }, objectOf(CUSTOM_GAS)] }),
    viscosity: () => objectOf(VISCOSITY),
    ambient: () => objectOf(AMBIENT),
    chambers: () => namedMap({ oneOf: WALL_LAWS.map(chamberSchema) }, 'Chambers by name.'),
    reservoirs: () => namedMap(objectOf(RESERVOIR), 'Reservoirs by name (`ambient` is always available).'),
    lines: () => namedMap(objectOf(LINE), 'Lines by name.'),
    valves: () => namedMap(valveSchema(), 'Valves by name.'),
    feeds: () => namedMap(objectOf(FEED), 'Feeds by name.'),
    cylinders: () => namedMap(objectOf(CYLINDER), 'Cylinders by name; their sides are the nodes `<name>.cap` and `<name>.rod`.'),
    'dead-volume': () => ({ description: 'One volume for both sides, or { cap, rod }.', anyOf: [quantity('volume', 'Dead volume of each side', { gt: 0 }), objectOf(DEAD_VOLUME)] }),
    spring: () => objectOf(SPRING),
    friction: () => objectOf(FRICTION),
    mounting: () => objectOf(MOUNTING),
    'cylinder-start': () => objectOf(CYLINDER_START),
    'port-start': () => objectOf(PORT_START),
    'force-series': () => ({
      description: 'Force: a constant (`40 N`), a time table [[t, F], ...] (linear, held outside), or an expression in t (`40 N + 10 N * sin(2*pi*t/(1 s))`).',
      anyOf: [
        { type: 'number' },
        { type: 'string', pattern: NUMBER_TEXT },
        { type: 'array', minItems: 1, items: pair(timeValue, quantity('force', 'Force'), '[time, force]') },
      ],
    }),
    ...Object.fromEntries(ELEMENT_TABLES.map((k) => [k.key, () => namedMap(objectOf(k), `${k.doc[0].toUpperCase()}${k.doc.slice(1)}, by name.`)])),
    simulate: () => objectOf(SIMULATE),
    expect: () => ({ type: 'array', description: 'Checks for CI.', items: objectOf(EXPECT) }),
    at: () => ({ description: 'A time or `end`.', anyOf: [{ const: 'end' }, timeValue] }),
    over: () => pair(timeValue, timeValue, '[t0, t1]'),
    'probe-value': () => probeValue,
    near: () => objectOf(NEAR),
    within: () => ({ description: 'Absolute (in the probe’s dimension) or relative (`5%`).', anyOf: [{ type: 'number', exclusiveMinimum: 0 }, { type: 'string', pattern: NUMBER_TEXT }] }),
    settles: () => objectOf(SETTLES),
  };
}

const SHAPES = shapes();

function shape(name: string): Schema {
  return SHAPES[name]?.() ?? {};
}

function paramSchema(p: ParamSpec): Schema {
  const base = ((): Schema => {
    switch (p.dimension) {
      case 'structure':
        return { ...shape(p.shape ?? '') };
      case 'absolute-pressure':
      case 'gauge-pressure':
        return qualifiedPressure(p.doc);
      case 'ambient-pressure':
        return { description: `${p.doc}. E.g. \`101.325 kPa\`.`, anyOf: [{ type: 'number', exclusiveMinimum: 0 }, { type: 'string', pattern: WITH_UNIT }] };
      case 'pressure-difference':
        return { description: `${p.doc}. A pressure difference, e.g. \`5 kPa\`.`, anyOf: [{ type: 'number', ...numberBounds(p.bounds) }, { type: 'string', pattern: NUMBER_TEXT }] };
      case 'fraction':
        return { description: `${p.doc}. A percentage (\`40%\`) or a number 0..1.`, anyOf: [{ type: 'number', minimum: 0, maximum: 1 }, { type: 'string', pattern: PERCENT }] };
      case 'integer':
        return { type: 'integer', ...numberBounds(p.bounds) };
      case 'name':
        return { type: 'string', pattern: NODE_NAME };
      case 'enum':
        return { enum: [...(p.values ?? [])] };
      case 'text':
        return { type: 'string' };
      default:
        return quantity(p.dimension, p.doc, p.bounds);
    }
  })();
  if (!base.description) base.description = p.doc;
  if (p.default !== undefined) base.default = p.default;
  return base;
}

function properties(params: readonly ParamSpec[]): Schema {
  return Object.fromEntries(params.map((p) => [p.name, paramSchema(p)]));
}

function objectOf(table: KindTable): Schema {
  const required = table.params.filter((p) => p.required).map((p) => p.name);
  const s: Schema = { type: 'object', description: table.doc, properties: properties(table.params), additionalProperties: false };
  if (required.length) s.required = required;
  return s;
}

function namedMap(item: Schema, description: string): Schema {
  return { type: 'object', description, propertyNames: { pattern: IDENTIFIER, not: { const: 'ambient' } }, additionalProperties: item };
}

function chamberSchema(law: KindTable): Schema {
  const common = CHAMBER.params.filter((p) => p.name !== 'wall');
  return {
    type: 'object',
    title: `${law.kind} chamber`,
    description: law.doc,
    properties: { wall: { const: law.kind, description: law.doc }, ...properties(common), ...properties(law.params) },
    required: ['wall', 'start', ...law.params.filter((p) => p.required).map((p) => p.name)],
    additionalProperties: false,
  };
}

function valveSchema(): Schema {
  const tables = [VALVE, ...VALVE_RATINGS, ...VALVE_OPERATIONS];
  const required = (t: KindTable): string[] => t.params.filter((p) => p.required).map((p) => p.name);
  return {
    type: 'object',
    description: VALVE.doc,
    properties: Object.assign({}, ...tables.map((t) => properties(t.params))),
    additionalProperties: false,
    allOf: [
      { anyOf: VALVE_RATINGS.map((t) => ({ required: required(t) })) },
      { anyOf: [{ required: ['in-line'] }, { required: ['from', 'to'] }] },
    ],
  };
}

/** The JSON Schema (draft-07) of netlist format 1. */
export function netlistJsonSchema(): object {
  const top = objectOf(TOP);
  (top.properties as Record<string, Schema>).format = { const: 1, description: 'Netlist format version: 1.' };
  return {
    $schema: 'http://json-schema.org/draft-07/schema#',
    title: 'plenum netlist, format 1',
    ...top,
  };
}
