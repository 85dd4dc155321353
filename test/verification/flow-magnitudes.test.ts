/**
 * Flow magnitudes in transients, each against a named published closed form (docs/references.md).
 * Unlike the temperature–pressure paths of heat.test.ts, which hold for any flow law, these read
 * how much flows: a 1 % error in a choked flow, a wrong ρ0, an ignored subsonic index, a sign or
 * a dropped term fails them (`npm run mutants` checks that it does; docs/verification.md).
 */
import { describe, expect, it } from 'vitest';
import { at, channel, modelFromText, runChecked } from '../helpers.js';

const RU = 8.314462618;
const R_AIR = RU / 0.0289647;
const PA = 101325;
const T0 = 293.15;
const G = 1.4;
const PSI = Math.pow(2 / (G + 1), (G + 1) / (2 * (G - 1)));
const rel = (a: number, b: number): number => Math.abs(a / b - 1);

const receiver = (heat: string, V: string, p0: string, body: string, duration: string, extra = ''): string => `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
heat: ${heat}
chambers:
  receiver: { wall: rigid, volume: ${V}, start: { pressure: ${p0} } }
${body}
simulate: { duration: ${duration}, sample: 1 ms, tolerance: 1e-10, method: implicit }
${extra}`;

/** The time at which a sampled channel first falls to `level` (linear between samples). */
function timeAt(times: number[], values: number[], level: number): number {
  for (let k = 1; k < values.length; k++) {
    if (values[k] <= level && values[k - 1] > level) {
      return times[k - 1] + ((values[k - 1] - level) / (values[k - 1] - values[k])) * (times[k] - times[k - 1]);
    }
  }
  return Number.NaN;
}

describe('receiver blow-down through an orifice, choked (Anderson, Modern Compressible Flow, ch. 5: nozzle mass flow)', () => {
  // 2 L at 700 kPa abs, orifice 2 mm, Cd 0.8: τ0 = V/(Cd·A·ψ·√(γ R T0)); choked while p ≥ pa/0.528.
  const V = 2e-3;
  const A = (Math.PI / 4) * 2e-3 ** 2;
  const Cd = 0.8;
  const tau = V / (Cd * A * PSI * Math.sqrt(G * R_AIR * T0));
  const valve = 'valves:\n  vent: { from: receiver, to: ambient, orifice: 2 mm, discharge-coefficient: 0.8, initially: open }';

  it('isothermal: p = p0·exp(−t/τ0) while choked', () => {
    const r = runChecked(modelFromText(receiver('isothermal', '2 L', '700 kPa abs', valve, '0.7 s')));
    for (const t of [0.1, 0.3, 0.6]) expect(rel(at(r, 'receiver.pressure', t), 700e3 * Math.exp(-t / tau))).toBeLessThan(1e-6);
    // and the flow itself: ṁ = Cd·A·p·ψ·√(γ/(R T0))
    const t = 0.2;
    expect(rel(at(r, 'vent.flow', t), Cd * A * at(r, 'receiver.pressure', t) * PSI * Math.sqrt(G / (R_AIR * T0)))).toBeLessThan(1e-6);
  });

  it('isothermal, subsonic tail: ṁ = Cd·A·p·√(2γ/((γ−1)RT)·(r^(2/γ) − r^((γ+1)/γ))), also just above the critical ratio', () => {
    const r = runChecked(modelFromText(receiver('isothermal', '2 L', '700 kPa abs', valve, '9 s')));
    const times = r.trace.times;
    const p = channel(r, 'receiver.pressure');
    const q = channel(r, 'vent.flow');
    const law = (pk: number): number => {
      const x = PA / pk;
      return Cd * A * pk * Math.sqrt(((2 * G) / ((G - 1) * R_AIR * T0)) * (Math.pow(x, 2 / G) - Math.pow(x, (G + 1) / G)));
    };
    let tail = 0;
    let nearCritical = 0;
    for (let k = 0; k < times.length; k += 7) {
      const x = PA / p[k];
      if (x > 0.53 && x < 0.5336) { expect(rel(q[k], law(p[k]))).toBeLessThan(1e-6); nearCritical++; }
      if (x > 0.6 && x < 0.99) { expect(rel(q[k], law(p[k]))).toBeLessThan(1e-6); tail++; }
    }
    expect(nearCritical).toBeGreaterThan(2);
    expect(tail).toBeGreaterThan(10);
  });

  it('adiabatic (isentropic discharge): p/p0 = [1 + (γ−1)t/(2τ0)]^(−2γ/(γ−1)); discharge time to p', () => {
    // the remaining gas expands isentropically, T = T0 (p/p0)^((γ−1)/γ), and the choked outflow
    // ṁ = Cd A p ψ √(γ/(R T)) integrates to the form above (Anderson ch. 5 with the isentropic relations)
    const r = runChecked(modelFromText(receiver('adiabatic', '2 L', '700 kPa abs', valve, '3 s')));
    const closed = (t: number): number => 700e3 * Math.pow(1 + ((G - 1) * t) / (2 * tau), (-2 * G) / (G - 1));
    for (const t of [0.2, 1, 2]) expect(rel(at(r, 'receiver.pressure', t), closed(t))).toBeLessThan(1e-6);
    // discharge time from 700 to 300 kPa abs
    const tDis = ((2 * tau) / (G - 1)) * (Math.pow(300 / 700, -(G - 1) / (2 * G)) - 1);
    const times = r.trace.times;
    expect(rel(timeAt(times, channel(r, 'receiver.pressure'), 300e3), tDis)).toBeLessThan(1e-4);
  });
});

describe('receiver blow-down through an ISO 6358 valve: choked ramp, then subsonic tail (ISO 6358-1:2013; Beater, Pneumatic Drives, eq. 5.1)', () => {
  // C = 0.5 L/(s·bar) = 5e-9 m³/(s·Pa), b = 0.3, m = 0.5; 1 L at 700 kPa abs, isothermal at T0.
  // choked: dp/dt = −p/τ, τ = V/(R C ρ0 T0), down to pa/b; subsonic with u = pa/p = b + (1 − b) sin θ:
  //   dt = τ (1 − b) dθ/(b + (1 − b) sin θ)   (the characteristic with m = 0.5 integrated)
  const V = 1e-3;
  const C = 5e-9;
  const b = 0.3;
  const tau = V / (R_AIR * C * 1.185 * T0);
  const tChoke = tau * Math.log(700e3 / (PA / b));
  const tail = (p: number): number => {
    const th = Math.asin((PA / p - b) / (1 - b));
    const n = 4000;
    let s = 0;
    for (let i = 0; i <= n; i++) {
      const x = (th * i) / n;
      const w = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
      s += w / (b + (1 - b) * Math.sin(x));
    }
    return tChoke + tau * (1 - b) * (s * th) / (3 * n);
  };
  const netlist = (m: string): string => receiver('isothermal', '1 L', '700 kPa abs',
    `valves:\n  vent: { from: receiver, to: ambient, conductance: 0.5 L/(s*bar), critical-ratio: 0.3${m}, initially: open }`, '10 s');

  it('the pressure reaches each level at the time of the closed form (choked and subsonic)', () => {
    const r = runChecked(modelFromText(netlist('')));
    const times = r.trace.times;
    const p = channel(r, 'receiver.pressure');
    expect(rel(at(r, 'receiver.pressure', 0.5 * tChoke), 700e3 * Math.exp(-0.5 / 1 * tChoke / tau))).toBeLessThan(1e-6);
    for (const level of [400e3, PA / b, 250e3, 150e3, 110e3]) {
      const expected = level >= PA / b ? tau * Math.log(700e3 / level) : tail(level);
      expect(rel(timeAt(times, p, level), expected)).toBeLessThan(2e-5);
    }
  });

  it('adiabatic: the choked flow follows √(T0/T1) as the gas cools, p/p0 = [1 + (γ−1)t/(2τ)]^(−2γ/(γ−1))', () => {
    // choked qm = C ρ0 p √(T0/T) with the remaining gas isentropic, T = T0 (p/p0)^((γ−1)/γ):
    // the same integral as the orifice's, with τ = V/(C ρ0 R T0)
    const r = runChecked(modelFromText(receiver('adiabatic', '1 L', '700 kPa abs',
      'valves:\n  vent: { from: receiver, to: ambient, conductance: 0.5 L/(s*bar), critical-ratio: 0.3, initially: open }', '1.5 s')));
    const closed = (t: number): number => 700e3 * Math.pow(1 + ((G - 1) * t) / (2 * tau), (-2 * G) / (G - 1));
    for (const t of [0.3, 0.8, 1.0]) {
      expect(at(r, 'receiver.pressure', t)).toBeGreaterThan(PA / b);
      expect(rel(at(r, 'receiver.pressure', t), closed(t))).toBeLessThan(1e-6);
    }
  });

  it('the subsonic index is used: with m = 0.7 the tail flow at each state is C ρ0 p [1 − ((pa/p − b)/(1 − b))²]^0.7', () => {
    const r = runChecked(modelFromText(netlist(', subsonic-index: 0.7')));
    let checked = 0;
    for (const t of [3, 4, 5, 6]) {
      const p = at(r, 'receiver.pressure', t);
      const z = (PA / p - b) / (1 - b);
      if (!(z > 0.1 && z < 0.95)) continue;
      expect(rel(at(r, 'vent.flow', t), C * 1.185 * p * Math.pow(1 - z * z, 0.7))).toBeLessThan(1e-6);
      expect(rel(at(r, 'vent.flow', t), C * 1.185 * p * Math.pow(1 - z * z, 0.5))).toBeGreaterThan(0.01);
      checked++;
    }
    expect(checked).toBeGreaterThan(1);
  });
});

describe('a turbulent line: flow against the Blasius friction law (Blasius 1913; Cengel & Cimbala, Fluid Mechanics, ch. 8, from memory)', () => {
  // 20 m of 4 mm smooth hose from a 5 L receiver at 180 kPa abs: Re 1e4…4e4, Mach below 0.15, so the
  // acceleration terms are below 1 % and the isothermal friction law p1² − p2² = f (L/D) G² R T with
  // Blasius f = 0.3164 Re^−0.25 is the published closed form for the flow at each state.
  it('flow within 3 % of Blasius at every sampled state (Haaland against Blasius: within 2 %)', () => {
    const r = runChecked(modelFromText(receiver('isothermal', '5 L', '180 kPa abs',
      'lines:\n  hose: { from: receiver, to: ambient, diameter: 4 mm, length: 20 m }', '2 s')));
    const D = 4e-3;
    const L = 20;
    const mu = 1.716e-5 * Math.pow(T0 / 273.15, 1.5) * (273.15 + 110.4) / (T0 + 110.4);
    const A = (Math.PI / 4) * D * D;
    for (const t of [0.01, 0.5, 1.5]) {
      const p = at(r, 'receiver.pressure', t);
      // (p² − pa²) = 0.3164 (G D/μ)^−0.25 (L/D) G² R T → G^1.75 = (p² − pa²) D^1.25 / (0.3164 μ^0.25 L R T)
      const G175 = ((p * p - PA * PA) * Math.pow(D, 1.25)) / (0.3164 * Math.pow(mu, 0.25) * L * R_AIR * T0);
      const mBlasius = Math.pow(G175, 1 / 1.75) * A;
      const Re = (Math.pow(G175, 1 / 1.75) * D) / mu;
      expect(Re).toBeGreaterThan(4e3);
      expect(Re).toBeLessThan(1e5);
      expect(rel(at(r, 'hose.flow', t), mBlasius)).toBeLessThan(0.03);
    }
    expect(r.lines.hose.regime).toBe('turbulent');
    expect(r.lines.hose.choked).toBe(false);
  });
});

describe('a feed in standard litres (ISO 8778 reference atmosphere, ANR; ISO 6358-1 ρ0 = 1.185 kg/m³)', () => {
  it('10 L/min ANR of air into a rigid 2 L chamber: dp/dt = q·ρ0·R·T/V exactly', () => {
    const r = runChecked(modelFromText(receiver('isothermal', '2 L', '0 kPa gauge', 'feeds:\n  fill: { into: receiver, rate: 10 L/min ANR }', '3 s')));
    const qm = (10e-3 / 60) * 1.185;
    for (const t of [1, 3]) expect(rel(at(r, 'receiver.pressure', t) - PA, (qm * R_AIR * T0 * t) / 2e-3)).toBeLessThan(1e-9);
  });

  it('helium: the ideal-gas density at 100 kPa, 20 °C (ISO 8778), not air’s ρ0', () => {
    const text = receiver('isothermal', '2 L', '0 kPa gauge', 'feeds:\n  fill: { into: receiver, rate: 10 L/min ANR }', '3 s').replace('format: 1', 'format: 1\ngas: helium');
    const r = runChecked(modelFromText(text));
    const Rhe = RU / 4.002602e-3;
    const qm = (10e-3 / 60) * (100e3 / (Rhe * T0));
    expect(rel(at(r, 'receiver.pressure', 3) - PA, (qm * Rhe * T0 * 3) / 2e-3)).toBeLessThan(1e-9);
  });
});

describe('an air-rated valve passing helium: choked flow 0.394 of air’s (equivalent nozzle; docs/references.md)', () => {
  it('the exponential blow-down time constant grows by 1/0.394 × √(R_He/R_air)… as the closed form says', () => {
    // choked: dm/dt = −F·C ρ0 p √(T0/T), m = pV/(R T) ⇒ τ = V/(F R C ρ0 √(T T0)); F = 0.394 for helium
    const body = 'valves:\n  vent: { from: receiver, to: ambient, conductance: 0.5 L/(s*bar), critical-ratio: 0.3, initially: open }';
    const psi = (g: number): number => Math.pow(2 / (g + 1), (g + 1) / (2 * (g - 1)));
    const Rhe = RU / 4.002602e-3;
    const F = (Math.sqrt((5 / 3) / Rhe) * psi(5 / 3)) / (Math.sqrt(1.4 / R_AIR) * psi(1.4));
    expect(Math.abs(F - 0.394)).toBeLessThan(0.394 * 0.05);
    const text = receiver('isothermal', '1 L', '700 kPa abs', body, '0.3 s').replace('format: 1', 'format: 1\ngas: helium');
    const r = runChecked(modelFromText(text));
    const tau = 1e-3 / (F * Rhe * 5e-9 * 1.185 * T0);
    expect(rel(at(r, 'receiver.pressure', 0.2), 700e3 * Math.exp(-0.2 / tau))).toBeLessThan(1e-6);
    // the mass flow at the start against air's
    const rAir = runChecked(modelFromText(receiver('isothermal', '1 L', '700 kPa abs', body, '0.3 s')));
    expect(rel(at(r, 'vent.flow', 0) / at(rAir, 'vent.flow', 0), 0.394)).toBeLessThan(0.05);
  });
});

describe('relief valves (common practice; ISO 4126-1 terms: set pressure, overpressure, from memory)', () => {
  /** A 0.5 L chamber fed at 0.5 g/s, relieved to ambient by a valve rated 0.3 L/(s·bar), set at 300 kPa gauge. */
  const fedRelief = (action: string): ReturnType<typeof runChecked> => runChecked(modelFromText(receiver('isothermal', '0.5 L', '0 kPa gauge', `feeds:
  fill: { into: receiver, rate: 0.5 g/s }
valves:
  relief: { from: receiver, to: ambient, conductance: 0.3 L/(s*bar), critical-ratio: 0.3, relief: { opens-above: 300 kPa gauge, ${action} } }`, '20 s')));
  // A chamber fed at q through a proportional relief valve rated C (ISO 6358, choked into ambient):
  // at rest q = x·C ρ0 p (T = T0), x = (p − pa − ps)/(pf − ps), a quadratic in p.
  it('proportional lift holds a fed chamber where the relief passes the feed (the closed form of q = K(p)·x)', () => {
    const r = fedRelief('full-lift-at: 330 kPa gauge');
    const q = 0.5e-3;
    const K = 3e-9 * 1.185; // C ρ0, kg/(s·Pa)
    const ps = 300e3;
    const band = 30e3;
    // q·band = K (g − ps)(g + pa), g gauge: g² + (pa − ps) g − (ps pa + q band/K) = 0
    const bq = PA - ps;
    const cq = -(ps * PA + (q * band) / K);
    const g = (-bq + Math.sqrt(bq * bq - 4 * cq)) / 2;
    expect(g).toBeGreaterThan(ps);
    expect(g).toBeLessThan(ps + band);
    expect(rel(r.chambers.receiver.final.gauge, g)).toBeLessThan(1e-6);
    expect(r.events.some((e) => e.what === 'relief valve relief starts lifting')).toBe(true);
    expect(r.events.some((e) => e.what.includes('full lift'))).toBe(false);
  });

  it('pop action with the same feed cycles between its set and reseat pressures', () => {
    const r = fedRelief('reseats-below: 280 kPa gauge');
    expect(r.chambers.receiver.peak.gauge).toBeLessThan(300e3 * (1 + 1e-6));
    expect(r.events.filter((e) => e.what === 'relief valve relief opens').length).toBeGreaterThan(3);
  });

  for (const action of ['reseats-below: 150 kPa gauge', 'full-lift-at: 220 kPa gauge']) {
    it(`one-way (${action.split(':')[0]}): lifted, with the downstream side higher, it passes nothing back`, () => {
      // the vessel is above the set pressure (the valve is open), the header higher still
      const r = runChecked(modelFromText(`
format: 1
chambers:
  vessel: { wall: rigid, volume: 1 L, start: { pressure: 300 kPa gauge } }
reservoirs:
  header: { pressure: 500 kPa gauge }
valves:
  relief:
    from: vessel
    to: header
    conductance: 0.3 L/(s*bar)
    critical-ratio: 0.3
    relief: { opens-above: 200 kPa gauge, ${action} }
simulate: { duration: 2 s, sample: 10 ms, tolerance: 1e-10 }
`));
      expect(r.chambers.vessel.final.gauge).toBe(r.chambers.vessel.peak.gauge);
      expect(rel(r.chambers.vessel.final.gauge, 300e3)).toBeLessThan(1e-12);
      expect(r.valves.relief.peak_flow).toBe(0);
    });
  }
});

describe('a check valve holds its cracking pressure (common practice: flow only while p_from − p_to exceeds it)', () => {
  it('a chamber filled through a check valve with 50 kPa cracking ends 50 kPa below the supply', () => {
    const r = runChecked(modelFromText(`
format: 1
chambers:
  vessel: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: 300 kPa gauge }
valves:
  check:
    from: supply
    to: vessel
    orifice: 2 mm
    discharge-coefficient: 0.7
    check: { cracking: 50 kPa }
simulate: { duration: 10 s, sample: 10 ms, tolerance: 1e-10 }
`));
    expect(Math.abs(r.chambers.vessel.final.gauge - 250e3)).toBeLessThan(2);
    expect(r.chambers.vessel.peak.gauge).toBeLessThanOrEqual(250e3 + 1e-6);
  });
});
