/**
 * Informational events never stall time (docs/robustness.md, "Events"): an event that only
 * logs (an extremum passed, a limit exceeded) neither restarts nor shortens the integrator's
 * step, the same crossing is logged once, and one that fires more than 20 times within 1e-3 of
 * the duration is reported as chatter of its element instead of logged each time. Bounded by
 * counts (integrator calls, firings, steps), not by time.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { drive, type EventChatter, type EventfulProblem } from '../../src/solve/driver.js';
import type { Integrator } from '../../src/solve/types.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import { modelFromText, runChecked } from '../helpers.js';

/** y' = 1 with one log-only event g = sin(2π f t): a crossing every 1/(2f) s. */
function hovering(f: number): EventfulProblem & { fired: number[] } {
  const fired: number[] = [];
  return {
    n: 1, rtol: 1e-8, atol: new Float64Array([1e-12]),
    rhs(_t, _y, d) { d[0] = 1; },
    breakpoints: [], atBreakpoint() {},
    nEvents: 1,
    eventValues(t, _y, out) { out[0] = Math.sin(2 * Math.PI * f * t); },
    eventDirection() { return 0; },
    eventLogsOnly() { return true; },
    fireEvent(_k, t) { fired.push(t); return false; },
    fired,
  };
}

/** The integrator, counting how often the driver (re)starts it. */
function counted(): { integrator: Integrator; calls: () => number } {
  let calls = 0;
  return { integrator: (...a) => { calls++; return rosenbrock(...a); }, calls: () => calls };
}

describe('log-only events', () => {
  it('never restart the integrator: one call for the whole run, every crossing found', () => {
    const p = hovering(20); // crossings at k/40 s, at most one in a step of 13 ms
    const c = counted();
    const r = drive(p, { integrator: c.integrator, t0: 0, tEnd: 1, y0: new Float64Array([0]), sample: 0.1, hMax: 0.013, observe() {} });
    expect(r.status).toBe('completed');
    expect(c.calls()).toBe(1);
    expect(p.fired).toHaveLength(39);
    p.fired.forEach((t, i) => expect(t).toBeCloseTo((i + 1) / 40, 9));
  });

  it('a chattering one is logged 20 times a burst and reported as chatter with the rest counted', () => {
    const p = hovering(4e5); // 40 000 crossings in 50 ms, 40 within each 1e-3 of the duration
    const chatter: EventChatter[] = [];
    const r = drive(p, { integrator: rosenbrock, t0: 0, tEnd: 0.05, y0: new Float64Array([0]), sample: 0.01, hMax: 1e-6, observe() {}, onChatter: (x) => chatter.push(x) });
    expect(r.status).toBe('completed');
    // about 1 000 bursts, 20 logged in each and the rest counted
    const counted = chatter.reduce((s, x) => s + x.count, 0);
    expect(chatter.length).toBeGreaterThanOrEqual(900);
    expect(p.fired.length).toBeLessThanOrEqual(20 * (chatter.length + 1));
    expect(p.fired.length + counted).toBeGreaterThanOrEqual(39_000);
    for (const x of chatter) expect(x.to).toBeGreaterThan(x.from);
  });
});

describe('networks', () => {
  const base = readFileSync('networks/manifold-mixed.yaml', 'utf8');

  it('a thin Mooney–Rivlin pod (0.1 mm) no longer stalls at its pressure minimum', () => {
    // it logged "passes its pressure minimum" 64 400 times in 0.48 s and ran into any budget
    const text = base.replace(/(pod:[\s\S]*?thickness:) 1 mm/, '$1 0.1 mm').replace('simulate: {', 'simulate: { max-steps: 20000,');
    expect(text).toContain('thickness: 0.1 mm');
    const r = runChecked(modelFromText(text, 'thin-pod.yaml'));
    expect(r.status).toBe('completed');
    expect(r.stats.steps).toBeLessThan(2000);
    expect(r.events.length).toBeLessThan(20);
  });

  it('fires each crossing once: the gripper passes its pressure maximum once with the implicit method', () => {
    // with the implicit method at the default tolerance the crossing was logged twice, 1 ms
    // apart: the event function re-read on the dense output at the root fell a few 1e-21 short
    // of it, and the next step crossed "again"
    const text = readFileSync('networks/gripper-charge.yaml', 'utf8').replace(/simulate: \{[^}]*\}/, 'simulate: { duration: 1.5 s, sample: 1 ms, method: implicit }');
    const r = runChecked(modelFromText(text, 'gripper-implicit.yaml'));
    const maxima = r.events.filter((e) => /finger passes its pressure maximum/.test(e.what));
    expect(maxima).toHaveLength(1);
  });
});
