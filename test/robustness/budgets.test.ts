/**
 * Budgets bound the whole run (docs/robustness.md, "Limits"): what plenum does after a budget
 * stops the integrator (fault diagnosis, summaries, outputs) is linear in the network's size.
 * Counted in right-hand-side evaluations, not timed: the diagnosis of a 40 000-chamber chain
 * used one full evaluation per chamber, 9 minutes after a wall-time budget of 2 s.
 */
import { describe, expect, it } from 'vitest';
import { NetworkSystem } from '../../src/assemble/system.js';
import { diagnoseFault } from '../../src/transient/fault.js';
import { chainNetlist, starNetlist } from '../../bench/networks.js';
import { modelFromText } from '../helpers.js';

function countedRhs(sys: NetworkSystem): () => number {
  let n = 0;
  const rhs = sys.rhs.bind(sys);
  sys.rhs = (t, y, f) => { n++; rhs(t, y, f); };
  return () => n;
}

describe('fault diagnosis after a budget', () => {
  it.each([
    ['a 2 000-chamber chain', chainNetlist(2000)],
    ['a 500-chamber star', starNetlist(500)],
  ])('%s: a handful of evaluations, not one per chamber', (_name, text) => {
    const model = modelFromText(text);
    const sys = new NetworkSystem(model);
    const y = sys.initialState();
    const calls = countedRhs(sys);
    const fault = diagnoseFault(sys, model, 'budget-wall', 1e-3, y, null, { steps: 10, rejected: 0, rhs: 100 }, 'rodas');
    expect(calls()).toBeLessThanOrEqual(8);
    expect(fault.cause).toBe('budget-wall');
    expect(fault.likely).toContain('raise `max-wall`');
  });

  it('still names the fastest element: the shortest line at the smallest chamber', () => {
    // a chain with one line 1000 times shorter than the rest: the stiffest part of the network
    const text = chainNetlist(200).replace('l57: { from: c57, to: c58, diameter: 2 mm, length: 100 mm }', 'l57: { from: c57, to: c58, diameter: 2 mm, length: 0.1 mm }');
    expect(text).toContain('length: 0.1 mm');
    const model = modelFromText(text);
    const sys = new NetworkSystem(model);
    const fault = diagnoseFault(sys, model, 'step-too-small', 1e-3, sys.initialState(), null, { steps: 10, rejected: 0, rhs: 100 }, 'rodas');
    expect(fault.element).toBe('l57');
    expect(fault.kind).toBe('line');
  });
});
