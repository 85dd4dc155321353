/** Equilibria of whole networks: valve states, one-way valves, heat modes, large groups, and the transient. */
import { describe, expect, it } from 'vitest';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { modelFromFile, modelFromText } from '../helpers.js';

const AMBIENT = 'ambient: { pressure: 101.325 kPa abs, temperature: 293.15 K }';
const CELL = 'wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.3 MPa';

function massesClose(a: Record<string, { mass: number }>, b: Record<string, { mass: number }>, rel: number): boolean {
  return Object.keys(a).every((n) => Math.abs(a[n].mass - b[n].mass) <= rel * a[n].mass);
}

describe('findEquilibria on whole networks', () => {
  it('a transient started next to the unstable symmetric state ends at a stable equilibrium that the analysis lists', () => {
    const model = modelFromText(`
format: 1
${AMBIENT}
chambers:
  a: { ${CELL}, start: { stretch: 1.599 } }
  b: { ${CELL}, start: { stretch: 1.601 } }
lines:
  link: { from: a, to: b, diameter: 1 mm, length: 0.5 m }
simulate: { duration: 200 s, sample: 0.25 s, tolerance: 1e-8, method: implicit }
`);
    const r = findEquilibria(model);
    expect(r.count).toBe(3);
    const sym = r.equilibria.find((e) => Math.abs(e.chambers.a.stretch! - e.chambers.b.stretch!) < 1e-9)!;
    expect(sym.stability).toBe('unstable');
    // the start lies within 0.1 % of the unstable state in every chamber's gas
    expect(massesClose(sym.chambers, Object.fromEntries(model.chambers.map((c) => [c.name, { mass: c.m0 }])), 3e-3)).toBe(true);
    const t = r.transient!;
    expect(t.status).toBe('completed');
    expect(t.outcomes.map((o) => o.outcome)).toEqual(['settled']);
    expect(t.reached).not.toBeNull();
    const end = r.equilibria[t.reached!];
    expect(end).not.toBe(sym);
    expect(end.stability).toBe('stable');
    expect(t.distance!).toBeLessThan(1e-3);
    expect(Math.abs(end.chambers.a.stretch! - end.chambers.b.stretch!)).toBeGreaterThan(0.3);
  });

  it('--valves closed leaves every cell alone with its own gas: one equilibrium, the start, with no dynamics', () => {
    const model = modelFromFile('networks/cushion-runaway.yaml');
    const r = findEquilibria(model, { valves: 'closed', transient: false });
    expect(r.groups.map((g) => g.chambers)).toEqual([['cell_a'], ['cell_b']]);
    expect(r.count).toBe(1);
    const e = r.equilibria[0];
    expect(e.chambers.cell_a.stretch!).toBeCloseTo(1.6, 12);
    expect(e.chambers.cell_b.stretch!).toBeCloseTo(1.7, 12);
    expect(e.growth_rate).toBeNull();
    expect(e.eigenvalues).toEqual([]);
    // the same cells with the valve open: one group, three equilibria
    expect(findEquilibria(model, { valves: 'open', transient: false }).count).toBe(3);
  });

  it('a check valve from a supply: the own-gas state would open it; the state at the cracking pressure is listed and reached', () => {
    const model = modelFromText(`
format: 1
${AMBIENT}
reservoirs:
  supply: { pressure: 10 kPa gauge }
chambers:
  a: { ${CELL}, start: { pressure: 0 kPa gauge } }
  b: { ${CELL}, start: { pressure: 0 kPa gauge } }
lines:
  link: { from: a, to: b, diameter: 1 mm, length: 0.3 m }
valves:
  inlet: { from: supply, to: a, orifice: 1 mm, discharge-coefficient: 0.7, check: { cracking: 4 kPa } }
simulate: { duration: 20 s, sample: 0.02 s, tolerance: 1e-8 }
`);
    // the gas held at the start (the default for a network open to a reservoir is the end's)
    const r = findEquilibria(model, { gas: 'start' });
    const own = r.equilibria.filter((e) => !e.consistent);
    expect(own.length).toBe(1);
    expect(own[0].warnings[0]).toMatch(/check valve inlet would open/);
    const cracked = r.equilibria.filter((e) => e.notes.some((n) => /inlet at its cracking pressure/.test(n)));
    expect(cracked.length).toBe(4); // each cell on its rising or falling branch at 6 kPa gauge
    for (const e of cracked) {
      expect(e.consistent).toBe(true);
      for (const c of Object.values(e.chambers)) expect(c.gauge).toBeCloseTo(6000, 6);
    }
    const t = r.transient!;
    expect(t.reached).not.toBeNull();
    const end = r.equilibria[t.reached!];
    expect(cracked).toContain(end);
    expect(end.chambers.a.branch).toBe('rising');
    expect(end.chambers.b.branch).toBe('rising');
    expect(end.stability).toBe('stable');
  });

  it('a check valve between two open sides passes gas at rest: the manifold settles in steady flow, and the run reaches it', () => {
    const r = findEquilibria(modelFromFile('networks/manifold-mixed.yaml'));
    expect(r.groups.length).toBe(1);
    expect(r.groups[0].kind).toBe('open');
    expect(r.groups[0].flowing).toEqual(['inlet_check']);
    // the Mooney–Rivlin pod has three volumes at the manifold pressure
    expect(r.count).toBe(3);
    const p = r.equilibria[0].chambers.manifold.gauge;
    // between the bleed's ambient and the regulator less the cracking pressure
    expect(p).toBeGreaterThan(100e3);
    expect(p).toBeLessThan(110e3);
    expect(r.transient!.reached).toBe(0);
    expect(r.equilibria[0].stability).toBe('stable');
    expect(r.equilibria.map((e) => e.chambers.pod.branch)).toEqual(['rising', 'falling', 'rising']);
  });

  it('a fed tank whose relief valve can stay neither open nor shut has no steady state; one without any outlet neither', () => {
    const chatter = modelFromText(`
format: 1
${AMBIENT}
chambers:
  tank: { wall: rigid, volume: 100 mL, start: { pressure: 0 kPa gauge } }
feeds:
  fill: { into: tank, rate: 0.05 g/s }
valves:
  relief: { from: tank, to: ambient, orifice: 2 mm, discharge-coefficient: 0.6, relief: { opens-above: 50 kPa gauge, reseats-below: 40 kPa gauge } }
simulate: { duration: 4 s, sample: 2 ms }
`);
    const r = findEquilibria(chatter, { transient: false });
    expect(r.count).toBe(0);
    expect(r.groups[0].notes.join(' ')).toMatch(/relief valve relief can stay neither open nor shut/);
    const sealed = modelFromText(`
format: 1
${AMBIENT}
chambers:
  tank: { wall: rigid, volume: 100 mL, start: { pressure: 0 kPa gauge } }
feeds:
  fill: { into: tank, rate: 0.05 g/s }
simulate: { duration: 1 s }
`);
    const s = findEquilibria(sealed, { transient: false });
    expect(s.groups[0].kind).toBe('fed');
    expect(s.count).toBe(0);
    expect(s.groups[0].notes[0]).toMatch(/no steady state/);
  });

  it('large groups switch to deflated Newton, which finds the same 19 equilibria of the Mooney–Rivlin chain', () => {
    const model = modelFromFile('test/reference/eq-mr-chain.yaml');
    const full = findEquilibria(model, { transient: false });
    const defl = findEquilibria(model, { transient: false, maxCombinations: 1 });
    expect(full.groups[0].method).toBe('enumeration');
    expect(defl.groups[0].method).toBe('deflation');
    expect(defl.groups[0].complete).toBe(false);
    expect(defl.count).toBe(19);
    for (const e of full.equilibria) expect(defl.equilibria.some((q) => massesClose(e.chambers, q.chambers, 1e-9))).toBe(true);
  });

  it('deflation on a 12-cell chain (4096 combinations) finds all 12 stable states: one cell large, the rest small', () => {
    let text = `format: 1\n${AMBIENT}\nchambers:\n`;
    for (let i = 0; i < 12; i++) text += `  c${i}: { ${CELL}, start: { stretch: ${[1.5, 1.7, 1.6][i % 3]} } }\n`;
    text += 'lines:\n';
    for (let i = 0; i < 11; i++) text += `  l${i}: { from: c${i}, to: c${i + 1}, diameter: 0.5 mm, length: 0.5 m }\n`;
    text += 'simulate: { duration: 1 s }\n';
    const r = findEquilibria(modelFromText(text), { transient: false, maxCombinations: 4095 });
    expect(r.groups[0].method).toBe('deflation');
    const stable = r.equilibria.filter((e) => e.stable);
    expect(stable.length).toBe(12);
    for (const e of stable) expect(Object.values(e.chambers).filter((c) => c.branch === 'falling').length).toBe(1);
  });

  it('heat: exchange linearises masses and temperatures: isothermal rates for a large h·A, adiabatic capacitance for a tiny one', () => {
    const net = (hA: string): string => `
format: 1
${AMBIENT}
heat: exchange
chambers:
  a: { ${CELL}, start: { stretch: 1.15 }, heat-transfer: ${hA} }
  b: { ${CELL}, start: { stretch: 1.25 }, heat-transfer: ${hA} }
lines:
  link: { from: a, to: b, diameter: 0.5 mm, length: 0.5 m }
simulate: { duration: 1 s }
`;
    const iso = findEquilibria(modelFromFile('test/reference/eq-two-cells-before.yaml'), { transient: false }).equilibria[0];
    const hot = findEquilibria(modelFromText(net('1000 W/K')), { transient: false }).equilibria[0];
    expect(hot.eigenvalues.length).toBe(3); // two masses and two temperatures, less the conserved gas
    expect(Math.abs(hot.growth_rate! / iso.growth_rate! - 1)).toBeLessThan(1e-3);
    expect(hot.chambers.a.stretch!).toBeCloseTo(iso.chambers.a.stretch!, 12);

    // tiny h·A: the exchange mode sees the adiabatic capacitance C = ((V + Vd)/γ + p dV/dp)/(R T)
    // (Müller & Strehlow 2004, n = γ; from memory)
    const cold = findEquilibria(modelFromText(net('1e-6 W/K')), { transient: false }).equilibria[0];
    const l = cold.chambers.a.stretch!;
    const R = 8.314462618 / 0.0289647, T = 293.15, pa = 101325, gamma = 1.4;
    const V0 = (4 / 3) * Math.PI * 0.02 ** 3, Vd = (Math.PI * 0.5e-3 ** 2 * 0.5) / 8, c = (2 * 0.3e6 * 0.001) / 0.02;
    const p = pa + c * (1 / l - Math.pow(l, -7));
    const dVdp = (3 * V0 * l * l) / (c * (-1 / (l * l) + 7 * Math.pow(l, -8)));
    const Cad = ((V0 * l ** 3 + Vd) / gamma + p * dVdp) / (R * T);
    const mu = 1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4) / (T + 110.4);
    const G = (2 * Math.PI * 0.5e-3 ** 4 * p) / (256 * mu * 0.5 * R * T);
    const fastest = Math.min(...cold.eigenvalues.map((z) => z.re));
    expect(Math.abs(fastest / (-2 * G / Cad) - 1)).toBeLessThan(1e-3);
  });

  it('heat: adiabatic analyses the isothermal rest states at ambient temperature, and says so', () => {
    const iso = findEquilibria(modelFromFile('networks/cushion-settle.yaml'), { transient: false });
    const text = `heat: adiabatic\n${modelFromFile('networks/cushion-settle.yaml').doc.source}`;
    const adi = findEquilibria(modelFromText(text), { transient: false });
    expect(adi.notes.join(' ')).toMatch(/heat: adiabatic/);
    expect(adi.count).toBe(iso.count);
    expect(adi.equilibria[0].chambers.cell_a.stretch!).toBeCloseTo(iso.equilibria[0].chambers.cell_a.stretch!, 12);
  });

  it('--gas end takes each closed group\'s gas from the end of the transient (a valve that shuts splits the gas)', () => {
    const model = modelFromFile('networks/gripper-charge.yaml');
    const start = findEquilibria(model, { gas: 'start' });
    expect(start.transient!.message).toMatch(/use --gas end/);
    const end = findEquilibria(model, { gas: 'end' });
    const finger = end.groups.find((g) => g.chambers.includes('finger'))!;
    expect(finger.kind).toBe('closed');
    const run = end.transient!;
    expect(run.reached).not.toBeNull();
    expect(finger.mass!).toBeGreaterThan(start.groups.find((g) => g.chambers.includes('finger'))!.mass! * 1.5);
    expect(end.equilibria[run.reached!].consistent).toBe(true);
  });
});
