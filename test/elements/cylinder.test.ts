/**
 * The cylinder element on its own: a sealed cylinder (no flows) driven by the one driver, so
 * that its modes, events and energy balance are checked apart from any network.
 */
import { describe, expect, it } from 'vitest';
import { CYLINDER_EVENTS, CylinderState } from '../../src/elements/cylinder.js';
import { buildCylinder } from '../../src/model/cylinder.js';
import { readNetlist } from '../../src/netlist/read.js';
import { GASES, makeGas } from '../../src/physics/gas.js';
import { drive, type EventfulProblem } from '../../src/solve/driver.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import { odex } from '../../src/solve/odex.js';

const air = makeGas(GASES.air);
const PA = 101325;

/** A sealed cylinder as an event-driven problem: y = [mc, Tc, mr, Tr, x, v, W]. */
function sealed(yaml: string, isothermal: boolean): { p: EventfulProblem; el: CylinderState; y0: Float64Array; log: string[] } {
  const doc = readNetlist(yaml, 'c.yaml');
  if (!doc.ok) throw new Error(doc.diagnostics.map((d) => d.message).join('\n'));
  const model = buildCylinder(doc.value.cylinders[0], { cap: 0, rod: 0 }, air, PA, 293.15, isothermal ? 'isothermal' : 'adiabatic', []);
  if (!model) throw new Error('no model');
  const el = new CylinderState(model, air, PA);
  const log: string[] = [];
  const ev = (t: number, y: Float64Array): void => el.evaluate(t, y[0], y[1], y[2], y[3], y[4], y[5]);
  const p: EventfulProblem = {
    n: 7,
    rtol: 1e-10,
    atol: new Float64Array([1e-16, 1e-8, 1e-16, 1e-8, 1e-14, 1e-13, 1e-12]),
    rhs(t, y, d) {
      ev(t, y);
      d.fill(0);
      if (!isothermal) {
        d[1] = el.temperatureRate('cap', y[0], y[1], 0, 0, 0, 293.15);
        if (model.doubleActing) d[3] = el.temperatureRate('rod', y[2], y[3], 0, 0, 0, 293.15);
      }
      d[4] = el.dx;
      d[5] = el.dv;
      d[6] = el.dissipation;
    },
    breakpoints: [],
    atBreakpoint() {},
    nEvents: CYLINDER_EVENTS.length,
    eventValues(t, y, out) {
      ev(t, y);
      CYLINDER_EVENTS.forEach((k, i) => { out[i] = el.eventValue(k, y[4], y[5]); });
    },
    eventDirection: (k) => CylinderState.direction(CYLINDER_EVENTS[k]),
    fireEvent(k, t, y) {
      ev(t, y);
      const s = { x: y[4], v: y[5], W: y[6] };
      const what = el.fire(CYLINDER_EVENTS[k], t, s);
      y[4] = s.x; y[5] = s.v; y[6] = s.W;
      if (what) log.push(`${t.toFixed(6)} ${what}`);
      return true;
    },
  };
  const y0 = new Float64Array([model.cap.m0, model.cap.T0, model.rod?.m0 ?? 0, model.rod?.T0 ?? 293.15, model.x0, 0, 0]);
  ev(0, y0);
  el.settle(0, model.x0);
  return { p, el, y0, log };
}

function run(s: ReturnType<typeof sealed>, tEnd: number, method: 'implicit' | 'explicit', sample = 1e-3) {
  const samples: { t: number; y: Float64Array }[] = [];
  const r = drive(s.p, {
    integrator: method === 'implicit' ? rosenbrock : odex, t0: 0, tEnd, y0: s.y0, sample,
    observe: (t, y, kind) => { if (kind === 'sample') samples.push({ t, y: Float64Array.from(y) }); },
  });
  expect(r.status, r.message).toBe('completed');
  return { r, samples };
}

const cyl = (body: string): string => `format: 1
cylinders:
  c:
${body.split('\n').map((l) => `    ${l}`).join('\n')}
simulate: { duration: 1 s }
`;

describe('a sealed cylinder on its own', () => {
  for (const method of ['implicit', 'explicit'] as const) {
    it(`${method}: pushed by its cap gas it hits full stroke, is held, and the energy balance closes`, () => {
      const s = sealed(cyl(`bore: 32 mm
rod: 12 mm
stroke: 50 mm
dead-volume: { cap: 200 mL, rod: 300 mL }
moving-mass: 0.8 kg
spring: { rate: 200 N/m, preload: 5 N }
friction: { static: 12 N, sliding: 8 N, viscous: 4 N*s/m }
start: { position: 10 mm, cap: { pressure: 300 kPa gauge } }`), false);
      const { samples } = run(s, 0.5, method);
      expect(s.log.some((l) => l.includes("reaches full stroke")), s.log.join("\n")).toBe(true);
      const last = samples[samples.length - 1].y;
      expect(last[4]).toBe(0.05);
      expect(last[5]).toBe(0);
      expect(s.el.stop).toBe(1);
      // energy: gas internal energy + kinetic + spring + ambient work + dissipated is constant
      const cv = air.cv;
      const g = s.el.c.geometry;
      const E = (y: Float64Array): number => y[0] * cv * y[1] + y[2] * cv * y[3] + 0.5 * 0.8 * y[5] ** 2
        + 5 * y[4] + 0.5 * 200 * y[4] ** 2 + PA * (g.capArea - g.annulusArea) * y[4] + y[6];
      const e0 = E(samples[0].y);
      const worst = Math.max(...samples.map((q) => Math.abs(E(q.y) - e0)));
      expect(worst / samples[samples.length - 1].y[6]).toBeLessThan(1e-7);
    });
  }

  it('without friction a balanced piston rests at a stop until a force builds up (dead band)', () => {
    const s = sealed(cyl(`bore: 20 mm
stroke: 40 mm
dead-volume: 1e3 m^3
moving-mass: 0.5 kg
force: "-(10 N) * t / (1 s)"`), true);
    expect(s.el.stop).toBe(-1);
    run(s, 0.2, 'implicit');
    expect(s.el.stop).toBe(0);
    expect(s.log[0]).toMatch(/^0\.0000\d+ cylinder c starts to move from its retracted stop, extending/);
  });

  it('stick–slip: a piston pushed by a slowly rising force sticks and slips without chatter', () => {
    // a stiff return spring against a force ramp: each slip overshoots, the piston halts and sticks
    const s = sealed(cyl(`bore: 20 mm
stroke: 100 mm
dead-volume: 1e3 m^3
moving-mass: 1 kg
spring: { rate: 2000 N/m }
force: "-(40 N) * t / (1 s)"
friction: { static: 10 N, sliding: 5 N }`), true);
    run(s, 2, 'implicit');
    const sticks = s.log.filter((l) => l.includes('sticks')).length;
    const starts = s.log.filter((l) => l.includes('starts to move')).length;
    expect(sticks).toBeGreaterThan(3);
    expect(starts - sticks).toBeLessThanOrEqual(1);
    expect(s.log.length).toBeLessThan(40);
  });
});
