import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { netlistJsonSchema } from '../../src/netlist/schema.js';

type Schema = Record<string, unknown>;

/**
 * A small validator for the draft-07 keywords the netlist schema uses (JSON Schema
 * draft-07, "Validation", sections 6.1–6.7): enough to check that the schema accepts a real
 * netlist and refuses broken ones without adding a dependency.
 */
function validate(schema: Schema, data: unknown, path = '$'): string[] {
  const errors: string[] = [];
  const fail = (why: string): void => void errors.push(`${path}: ${why}`);
  const type = schema.type as string | undefined;
  if (type) {
    const ok =
      type === 'object' ? typeof data === 'object' && data !== null && !Array.isArray(data)
      : type === 'array' ? Array.isArray(data)
      : type === 'integer' ? Number.isInteger(data)
      : typeof data === type;
    if (!ok) return [`${path}: expected ${type}`];
  }
  if ('const' in schema && data !== schema.const) fail(`expected ${JSON.stringify(schema.const)}`);
  if (schema.enum && !(schema.enum as unknown[]).includes(data)) fail(`not in enum ${JSON.stringify(schema.enum)}`);
  if (typeof data === 'string' && schema.pattern && !new RegExp(schema.pattern as string).test(data)) fail(`"${data}" does not match ${schema.pattern}`);
  if (typeof data === 'number') {
    if (schema.minimum !== undefined && data < (schema.minimum as number)) fail('below minimum');
    if (schema.maximum !== undefined && data > (schema.maximum as number)) fail('above maximum');
    if (schema.exclusiveMinimum !== undefined && data <= (schema.exclusiveMinimum as number)) fail('not above exclusiveMinimum');
    if (schema.exclusiveMaximum !== undefined && data >= (schema.exclusiveMaximum as number)) fail('not below exclusiveMaximum');
  }
  if (Array.isArray(data)) {
    if (schema.minItems !== undefined && data.length < (schema.minItems as number)) fail('too few items');
    if (schema.maxItems !== undefined && data.length > (schema.maxItems as number)) fail('too many items');
    const items = schema.items;
    if (Array.isArray(items)) items.forEach((s, i) => i < data.length && errors.push(...validate(s as Schema, data[i], `${path}[${i}]`)));
    else if (items) data.forEach((x, i) => errors.push(...validate(items as Schema, x, `${path}[${i}]`)));
  }
  if (typeof data === 'object' && data !== null && !Array.isArray(data)) {
    const obj = data as Record<string, unknown>;
    const props = (schema.properties ?? {}) as Record<string, Schema>;
    for (const key of (schema.required ?? []) as string[]) if (!(key in obj)) fail(`missing ${key}`);
    for (const [key, value] of Object.entries(obj)) {
      if (schema.propertyNames) errors.push(...validate(schema.propertyNames as Schema, key, `${path}.${key}(name)`));
      if (key in props) errors.push(...validate(props[key], value, `${path}.${key}`));
      else if (schema.additionalProperties === false) fail(`unknown key ${key}`);
      else if (typeof schema.additionalProperties === 'object') errors.push(...validate(schema.additionalProperties as Schema, value, `${path}.${key}`));
    }
  }
  if (schema.not && validate(schema.not as Schema, data, path).length === 0) fail('matches a forbidden schema');
  for (const s of (schema.allOf ?? []) as Schema[]) errors.push(...validate(s, data, path));
  if (schema.anyOf) {
    const results = (schema.anyOf as Schema[]).map((s) => validate(s, data, path));
    if (!results.some((r) => r.length === 0)) fail(`no alternative of anyOf matches (${results.map((r) => r[0]).join(' | ')})`);
  }
  if (schema.oneOf) {
    const results = (schema.oneOf as Schema[]).map((s) => validate(s, data, path));
    const matching = results.filter((r) => r.length === 0).length;
    if (matching !== 1) fail(`${matching} alternatives of oneOf match`);
    // The closest alternative's complaints say why (e.g. the right wall law, a bad value).
    if (matching === 0) errors.push(...results.reduce((a, b) => (b.length < a.length ? b : a)));
  }
  return errors;
}

const FULL = parse(readFileSync(fileURLToPath(new URL('./full-netlist.yaml', import.meta.url)), 'utf8')) as Record<string, unknown>;
const clone = (): Record<string, any> => structuredClone(FULL) as Record<string, any>;

describe('netlistJsonSchema (draft-07)', () => {
  const schema = netlistJsonSchema() as Schema;

  it('is a draft-07 schema of an object with no extra keys', () => {
    expect(schema.$schema).toBe('http://json-schema.org/draft-07/schema#');
    expect(schema.type).toBe('object');
    expect(schema.additionalProperties).toBe(false);
    expect(schema.required).toEqual(['format', 'simulate']);
    expect(JSON.parse(JSON.stringify(schema))).toEqual(schema);
  });

  it('accepts the netlist that uses every key', () => {
    expect(validate(schema, FULL)).toEqual([]);
  });

  it('accepts every example network', () => {
    const dir = fileURLToPath(new URL('../../networks/', import.meta.url));
    const files = readdirSync(dir).filter((f) => f.endsWith('.yaml'));
    for (const f of files) {
      const doc = parse(readFileSync(dir + f, 'utf8'));
      expect(validate(schema, doc), f).toEqual([]);
    }
  });

  it('refuses an unknown key', () => {
    const bad = clone();
    bad.lines.crossover.diamter = '4 mm';
    expect(validate(schema, bad).join('\n')).toContain('unknown key diamter');
  });

  it('refuses an unknown wall law and a parameter of another law', () => {
    const bad = clone();
    bad.chambers.tank.wall = 'rigd';
    expect(validate(schema, bad).join('\n')).toContain('$.chambers.tank: 0 alternatives of oneOf match');
    const other = clone();
    other.chambers.tank.radius = '2 cm';
    expect(validate(schema, other)).not.toEqual([]);
  });

  it('refuses a pressure that does not say gauge or abs', () => {
    const bad = clone();
    bad.chambers.cell_b.start.pressure = '0.35 MPa';
    expect(validate(schema, bad).join('\n')).toContain('does not match');
  });

  it('refuses the reserved name and bad identifiers', () => {
    const bad = clone();
    bad.reservoirs.ambient = { pressure: '1 bar abs' };
    bad.reservoirs['bad-name'] = { pressure: '1 bar abs' };
    const errors = validate(schema, bad).join('\n');
    expect(errors).toContain('reservoirs.ambient(name)');
    expect(errors).toContain('reservoirs.bad-name(name)');
  });

  it('refuses a valve without a rating and an out-of-range enum', () => {
    const bad = clone();
    delete bad.valves.v_check.orifice;
    bad.simulate.method = 'fast';
    const errors = validate(schema, bad).join('\n');
    expect(errors).toContain('$.valves.v_check');
    expect(errors).toContain('$.simulate.method');
  });

  it('describes unit-bearing values with their dimension', () => {
    const line = ((schema.properties as Schema).lines as Schema).additionalProperties as Schema;
    const diameter = (line.properties as Record<string, Schema>).diameter;
    expect(diameter.description).toContain('A length with a unit, e.g. `4 mm`');
    expect(JSON.stringify(diameter.anyOf)).toContain('pattern');
    const roughness = (line.properties as Record<string, Schema>).roughness;
    expect(roughness.default).toBe(0);
  });
});
