/**
 * Calibration and sizing against independent results:
 * - a bench recording made by an independent SciPy model (test/reference/blowdown.py: a rigid
 *   receiver blowing down through a sharp orifice, isentropic nozzle flow, Anderson, Modern
 *   Compressible Flow, 3rd ed., ch. 5, from memory) with Cd = 0.72 and 0.3 kPa of noise:
 *   calibration recovers Cd to 1 %;
 * - sizing against the closed form of an isothermal receiver blowing down through a choked
 *   orifice: dp/dt = −(Cd A √(γRT) ψ / V) p, ψ = (2/(γ+1))^((γ+1)/(2(γ−1))), so
 *   p(t) = p0 exp(−t/τ), τ = V/(Cd A √(γRT) ψ), and the area that reaches p1 at t1 is
 *   A = V ln(p0/p1)/(t1 Cd √(γRT) ψ) (choked throughout while p ≥ pa/r*, r* = 0.528).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { calibrate, size } from '../../src/index.js';
import { modelFromText, runChecked } from '../helpers.js';

const R = 8.314462618 / 0.0289647;
const GAMMA = 1.4;
const T = 293.15;
const PSI = Math.pow(2 / (GAMMA + 1), (GAMMA + 1) / (2 * (GAMMA - 1)));

describe('calibration against an independent SciPy recording', () => {
  test('recovers the discharge coefficient of a receiver blow-down to 1 % (SciPy model, Cd = 0.72)', async () => {
    const source = readFileSync('test/reference/blowdown.yaml', 'utf8');
    const text = readFileSync('test/reference/blowdown.csv', 'utf8');
    runChecked(modelFromText(source.replace('discharge-coefficient: 0.6', 'discharge-coefficient: 0.72')));
    const r = await calibrate({ source, file: 'blowdown.yaml', free: ['valves.vent.discharge-coefficient=0.3..1'], data: [{ text, file: 'blowdown.csv' }], jobs: 1 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    const cd = r.value.parameters[0];
    expect(r.value.status).toBe('converged');
    expect(Math.abs(cd.value - 0.72) / 0.72).toBeLessThan(0.01);
    // the residuals are the recording's noise (sd 0.3 kPa): the model reproduces the SciPy trace
    expect(r.value.channels[0].rmse).toBeGreaterThan(0.2e3);
    expect(r.value.channels[0].rmse).toBeLessThan(0.4e3);
    expect(cd.low).toBeLessThan(0.72);
    expect(cd.high).toBeGreaterThan(0.72);
  });
});

const SIZING = `
format: 1
title: Receiver vent sizing
chambers:
  receiver:
    wall: rigid
    volume: 2 L
    start: { pressure: 800 kPa abs }
valves:
  vent:
    from: receiver
    to: ambient
    orifice: 1 mm
    discharge-coefficient: 0.8
    initially: open
simulate: { duration: 0.6 s, sample: 10 ms, tolerance: 1e-10 }
expect:
  - name: vented to 300 kPa abs at 0.5 s
    probe: receiver.pressure
    at: 0.5 s
    below: 300 kPa abs
`;

/** Orifice diameter of the closed form (V, p0, p1, t1 as in SIZING). */
function closedFormDiameter(cd: number): number {
  const A = (0.002 * Math.log(800 / 300)) / (0.5 * cd * Math.sqrt(GAMMA * R * T) * PSI);
  return Math.sqrt((4 * A) / Math.PI);
}

describe('sizing against the closed form of a choked isothermal blow-down', () => {
  test('the smallest orifice that vents to 300 kPa abs in 0.5 s has the closed-form area to 0.5 %', async () => {
    runChecked(modelFromText(SIZING));
    const r = await size({ source: SIZING, file: 'vent.yaml', free: ['valves.vent.orifice=0.5 mm..10 mm'], jobs: 1 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    expect(r.value.status).toBe('found');
    expect(r.value.binding).toBe('vented to 300 kPa abs at 0.5 s');
    const d = r.value.parameters[0].value;
    const area = (Math.PI * d * d) / 4;
    const want = (Math.PI * closedFormDiameter(0.8) ** 2) / 4;
    expect(Math.abs(area - want) / want).toBeLessThan(0.005);
  });

  test('with the discharge coefficient free too, the smallest orifice uses the largest coefficient (closed form at Cd = 0.9)', async () => {
    const r = await size({ source: SIZING, file: 'vent.yaml', free: ['valves.vent.orifice=0.5 mm..10 mm', 'valves.vent.discharge-coefficient=0.5..0.9'], minimise: 'valves.vent.orifice', jobs: 1 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    expect(r.value.status).toBe('found');
    expect(r.value.parameters[1].value).toBeCloseTo(0.9, 6);
    expect(Math.abs(r.value.parameters[0].value - closedFormDiameter(0.9)) / closedFormDiameter(0.9)).toBeLessThan(0.0025);
  });

  test('robust to Cd ± 10 % (corners): the orifice is sized for the worst corner, Cd = 0.72 (closed form)', async () => {
    const r = await size({ source: SIZING, file: 'vent.yaml', free: ['valves.vent.orifice=0.5 mm..10 mm'], robust: ['valves.vent.discharge-coefficient±10%'], jobs: 1 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    expect(r.value.robust).toMatchObject({ mode: 'corners', cases: 2, passed: 2 });
    expect(Math.abs(r.value.parameters[0].value - closedFormDiameter(0.72)) / closedFormDiameter(0.72)).toBeLessThan(0.0025);
  });
});
