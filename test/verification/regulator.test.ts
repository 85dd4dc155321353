/**
 * Regulator droop line (issue: "the steady downstream pressure under a flow q must follow the
 * droop line q ↔ set − band·(q/q_max)"). With its supply side choked, a proportional
 * regulator passes q = x·q_max at opening x = (set − p)/band, so at rest under a draw q the
 * downstream gauge pressure is p = set − band·q/q_max (the static characteristic of a
 * proportional pressure-reducing valve, common practice; physics/regulator.ts). q_max is the
 * ISO 6358-1 choked flow at full opening, C·ρ0·p_supply (ρ0 = 1.185 kg/m³, T = T0 = 293.15 K;
 * docs/references.md).
 */
import { describe, expect, it } from 'vitest';
import { modelFromText, runChecked } from '../helpers.js';
import { NetworkSystem } from '../../src/assemble/system.js';

const C = 1e-8;            // 1 L/(s·bar) in m³/(s·Pa)
const pa = 101325;
const pSupply = 800e3 + pa;
const qMax = C * 1.185 * pSupply;
const set = 300e3, band = 50e3;

function rig(leak: string, relieving = false): string {
  return `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  rx: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: 800 kPa gauge }
valves:
  reg: { from: supply, to: rx, conductance: 1 L/(s*bar), critical-ratio: 0.5, regulates: { set: 300 kPa gauge, band: 50 kPa }${relieving ? ', relieving: true' : ''} }
  draw: { from: rx, to: ambient, orifice: ${leak}, discharge-coefficient: 0.8, initially: open }
simulate: { duration: 3 s, tolerance: 1e-10 }
`;
}

describe('regulator droop line (static characteristic of a proportional regulator)', () => {
  for (const leak of ['0.5 mm', '1 mm', '1.6 mm', '2.2 mm']) {
    it(`steady state under the draw of a ${leak} orifice lies on the droop line to 1e-6 of the band`, () => {
      const r = runChecked(modelFromText(rig(leak)));
      const q = r.trace.values[r.trace.channels.findIndex((c) => c.key === 'reg.flow')].at(-1)!;
      const p = r.chambers.rx.final.gauge;
      expect(q).toBeGreaterThan(0);
      expect(Math.abs(p - (set - (band * q) / qMax)) / band).toBeLessThan(1e-6);
    });
  }

  it('between a supply and a fixed downstream pressure, the choked flow is q_max·(set − p)/band', () => {
    const m = modelFromText(rig('1 mm').replace('rx: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }', 'rx: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }\n  other: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }').replace('draw: { from: rx', 'draw: { from: other'));
    const sys = new NetworkSystem(m);
    const y = sys.initialState();
    for (const pg of [240e3, 260e3, 275e3, 299e3, 310e3]) {
      y[sys.mIdx[0]] = ((pg + pa) * 1e-3) / (m.gas.R * 293.15);
      sys.evaluate(0, y);
      const q = sys.flows[0].mdot;
      const x = Math.min(1, Math.max(0, (set - pg) / band));
      expect(Math.abs(q - qMax * x)).toBeLessThan(1e-12 * qMax);
    }
  });

  it('a relieving regulator vents above its set pressure and shuts its supply side', () => {
    const r = runChecked(modelFromText(rig('0.5 mm', true).replace('start: { pressure: 0 kPa gauge }', 'start: { pressure: 400 kPa gauge }')));
    const vent = r.trace.values[r.trace.channels.findIndex((c) => c.key === 'reg.vent.flow')];
    const reg = r.trace.values[r.trace.channels.findIndex((c) => c.key === 'reg.flow')];
    expect(vent[0]).toBeGreaterThan(0);
    expect(reg[0]).toBe(0);
    // it comes back down to the regulated band
    expect(r.chambers.rx.final.gauge).toBeLessThan(set);
    expect(r.chambers.rx.final.gauge).toBeGreaterThan(set - band);
  });
});
