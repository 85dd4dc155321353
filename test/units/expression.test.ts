import { describe, expect, it } from 'vitest';
import { compileExpression } from '../../src/units/expression.js';

function compile(text: string, dim: Parameters<typeof compileExpression>[1] = 'pressure') {
  const r = compileExpression(text, dim);
  if (!r.ok) throw new Error(`${text}: ${r.message}`);
  return r;
}

function refusal(text: string, dim: Parameters<typeof compileExpression>[1] = 'pressure') {
  const r = compileExpression(text, dim);
  if (r.ok) throw new Error(`${text} was accepted`);
  return r;
}

describe('compileExpression: restricted expressions in t', () => {
  it('compiles a sine around a mean into a plain closure over SI numbers', () => {
    const e = compile('300 kPa + 50 kPa * sin(2*pi*t/(1 s))');
    expect(e.constant).toBe(false);
    expect(e.f(0)).toBeCloseTo(300000, 9);
    expect(e.f(0.25)).toBeCloseTo(350000, 9);
    expect(e.f(0.75)).toBeCloseTo(250000, 9);
  });

  it('handles units on t, exp, min/max, powers and constants', () => {
    expect(compile('100 kPa * exp(-t/(2 s))').f(2)).toBeCloseTo(100000 / Math.E, 9);
    expect(compile('min(200 kPa, 100 kPa * t/(1 s))').f(3)).toBe(200000);
    expect(compile('max(1 bar, 2 kPa)').f(0)).toBe(100000);
    expect(compile('1 kPa * (t/(500 ms))^2').f(1)).toBeCloseTo(4000, 9);
    expect(compile('1 kPa * e^(t/(1 s))').f(1)).toBeCloseTo(1000 * Math.E, 9);
    expect(compile('sqrt(4 kPa^2)').f(0)).toBeCloseTo(2000, 9);
    expect(compile('1 kPa * floor(t / (1 s)) + 1 kPa * ceil(0.5) + abs(-1 kPa)').f(2.5)).toBeCloseTo(4000, 9);
    expect(compile('1 kPa * cos(60 deg)').f(0)).toBeCloseTo(500, 9);
    expect(compile('1 kPa * log(e) + 1 kPa * tan(0)').f(0)).toBeCloseTo(1000, 9);
    expect(compile('-(2 kPa) + +3 kPa').f(0)).toBeCloseTo(1000, 9);
  });

  it('folds expressions without t into constants', () => {
    const e = compile('1 bar + 2 kPa');
    expect(e.constant).toBe(true);
    expect(e.f(123)).toBeCloseTo(102000, 9);
  });

  it('compiles other dimensions too', () => {
    expect(compile('2 s + t', 'time').f(1)).toBe(3);
  });

  it.each([
    ['import("fs")', 'import'],
    ['evaluate("1+1")', 'evaluate'],
    ['createUnit("foo")', 'createUnit'],
    ['parse("1")', 'parse'],
    ['pow(2, 3) * 1 kPa', 'pow'],
  ])('refuses the function in %s', (text, fn) => {
    const r = refusal(text);
    expect(r.code).toBe('expression-forbidden');
    expect(r.message).toContain(`\`${fn}\``);
  });

  it.each([
    ['x = 3 kPa', 'assignments'],
    ['f(x) = x', 'function definitions'],
    ['a.b', 'member access'],
    ['"text"', 'numbers'],
    ['[1 kPa, 2 kPa]', 'matrices'],
    ['t > 1 s ? 1 kPa : 2 kPa', 'conditionals'],
    ['1 kPa; 2 kPa', 'single formula'],
    ['foo * 1 kPa', 'unknown name'],
    ['20 degC * 1 kPa / (1 K)', 'offset'],
    ['5 kPa mod 2', 'not allowed'],
  ])('refuses %s', (text, words) => {
    const r = refusal(text);
    expect(r.code).toBe('expression-forbidden');
    expect(r.message).toContain(words);
  });

  it('checks dimensions at compile time', () => {
    expect(refusal('sin(t) * 1 kPa').code).toBe('expression-dimension');
    expect(refusal('1 kPa + 1 s').code).toBe('expression-dimension');
    expect(refusal('100 kPa * t').message).toContain('expected a pressure');
    expect(refusal('exp(1 kPa) * 1 kPa').code).toBe('expression-dimension');
    expect(refusal('1 kPa ^ (t / (1 s))').code).toBe('expression-dimension');
  });

  it('reports syntax errors as values', () => {
    expect(refusal('3 +* 2').code).toBe('expression-syntax');
    expect(refusal('(1 kPa').code).toBe('expression-syntax');
  });

  it('refuses non-finite constants', () => {
    expect(refusal('1 kPa / 0').code).toBe('not-finite');
  });
});
