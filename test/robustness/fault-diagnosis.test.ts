/**
 * diagnoseFault on its own: the cases that no short netlist provokes reliably (a singular
 * iteration matrix, a chattering valve) and the order of its checks.
 */
import { describe, expect, it } from 'vitest';
import { diagnoseFault } from '../../src/transient/fault.js';
import { NetworkSystem } from '../../src/assemble/system.js';
import { modelFromText } from '../helpers.js';

const RIG = `format: 1
chambers:
  pocket: { wall: rigid, volume: 1 mL, start: { pressure: 300 kPa gauge } }
  tank: { wall: rigid, volume: 5 L, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: "300 kPa + 20 kPa * sin(2*pi*t/(1 s)) gauge" }
lines:
  short: { from: pocket, to: tank, diameter: 4 mm, length: 5 mm }
  feedline: { from: supply, to: pocket, diameter: 1 mm, length: 2 m }
valves:
  check: { from: tank, to: ambient, orifice: 1 mm, discharge-coefficient: 0.7, check: { cracking: 10 kPa } }
simulate: { duration: 1 s }
`;

function setup(): { sys: NetworkSystem; model: ReturnType<typeof modelFromText>; y: Float64Array } {
  const model = modelFromText(RIG);
  const sys = new NetworkSystem(model);
  return { sys, model, y: sys.initialState() };
}

/** Work counts of a run that took `steps` ordinary steps (about ten right-hand sides each). */
const work = (steps: number): { steps: number; rejected: number; rhs: number } => ({ steps, rejected: 0, rhs: 10 * steps });

describe('diagnoseFault', () => {
  it('a singular iteration matrix names the fastest element: the short line at the small chamber', () => {
    const { sys, model, y } = setup();
    const f = diagnoseFault(sys, model, 'singular', 0.1, y, null, work(100), 'rodas');
    expect(f).toMatchObject({ element: 'short', kind: 'line', cause: 'singular', t: 0.1 });
    expect(f.likely).toContain('chamber `pocket`');
    expect(f.likely).toMatch(/time constant of about [0-9.e-]+ s/);
  });

  it('a valve that switched hundreds of times is named as chattering, before anything else', () => {
    const { sys, model, y } = setup();
    for (let k = 0; k < 250; k++) sys.log.push({ t: k * 1e-4, what: 'check valve check opens', kind: 'check', element: 'check' });
    const f = diagnoseFault(sys, model, 'step-too-small', 0.025, y, null, work(5000), 'rodas');
    expect(f).toMatchObject({ element: 'check', kind: 'valve' });
    expect(f.likely).toContain('chattering');
  });

  it('a budget names the fastest element only when it is what keeps the steps short', () => {
    const { sys, model, y } = setup();
    const tau = Number(/time constant of about ([0-9.e+-]+) s/.exec(diagnoseFault(sys, model, 'singular', 0, y, null, work(1), 'rodas').likely)![1]);
    expect(tau).toBeGreaterThan(0);
    // implicit steps 10⁴ times longer than the short line's time constant: it is not what limits them
    const long = diagnoseFault(sys, model, 'budget-steps', 0.5, y, null, work(Math.round(0.5 / (1e4 * tau))), 'rodas');
    expect(long).toMatchObject({ element: null, cause: 'budget-steps' });
    expect(long.likely).toContain('raise `max-steps`');
    expect(long.likely).toContain('about 2 times the budget');
    // implicit steps as short as that time constant: it is
    const busy = diagnoseFault(sys, model, 'budget-steps', 0.5, y, null, work(Math.round(0.5 / tau)), 'rodas');
    expect(busy).toMatchObject({ element: 'short', kind: 'line' });
    expect(busy.likely).not.toContain('implicit');
    // explicit steps longer than it: stability still ties them to it
    const explicit = diagnoseFault(sys, model, 'budget-steps', 0.5, y, null, work(Math.round(0.5 / (10 * tau))), 'odex');
    expect(explicit).toMatchObject({ element: 'short', kind: 'line' });
    expect(explicit.likely).toContain('use `method: implicit`');
  });

  it('an integrator that spends its budget on right-hand sides without steps is called stuck', () => {
    const { sys, model, y } = setup();
    const f = diagnoseFault(sys, model, 'budget-steps', 0.004, y, null, { steps: 6, rejected: 0, rhs: 1_000_068 }, 'odex');
    expect(f).toMatchObject({ element: null, cause: 'budget-steps' });
    expect(f.likely).toContain('accepted only 6 steps');
    expect(f.likely).toContain('use `method: implicit` or `auto`');
  });

  it('an interrupted run names no element', () => {
    const { sys, model, y } = setup();
    expect(diagnoseFault(sys, model, 'interrupted', 0.2, y, 'tank', work(10), 'rodas')).toEqual({ element: null, kind: null, t: 0.2, cause: 'interrupted', likely: 'stopped by the user' });
  });
});
