/**
 * Wave lines against linear acoustics (Kinsler, Frey, Coppens & Sanders, Fundamentals of
 * Acoustics, 4th ed., ch. 5 and 10; docs/references.md, "Acoustic lines"): a small pressure step
 * travels a line in L/c, doubles at a closed end, and a line open to a large volume at one end
 * and closed at the other rings at f = c/(4L). c = √(γ R T) = 343.2 m/s for air at 20 °C.
 * A wide line (25 mm) keeps the waves adiabatic and the friction small, as the idealisation
 * assumes; mass is conserved to round-off in every run (runChecked).
 */
import { describe, expect, it } from 'vitest';
import { channel, modelFromText, runChecked } from '../helpers.js';

const C = Math.sqrt(1.4 * (8.314462618 / 0.0289647) * 293.15);
const STEP = 1000; // Pa

const netlist = (L: number, segments: string, duration = 0.6): string => `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
heat: adiabatic
chambers:
  dead_end: { wall: rigid, volume: 1 mL, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: [[0 s, 101.325 kPa abs], [0.5 ms, 102.325 kPa abs]] }
lines:
  pipe: { from: supply, to: dead_end, diameter: 25 mm, length: ${L} m, model: wave${segments} }
simulate: { duration: ${duration} s, sample: 0.1 ms, tolerance: 1e-8 }
`;

/** Times at which a sampled signal rises through a level. */
function upCrossings(t: number[], v: number[], level: number): number[] {
  const out: number[] = [];
  for (let k = 1; k < v.length; k++) {
    if (v[k - 1] < level && v[k] >= level) out.push(t[k - 1] + ((level - v[k - 1]) / (v[k] - v[k - 1])) * (t[k] - t[k - 1]));
  }
  return out;
}

/** The ringing frequency of the dead end's pressure: mean period between rises through the step level. */
function ringing(L: number, segments: string): { f: number; t: number[]; g: number[] } {
  const r = runChecked(modelFromText(netlist(L, segments)));
  const t = r.trace.times;
  const g = channel(r, 'dead_end.gauge');
  const ups = upCrossings(t, g, STEP);
  const periods = ups.slice(1).map((x, i) => x - ups[i]);
  return { f: 1 / (periods.reduce((a, b) => a + b, 0) / periods.length), t, g };
}

describe('a pressure step in a 10 m wave line (linear acoustics)', () => {
  const L = 10;
  it('arrives at the closed end after L/c (within 10 %) and doubles there (within 5 %)', () => {
    const r = runChecked(modelFromText(netlist(L, '', 0.1)));
    const t = r.trace.times;
    const g = channel(r, 'dead_end.gauge');
    const arrival = upCrossings(t, g, STEP)[0] - 0.25e-3; // the step's mid-time is 0.25 ms
    expect(Math.abs(arrival / (L / C) - 1)).toBeLessThan(0.1);
    // the plateau between the first arrival and the return of the reflection: 2 × the step
    const plateau = g.filter((_, k) => t[k] > (L / C) * 1.3 && t[k] < (L / C) * 2.7);
    const mean = plateau.reduce((a, b) => a + b, 0) / plateau.length;
    expect(Math.abs(mean / (2 * STEP) - 1)).toBeLessThan(0.05);
    expect(r.lines.pipe.segments).toBe(20); // the default with no valve ramps
  });

  it('rings at the quarter-wave frequency c/(4L) = 8.58 Hz within 5 %, decaying by friction', () => {
    const { f, t, g } = ringing(L, '');
    expect(Math.abs(f / (C / (4 * L)) - 1)).toBeLessThan(0.05);
    // the swing about the supply level shrinks from the first period to the last
    const T4 = (4 * L) / C;
    const swing = (a: number, b: number): number => {
      const w = g.filter((_, k) => t[k] > a && t[k] < b);
      return Math.max(...w) - Math.min(...w);
    };
    expect(swing(4 * T4, 5 * T4)).toBeLessThan(swing(0, T4));
  });

  it('converges with segments: the frequency error falls from 10 to 20 to 80 segments', () => {
    const f0 = C / (4 * L);
    const err = [10, 20, 80].map((n) => Math.abs(ringing(L, `, segments: ${n}`).f / f0 - 1));
    // the error at the default (20 segments) is stated in docs/wave-lines.md
    expect(err[1]).toBeLessThan(err[0]);
    expect(err[2]).toBeLessThan(err[1]);
    expect(err[1]).toBeLessThan(0.02);
  });
});
