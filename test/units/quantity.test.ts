import { describe, expect, it } from 'vitest';
import { parseFraction, parseQuantity } from '../../src/units/quantity.js';

function value(text: string | number, dim: Parameters<typeof parseQuantity>[1]): number {
  const r = parseQuantity(text, dim);
  if (!r.ok) throw new Error(`${text}: ${r.message}`);
  return r.value;
}

function failure(text: string | number, dim: Parameters<typeof parseQuantity>[1]) {
  const r = parseQuantity(text, dim);
  if (r.ok) throw new Error(`${text} was accepted as ${r.value}`);
  return r;
}

describe('parseQuantity: conversions to SI (definitions from NIST SP 811, Appendix B)', () => {
  it('reads lengths, volumes and times', () => {
    expect(value('4 mm', 'length')).toBeCloseTo(0.004, 15);
    expect(value('1.5 um', 'length')).toBeCloseTo(1.5e-6, 18);
    expect(value('4 µm', 'length')).toBeCloseTo(4e-6, 18);
    expect(value('0.5 L', 'volume')).toBeCloseTo(5e-4, 15);
    expect(value('150 ms', 'time')).toBeCloseTo(0.15, 15);
    expect(value('2 min', 'time')).toBe(120);
  });

  it('reads compound units with unit(), not evaluate (5 L/min would fail in evaluate)', () => {
    expect(value('5 L/min', 'volume-flow')).toBeCloseTo(5e-3 / 60, 15);
    // 1 dm³/(s·bar) = 1e-3 m³ / (1 s · 1e5 Pa) = 1e-8 m³/(s·Pa)
    expect(value('1 dm^3/(s*bar)', 'conductance') / 1e-8).toBeCloseTo(1, 12);
    expect(value('0.9 L/(s*bar)', 'conductance') / 9e-9).toBeCloseTo(1, 12);
    expect(value('0.1 L/bar', 'compliance') / 1e-9).toBeCloseTo(1, 12);
    expect(value('2 W/K', 'heat-conductance')).toBe(2);
    expect(value('1.8e-5 Pa*s', 'viscosity')).toBeCloseTo(1.8e-5, 18);
    expect(value('28.9647 g/mol', 'molar-mass')).toBeCloseTo(0.0289647, 15);
    expect(value('0.5 g/s', 'mass-flow')).toBeCloseTo(5e-4, 15);
    expect(value('3.6 kg/h', 'mass-flow')).toBeCloseTo(1e-3, 15);
  });

  it('takes a bare number, or a string holding only a number, as SI', () => {
    expect(value(0.004, 'length')).toBe(0.004);
    expect(value('0.004', 'length')).toBe(0.004);
    expect(value(0.5, 'dimensionless')).toBe(0.5);
  });

  it('converts temperatures with their offset: 20 degC = 293.15 K (SI Brochure, 9th ed., 2.3.1)', () => {
    expect(value('20 degC', 'temperature')).toBeCloseTo(293.15, 12);
    expect(value('20 °C', 'temperature')).toBeCloseTo(293.15, 12);
    expect(value('68 degF', 'temperature')).toBeCloseTo(293.15, 12);
    expect(value('300 K', 'temperature')).toBe(300);
  });

  it('reads a temperature difference without the offset', () => {
    expect(value('2 degC', 'temperature-difference')).toBeCloseTo(2, 12);
    expect(value('9 degF', 'temperature-difference')).toBeCloseTo(5, 12);
  });

  it('rejects temperatures at or below absolute zero', () => {
    expect(failure('-300 degC', 'temperature').code).toBe('out-of-range');
    expect(failure(0, 'temperature').code).toBe('out-of-range');
  });

  it('checks the dimension', () => {
    const r = failure('1 kPa', 'volume');
    expect(r.code).toBe('unit-dimension');
    expect(r.message).toContain('expected a volume, got a pressure');
    expect(failure('5 m', 'dimensionless').code).toBe('unit-dimension');
  });

  it('explains that C is the coulomb where a temperature belongs', () => {
    const r = failure('20 C', 'temperature');
    expect(r.code).toBe('unit-dimension');
    expect(r.hint).toContain('degC');
  });

  it('suggests the right case for unit names', () => {
    expect(failure('4 kpa', 'pressure').hint).toContain('did you mean `kPa`?');
    expect(failure('4 PSI', 'pressure').hint).toContain('`psi`');
    expect(failure('4 MPA', 'pressure').hint).toContain('`MPa`');
    expect(failure('1 lpm', 'volume-flow').hint).toContain('L/min');
  });

  it('knows inH2O and inHg (added: missing in mathjs 15; values from memory)', () => {
    expect(value('1 inH2O', 'pressure')).toBeCloseTo(249.08891, 9);
    expect(value('1 inHg', 'pressure')).toBeCloseTo(3386.389, 9);
  });

  it('rejects non-finite numbers', () => {
    expect(failure(Number.NaN, 'length').code).toBe('not-finite');
    expect(failure(Number.POSITIVE_INFINITY, 'length').code).toBe('not-finite');
    expect(failure('1e400 m', 'length').code).toBe('not-finite');
  });

  it('rejects empty and malformed text', () => {
    expect(failure('', 'length').code).toBe('unit-syntax');
    expect(failure('mm', 'length').code).toBe('unit-syntax');
    expect(failure('1 2 m', 'length').code).toBe('unit-syntax');
  });
});

describe('parseFraction', () => {
  it('reads percentages and numbers 0..1', () => {
    expect(parseFraction('40%')).toEqual({ ok: true, value: 0.4 });
    expect(parseFraction('40 %')).toEqual({ ok: true, value: 0.4 });
    expect(parseFraction(0.25)).toEqual({ ok: true, value: 0.25 });
    expect(parseFraction('0.25')).toEqual({ ok: true, value: 0.25 });
  });

  it('rejects values outside 0..100 %', () => {
    const r = parseFraction('120%');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('out-of-range');
    const n = parseFraction(40);
    expect(n.ok).toBe(false);
    if (!n.ok) expect(n.hint).toContain('`40%`');
  });
});
