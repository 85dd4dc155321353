import { describe, expect, it } from 'vitest';
import { parseAmbientPressure, parsePressure, parsePressureDifference, splitQualifier } from '../../src/units/pressure.js';

const AMBIENT = 101325;
/**
 * 1 psi = 0.45359237 kg × 9.80665 m/s² / (0.0254 m)² (NIST SP 811, Appendix B.8: 6.894757 kPa).
 * mathjs 15 stores psi as 6894.75729276459 Pa, 6e-11 relative below the exact definition,
 * hence comparisons to 1e-9 relative.
 */
const PSI = (0.45359237 * 9.80665) / 0.0254 ** 2;

function abs(text: string | number, ambient = AMBIENT): number {
  const r = parsePressure(text, ambient);
  if (!r.ok) throw new Error(`${text}: ${r.message}`);
  return r.abs;
}

describe('parsePressure: gauge and absolute', () => {
  it('adds the ambient pressure to gauge values: 0.35 MPa gauge → 451325 Pa', () => {
    expect(abs('0.35 MPa gauge')).toBeCloseTo(451325, 9);
  });

  it('reads the trade shorthands psig, psia, barg, bara', () => {
    expect(PSI).toBeCloseTo(6894.757, 3);
    expect(abs('30 psig') / (AMBIENT + 30 * PSI)).toBeCloseTo(1, 9);
    expect(abs('30 psia') / (30 * PSI)).toBeCloseTo(1, 9);
    expect(abs('6 bara')).toBeCloseTo(600000, 9);
    expect(abs('5 barg')).toBeCloseTo(600000 + 1325, 9);
    expect(abs('20 mbarg')).toBeCloseTo(AMBIENT + 2000, 9);
  });

  it('reads the word qualifiers and (g)/(a)', () => {
    expect(abs('101.3 kPa abs')).toBeCloseTo(101300, 9);
    expect(abs('101.3 kPa absolute')).toBeCloseTo(101300, 9);
    expect(abs('200 kPa(g)')).toBeCloseTo(301325, 9);
    expect(abs('200 kPa (a)')).toBeCloseTo(200000, 9);
    expect(abs('200 kPa GAUGE')).toBeCloseTo(301325, 9);
  });

  it('uses the netlist ambient, not a fixed one', () => {
    expect(abs('0 kPa gauge', 95000)).toBe(95000);
  });

  it('refuses a pressure without gauge or abs, showing both readings', () => {
    const r = parsePressure('200 kPa', AMBIENT);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.code).toBe('pressure-reference');
    expect(r.hint).toBe('write `200 kPa gauge` (= 301.325 kPa abs) or `200 kPa abs`');
  });

  it('refuses bare numbers (no unit, no reference)', () => {
    const r = parsePressure(200000, AMBIENT);
    expect(r.ok ? 'accepted' : r.code).toBe('pressure-reference');
  });

  it('refuses negative absolute pressure', () => {
    const r = parsePressure('-200 kPa gauge', AMBIENT);
    expect(r.ok ? 'accepted' : r.code).toBe('out-of-range');
    expect(abs('-101.325 kPa gauge')).toBeCloseTo(0, 9);
  });

  it('refuses other dimensions', () => {
    const r = parsePressure('3 mm gauge', AMBIENT);
    expect(r.ok ? 'accepted' : r.code).toBe('unit-dimension');
  });

  it('splits qualifiers without touching the rest', () => {
    expect(splitQualifier('0.9 L/(s*bar)')).toEqual({ body: '0.9 L/(s*bar)' });
    expect(splitQualifier('30 psig')).toEqual({ body: '30 psi', reference: 'gauge' });
  });
});

describe('parseAmbientPressure', () => {
  it('is absolute by definition: abs optional, gauge refused', () => {
    expect(parseAmbientPressure('101.325 kPa')).toEqual({ ok: true, value: 101325 });
    expect(parseAmbientPressure('101.325 kPa abs')).toEqual({ ok: true, value: 101325 });
    expect(parseAmbientPressure(101325)).toEqual({ ok: true, value: 101325 });
    expect(parseAmbientPressure('0 kPa gauge').ok).toBe(false);
  });
});

describe('parsePressureDifference', () => {
  it('accepts plain pressures, gauge and psid; refuses abs', () => {
    expect(parsePressureDifference('5 kPa')).toEqual({ ok: true, value: 5000 });
    expect(parsePressureDifference('5 kPa gauge')).toEqual({ ok: true, value: 5000 });
    const d = parsePressureDifference('1 psid');
    expect(d.ok && d.value / PSI).toBeCloseTo(1, 9);
    expect(parsePressureDifference('5 kPa abs').ok).toBe(false);
  });
});
