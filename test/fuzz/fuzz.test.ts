/**
 * Property-based robustness tests (fast-check), a moderate number of runs with a fixed seed so
 * that the suite stays quick and repeatable. `npm run fuzz` runs the same properties much
 * longer with fresh seeds (test/fuzz/run.ts). FUZZ_SEED and FUZZ_RUNS override both here.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { mutate, validNetlist } from './arbitraries.js';
import { load, mutantsAreHandled, newTally, validNetworksRun } from './properties.js';

const SEED = Number(process.env.FUZZ_SEED ?? 20240611);
const RUNS = process.env.FUZZ_RUNS ? Number(process.env.FUZZ_RUNS) : undefined;

describe('property: random valid networks', () => {
  it('read, build and simulate without throwing; completed runs conserve mass to 1e-9', () => {
    const tally = newTally();
    fc.assert(validNetworksRun(tally), { numRuns: RUNS ?? 20, seed: SEED });
    expect(tally.accepted).toBe(RUNS ?? 20);
    expect(tally.completed).toBeGreaterThan(0);
  });
});

describe('property: mutations of valid netlists', () => {
  it('give diagnostics with code, position and hint, or a run; never an exception', () => {
    const tally = newTally();
    fc.assert(mutantsAreHandled(tally), { numRuns: RUNS ?? 150, seed: SEED });
    expect(tally.rejected).toBeGreaterThan(0);
  });
});

describe('the generators', () => {
  it('make valid netlists covering every wall law, and mutations that change them', () => {
    const samples = fc.sample(validNetlist, { numRuns: 60, seed: SEED });
    const text = samples.map((s) => s.text).join('\n');
    for (const law of ['rigid', 'linear', 'neo-hookean', 'mooney-rivlin', 'gent', 'measured']) expect(text).toContain(`wall: ${law}`);
    for (const s of samples.slice(0, 10)) expect(load(s.text).ok).toBe(true);
    const m = mutate(samples[0].text, { op: 'swap-unit', at: 0, unit: 4 });
    expect(m).not.toBe(samples[0].text);
  });
});
