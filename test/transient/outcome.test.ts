/**
 * How a run ends, per group of chambers (settled, moving, diverging, oscillating), and the
 * snap-through and limit events of a transient.
 */
import { describe, expect, it } from 'vitest';
import { at, channel, modelFromFile, modelFromText, runChecked } from '../helpers.js';

const AMBIENT = 'ambient: { pressure: 101.325 kPa abs, temperature: 293.15 K }';
const CELL = 'wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.3 MPa';

describe('outcome of a run per group', () => {
  it('settled: the cushion cells that equalise, with a settling time inside the run and after the valve opens', () => {
    const r = runChecked(modelFromFile('networks/cushion-settle.yaml'));
    expect(r.outcomes).toHaveLength(1);
    const o = r.outcomes![0];
    expect(o.chambers).toEqual(['cell_a', 'cell_b']);
    expect(o.closed).toBe(true);
    expect(o.outcome).toBe('settled');
    expect(o.settling_time!).toBeGreaterThan(0.12);
    expect(o.settling_time!).toBeLessThan(4);
    // after the settling time every chamber stays within 2 % of its excursion
    for (const n of ['cell_a', 'cell_b']) {
      const p = channel(r, `${n}.pressure`);
      const fin = p[p.length - 1];
      const exc = Math.max(...p.map((x) => Math.abs(x - fin)));
      r.trace.times.forEach((t, k) => { if (t >= o.settling_time!) expect(Math.abs(p[k] - fin)).toBeLessThanOrEqual(0.02 * exc + 1e-9); });
    }
  });

  it('moving: the same cells cut short half a second after the valve opens', () => {
    const text = modelFromFile('networks/cushion-settle.yaml').doc.source
      .replace(/simulate: \{[^}]*\}/, 'simulate: { duration: 0.6 s, sample: 1 ms, tolerance: 1e-7 }')
      .replace(/\nexpect:[\s\S]*$/, '\n');
    const r = runChecked(modelFromText(text));
    expect(r.outcomes![0].outcome).toBe('moving');
    expect(r.outcomes![0].settling_time).toBeNull();
    expect(r.outcomes![0].evidence).toMatch(/still changed/);
  });

  it('diverging: two cells next to the unstable symmetric state; the fitted growth rate is the two-chamber rate within 5 %', () => {
    // −G(1/C1 + 1/C2) at stretch 1.6 (Müller & Strehlow 2004, from memory), evaluated here
    const R = 8.314462618 / 0.0289647, T = 293.15, pa = 101325;
    const mu = 1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4) / (T + 110.4);
    const l = 1.6, V0 = (4 / 3) * Math.PI * 0.02 ** 3, D = 1e-3, L = 0.5, Vd = (Math.PI * D * D * L) / 8, c = (2 * 0.3e6 * 0.001) / 0.02;
    const p = pa + c * (1 / l - Math.pow(l, -7));
    const C = (V0 * l ** 3 + Vd + (p * 3 * V0 * l * l) / (c * (-1 / (l * l) + 7 * Math.pow(l, -8)))) / (R * T);
    const sigma = (-2 * Math.PI * D ** 4 * p) / (256 * mu * L * R * T) * (2 / C);
    expect(sigma).toBeGreaterThan(0);
    const duration = 10 / sigma;
    const r = runChecked(modelFromText(`
format: 1
${AMBIENT}
chambers:
  a: { ${CELL}, start: { stretch: ${l - 1e-7} } }
  b: { ${CELL}, start: { stretch: ${l + 1e-7} } }
lines:
  link: { from: a, to: b, diameter: 1 mm, length: 0.5 m }
simulate: { duration: ${duration} s, sample: ${duration / 500} s, tolerance: 1e-11, method: implicit }
`));
    const o = r.outcomes![0];
    expect(o.outcome).toBe('diverging');
    expect(Math.abs(o.growth_rate! / sigma - 1)).toBeLessThan(0.05);
  });

  it('oscillating: a fed tank whose relief valve chatters, with the period of its openings', () => {
    const r = runChecked(modelFromText(`
format: 1
${AMBIENT}
chambers:
  tank: { wall: rigid, volume: 100 mL, start: { pressure: 0 kPa gauge } }
feeds:
  fill: { into: tank, rate: 0.05 g/s }
valves:
  relief: { from: tank, to: ambient, orifice: 2 mm, discharge-coefficient: 0.6, relief: { opens-above: 50 kPa gauge, reseats-below: 40 kPa gauge } }
simulate: { duration: 4 s, sample: 2 ms }
`));
    const o = r.outcomes![0];
    expect(o.closed).toBe(false);
    expect(o.outcome).toBe('oscillating');
    const opens = r.events.filter((e) => /relief valve relief opens/.test(e.what)).map((e) => e.t);
    expect(opens.length).toBeGreaterThanOrEqual(5);
    // between openings the feed refills the 10 kPa band: Δm = ΔpV/(RT) at 0.05 g/s, plus the venting
    const refill = (10e3 * 100e-6) / ((8.314462618 / 0.0289647) * 293.15) / 0.05e-3;
    expect(o.period!).toBeGreaterThan(refill);
    expect(o.period!).toBeLessThan(1.5 * refill);
    expect(o.evidence).toMatch(/valve relief opened \d+ times/);
  });

  it('groups are reported separately, and a group touching a reservoir is not closed', () => {
    const r = runChecked(modelFromText(`
format: 1
${AMBIENT}
reservoirs:
  supply: { pressure: 5 kPa gauge }
chambers:
  a: { ${CELL}, start: { stretch: 1.1 } }
  b: { ${CELL}, start: { stretch: 1.2 } }
  c: { wall: rigid, volume: 50 mL, start: { pressure: 2 kPa gauge } }
lines:
  ab: { from: a, to: b, diameter: 1 mm, length: 0.3 m }
  cs: { from: c, to: supply, diameter: 1 mm, length: 0.3 m }
simulate: { duration: 30 s, sample: 0.05 s }
`));
    expect(r.outcomes!.map((o) => [o.chambers, o.closed, o.outcome])).toEqual([
      [['a', 'b'], true, 'settled'],
      [['c'], false, 'settled'],
    ]);
  });
});

describe('snap-through and limit events', () => {
  it('a cell fed past its pressure maximum logs the crossing at stretch 7^(1/6), then its stretch limit, with a warning', () => {
    const lmax = Math.pow(7, 1 / 6); // neo-Hookean maximum (Treloar 1975; docs/references.md)
    const r = runChecked(modelFromText(`
format: 1
${AMBIENT}
chambers:
  cell: { ${CELL}, start: { stretch: 1.2 }, limits: { stretch: 1.6 } }
feeds:
  fill: { into: cell, rate: 0.1 g/s }
simulate: { duration: 2 s, sample: 1 ms, tolerance: 1e-9 }
`));
    const snap = r.events.filter((e) => /cell passes its pressure maximum/.test(e.what));
    expect(snap).toHaveLength(1);
    expect(Math.abs(at(r, 'cell.stretch', snap[0].t) - lmax)).toBeLessThan(1e-4);
    const limit = r.events.filter((e) => /cell exceeds its stretch limit/.test(e.what));
    expect(limit).toHaveLength(1);
    expect(limit[0].t).toBeGreaterThan(snap[0].t);
    expect(Math.abs(at(r, 'cell.stretch', limit[0].t) - 1.6)).toBeLessThan(1e-4);
    expect(r.warnings.some((w) => /exceeds its stretch limit/.test(w))).toBe(true);
    // the peak gauge pressure is the maximum of the wall law, Δp_max = 1.2394629 μ t0/r0
    expect(Math.abs(r.chambers.cell.peak.gauge / (1.2394629 * 0.3e6 * 0.05) - 1)).toBeLessThan(1e-5);
  });

  it('a cell shrinking back through its maximum logs that too', () => {
    const r = runChecked(modelFromText(`
format: 1
${AMBIENT}
chambers:
  cell: { ${CELL}, start: { stretch: 1.6 } }
lines:
  vent: { from: cell, to: ambient, diameter: 0.5 mm, length: 0.5 m }
simulate: { duration: 60 s, sample: 0.05 s }
`));
    const back = r.events.filter((e) => /cell shrinks back through its pressure maximum/.test(e.what));
    expect(back).toHaveLength(1);
    expect(Math.abs(at(r, 'cell.stretch', back[0].t) - Math.pow(7, 1 / 6))).toBeLessThan(1e-3);
  });
});
