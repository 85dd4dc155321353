/**
 * The unit class in src/units/math.ts is mathjs's own, built with plain number arithmetic
 * instead of mathjs's typed functions (for start-up time). Here it is compared with a full
 * mathjs instance (the reference: mathjs 15, `create(all)`) on every unit mathjs defines.
 */
import { all, create } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { isUnitName, mathUnit, unitDefinitions } from '../../src/units/math.js';

const full = create(all);

function si(u: { toSI(): { value: number; dimensions: number[] } }): { value: number; dimensions: number[] } {
  const s = u.toSI();
  return { value: s.value, dimensions: s.dimensions };
}

describe('the light unit class against a full mathjs instance', () => {
  const names = Object.keys(unitDefinitions()).filter((n) => full.Unit.isValuelessUnit(n));

  it('knows the same unit names, plus inH2O and inHg', () => {
    expect(names.length).toBeGreaterThan(150);
    for (const n of Object.keys(full.Unit.UNITS)) expect(isUnitName(n), n).toBe(true);
    expect(isUnitName('inH2O') && isUnitName('inHg')).toBe(true);
    expect(full.Unit.isValuelessUnit('inH2O')).toBe(false);
  });

  it('gives the same SI value and dimensions for every unit (offsets included)', () => {
    // VAR (reactive power) is complex-valued in mathjs: no quantity plenum reads
    for (const n of names.filter((x) => typeof full.unit(`1 ${x}`).value === 'number')) {
      for (const x of ['1', '-2.5', '68', '3e-4']) {
        const text = `${x} ${n}`;
        const mine = si(mathUnit(text));
        const ref = si(full.unit(text));
        expect(mine.dimensions, text).toEqual(ref.dimensions);
        const rel = ref.value === 0 ? Math.abs(mine.value) : Math.abs(mine.value / ref.value - 1);
        expect(rel, text).toBeLessThan(1e-14);
      }
    }
  });

  it('reads prefixes, compound units and conversions as mathjs does', () => {
    const cases: [string, string][] = [
      ['0.9 L/(s*bar)', 'm^4 s / kg'], ['20 degC', 'K'], ['68 degF', 'K'], ['2.5 psi', 'Pa'],
      ['40 L/min', 'm^3/s'], ['0.2 mL/kPa', 'm^3/Pa'], ['15 mm', 'm'], ['1.2 kg/m^3', 'kg/m^3'],
      ['300 mbar', 'Pa'], ['3 cm^2/s', 'm^2/s'], ['1 atm', 'Pa'], ['0.5 ms', 's'],
    ];
    for (const [text, to] of cases) {
      const a = mathUnit(text).toNumber(to);
      const b = full.unit(text).toNumber(to);
      expect(Math.abs(a / b - 1), text).toBeLessThan(1e-14);
    }
  });

  it('refuses what mathjs refuses', () => {
    for (const bad of ['4 furlongz', '3 mm mm mm(', 'kPa kPa 3', '1 2 3']) {
      let refMessage = '';
      try { full.unit(bad); } catch (e) { refMessage = (e as Error).message; }
      let message = '';
      try { mathUnit(bad); } catch (e) { message = (e as Error).message; }
      expect(message, bad).toBe(refMessage);
    }
  });
});
