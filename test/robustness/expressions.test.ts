/**
 * Hostile expressions: a netlist's pressure expressions are parsed by mathjs into a syntax tree
 * and compiled from a whitelist (src/units/expression.ts); nothing is ever evaluated by mathjs.
 * Each attempt below to reach the host, define things, or make the parser work hard must be
 * refused with a diagnostic, never run and never throw.
 */
import { describe, expect, it } from 'vitest';
import { readNetlist } from '../../src/netlist/read.js';
import { compileExpression } from '../../src/units/expression.js';

/** The refusal of `text` (a throw or an acceptance fails the test). */
function refused(text: string): { code: string; message: string } {
  const r = compileExpression(text, 'pressure');
  if (r.ok) throw new Error(`accepted: ${text}`);
  return r;
}

const HOSTILE: [string, string, RegExp][] = [
  // the mathjs functions that create, evaluate or change things
  ['import', 'import({ x: 1 }) * 1 kPa', /function `import`/],
  ['createUnit', "createUnit('foo', '1 kPa') * 1 kPa", /function `createUnit`/],
  ['evaluate', "evaluate('1 kPa')", /function `evaluate`/],
  ['parse', "parse('1 kPa') * 1 kPa", /function `parse`/],
  ['compile', "compile('1')", /function `compile`/],
  ['simplify', "simplify('t') * 1 kPa", /function `simplify`/],
  ['derivative', "derivative('t^2', 't') * 1 kPa", /function `derivative`/],
  ['config', 'config({ number: "BigNumber" })', /function `config`/],
  ['chain', 'chain(1 kPa)', /function `chain`/],
  ['typed', 'typed("x", {})', /function `typed`/],
  // the host
  ['require', "require('fs')", /function `require`/],
  ['process', 'process * 1 kPa', /unknown name `process`/],
  ['globalThis', 'globalThis * 1 kPa', /unknown name `globalThis`/],
  ['this', 'this * 1 kPa', /unknown name `this`/],
  // definitions and assignments
  ['function definition', 'f(x) = x * 1 kPa', /function definitions/],
  ['assignment', 'p = 1 kPa', /assignments/],
  ['block', '1 kPa; 2 kPa', /single formula/],
  // member and property access
  ['member access', '1 kPa * t.constructor', /member access/],
  ['bracket property', "1 kPa * t['constructor']", /member access/],
  ['__proto__', "1 kPa * t['__proto__']", /member access/],
  ['constructor name', 'constructor * 1 kPa', /unknown name `constructor`/],
  ['prototype name', 'prototype * 1 kPa', /unknown name `prototype`/],
  ['function property', 'sin.name * 1 kPa', /member access/],
  ['constant property', 'pi.constructor', /member access/],
  // other syntax
  ['string', "1 kPa + 'abc'", /only numbers/],
  ['boolean', 'true', /only numbers/],
  ['null', 'null', /only numbers/],
  ['matrix', '[1 kPa, 2 kPa]', /matrices/],
  ['object', '{ a: 1 kPa }', /objects/],
  ['conditional', 't > 1 s ? 1 kPa : 2 kPa', /conditionals|comparisons/],
  ['range', '1:3', /ranges/],
  ['unit conversion', '1 kPa to psi', /operator `to`/],
  ['factorial', '5! * 1 kPa', /operator `!`/],
  ['bitwise', '1 kPa & 2 kPa', /operator `&`/],
  ['logical', '1 kPa and 2 kPa', /operator `and`/],
  ['unknown function', 'ones(100000000) * 1 kPa', /function `ones`/],
  ['calling t', 't(1) * 1 kPa', /./],
];

describe('hostile expressions are refused', () => {
  it.each(HOSTILE)('%s', (_name, text, why) => {
    const r = refused(text);
    expect(['expression-forbidden', 'expression-syntax', 'expression-dimension']).toContain(r.code);
    expect(r.message).toMatch(why);
  });

  it('nothing is evaluated: a refused `import` leaves mathjs unchanged', () => {
    refused("import({ sin: 'x' }, { override: true }) * 1 kPa");
    const sine = compileExpression('1 kPa * sin(pi/2)', 'pressure');
    expect(sine.ok && sine.f(0)).toBe(1000);
  });
});

describe('expressions that would make the parser work hard are refused by size', () => {
  it('longer than 1000 characters', () => {
    const r = refused('1 kPa' + ' + 1 kPa'.repeat(200));
    expect(r).toMatchObject({ code: 'expression-syntax' });
    expect(r.message).toContain('at most 1000');
  });

  it('nested deeper than 32 brackets, counted before mathjs parses anything', () => {
    const r = refused('('.repeat(400) + '1 kPa' + ')'.repeat(400));
    expect(r).toMatchObject({ code: 'too-deep' });
    expect(r.message).toContain('400 levels');
    expect(compileExpression('('.repeat(30) + '1 kPa' + ')'.repeat(30), 'pressure').ok).toBe(true);
  });

  it('unbalanced brackets are a syntax error, not a crash', () => {
    expect(refused('((1 kPa').code).toBe('expression-syntax');
    expect(refused('1 kPa))').code).toBe('expression-syntax');
  });
});

describe('in a netlist, a hostile expression is a diagnostic at its position', () => {
  const netlist = (p: string): string => `format: 1
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: ${p} }
lines:
  feed: { from: supply, to: tank, diameter: 2 mm, length: 1 m }
simulate: { duration: 1 s }
`;

  it.each([
    ['"1 kPa * t.constructor gauge"', 'expression-forbidden'],
    ['"p = 100 kPa gauge"', 'expression-forbidden'],
    ['"f(x) = 100 kPa gauge"', 'expression-forbidden'],
    ["\"evaluate('1 bar') gauge\"", 'expression-forbidden'],
    ['{ expr: "import({})", reference: abs }', 'expression-forbidden'],
    ['"1 bar abs + 1e30 Pa * t/(1 s)"', 'pressure-reference'],
    ['"1e10 Pa * t/(1 s) abs"', 'out-of-range'],
  ])('%s → %s', (p, code) => {
    const r = readNetlist(netlist(p), 'x.yaml');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const d = r.diagnostics.find((x) => x.code === code);
    expect(d, JSON.stringify(r.diagnostics)).toBeDefined();
    expect(d!.line).toBe(5);
    expect(d!.hint).toBeTruthy();
  });
});
