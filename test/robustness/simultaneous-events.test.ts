/**
 * Identical valves on a symmetric rig cross their thresholds at the same instant. The driver
 * used to fire only the first event of a step and re-read the others after it, when they had
 * already crossed: on the rig below three of four relief valves never opened and their
 * chambers rose to the full supply pressure. Found while timing a chain with a check valve in
 * every line, where hundreds of crossings a step were also located one by one. Also two
 * schedules whose switching times are a double apart, which stopped a run as "step size below
 * round-off".
 */
import { describe, expect, it } from 'vitest';
import { modelFromText, runChecked } from '../helpers.js';

function reliefRig(n: number): string {
  const lines = ['format: 1', 'reservoirs:', '  supply: { pressure: 300 kPa gauge }', 'chambers:'];
  for (let i = 0; i < n; i++) lines.push(`  c${i}: { wall: rigid, volume: 100 mL, start: { pressure: 0 kPa gauge } }`);
  lines.push('lines:');
  for (let i = 0; i < n; i++) lines.push(`  l${i}: { from: supply, to: c${i}, diameter: 1 mm, length: 500 mm }`);
  lines.push('valves:');
  for (let i = 0; i < n; i++) {
    lines.push(`  r${i}: { from: c${i}, to: ambient, orifice: 2 mm, discharge-coefficient: 0.7, relief: { opens-above: 100 kPa gauge, reseats-below: 80 kPa gauge } }`);
  }
  lines.push('simulate: { duration: 3 s, sample: 10 ms }');
  return lines.join('\n') + '\n';
}

describe('identical relief valves on identical chambers, filled from one supply', () => {
  for (const method of ['explicit', 'implicit']) {
    it(`every valve opens and every chamber stays at its relief setting (${method})`, () => {
      const r = runChecked(modelFromText(reliefRig(4).replace('sample: 10 ms', `sample: 10 ms, method: ${method}`)));
      expect(r.status).toBe('completed');
      for (let i = 0; i < 4; i++) {
        expect(r.events.some((e) => e.what === `relief valve r${i} opens`), `r${i} opens`).toBe(true);
        // the relief valve holds the chamber near 100 kPa gauge against a 300 kPa supply
        expect(r.chambers[`c${i}`].peak.gauge).toBeLessThan(101e3);
        expect(r.chambers[`c${i}`].final.gauge).toBeGreaterThan(75e3);
      }
      // the four identical chambers stay identical
      const finals = [0, 1, 2, 3].map((i) => r.chambers[`c${i}`].final.gauge);
      for (const g of finals) expect(Math.abs(g - finals[0])).toBeLessThan(1e-6 * finals[0]);
    });
  }
});

describe('a chain of tanks and pods with a check valve in every line', () => {
  it('closes every check valve that reaches its cracking difference, all at the same instant', () => {
    const n = 100;
    const lines = ['format: 1', 'chambers:'];
    for (let i = 0; i < n; i++) {
      lines.push(i % 2
        ? `  c${i}: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.05 } }`
        : `  c${i}: { wall: rigid, volume: 20 mL, start: { pressure: 0 kPa gauge } }`);
    }
    lines.push('lines:');
    for (let i = 0; i + 1 < n; i++) lines.push(`  l${i}: { from: c${i}, to: c${i + 1}, diameter: 2 mm, length: 100 mm }`);
    lines.push('valves:');
    for (let i = 0; i + 1 < n; i++) lines.push(`  v${i}: { in-line: l${i}, orifice: 1.5 mm, discharge-coefficient: 0.7, check: { cracking: 2 kPa } }`);
    lines.push('simulate: { duration: 0.5 s, sample: 10 ms }');
    const r = runChecked(modelFromText(lines.join('\n') + '\n'));
    expect(r.status).toBe('completed');
    // valve v_i passes c_i → c_{i+1}. Odd ones start open (a pod above ambient into a tank) and
    // close when the pod is down to the cracking difference above its tank, every pair alike:
    // 49 closings at one instant. Even ones (a tank into a pod above it) never open.
    const closings = r.events.filter((e) => /^check valve v\d+ closes$/.test(e.what));
    expect(closings.map((e) => e.what).sort()).toEqual(
      Array.from({ length: n / 2 - 1 }, (_, k) => `check valve v${2 * k + 1} closes`).sort());
    for (const e of closings) expect(e.t).toBe(closings[0].t);
    expect(r.events.some((e) => /^check valve v\d*[02468] opens$/.test(e.what))).toBe(false);
    // a closed check valve holds the cracking difference
    for (let i = 1; i + 1 < n; i += 2) {
      const dp = r.chambers[`c${i}`].final.gauge - r.chambers[`c${i + 1}`].final.gauge;
      expect(Math.abs(dp - 2e3)).toBeLessThan(1);
    }
  });
});

describe('two valve schedules whose switching times are a double apart', () => {
  it('runs through both (1.144 s + 5 ms is 1.1489999999999998 s, the other switches at 1.149 s)', () => {
    const text = `format: 1
reservoirs:
  supply: { pressure: 200 kPa gauge }
chambers:
  a: { wall: rigid, volume: 50 mL, start: { pressure: 0 kPa gauge } }
  b: { wall: rigid, volume: 50 mL, start: { pressure: 0 kPa gauge } }
lines:
  la: { from: supply, to: a, diameter: 2 mm, length: 200 mm }
  lb: { from: supply, to: b, diameter: 2 mm, length: 200 mm }
valves:
  va: { in-line: la, orifice: 1 mm, discharge-coefficient: 0.7, initially: closed, schedule: [ { at: 1.144 s, open: 100%, over: 5 ms } ] }
  vb: { in-line: lb, orifice: 1 mm, discharge-coefficient: 0.7, initially: closed, schedule: [ { at: 1.149 s, open: 100%, over: 5 ms } ] }
simulate: { duration: 2 s, sample: 10 ms, method: implicit }
`;
    const r = runChecked(modelFromText(text));
    expect(r.status).toBe('completed');
    expect(r.chambers.a.final.gauge).toBeGreaterThan(150e3);
    expect(r.chambers.b.final.gauge).toBeGreaterThan(150e3);
  });
});
