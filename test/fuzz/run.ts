/**
 * `npm run fuzz`: the robustness properties of test/fuzz/properties.ts, run long with a fresh
 * seed. Options (environment): FUZZ_RUNS (valid networks, default 300; mutants get ten times
 * as many), FUZZ_SEED (repeat a run), FUZZ_ONLY=valid|mutants. Prints the seed, what happened,
 * and on failure the smallest netlist that fails; exits 1 then.
 */
import fc from 'fast-check';
import { mutantsAreHandled, newTally, validNetworksRun, type Tally } from './properties.js';

const runs = Number(process.env.FUZZ_RUNS ?? 300);
const seed = Number(process.env.FUZZ_SEED ?? Math.floor(Math.random() * 2 ** 31));
const only = process.env.FUZZ_ONLY;

function report(name: string, tally: Tally, ms: number): void {
  const causes = Object.entries(tally.causes).map(([k, v]) => `${k} ${v}`).join(', ') || 'none';
  process.stdout.write(`${name}: ${tally.accepted} accepted, ${tally.rejected} rejected with diagnostics; runs completed ${tally.completed}, stopped early ${tally.failed} (${causes}); ${(ms / 1000).toFixed(1)} s\n`);
}

let failed = false;
process.stdout.write(`fuzz: seed ${seed} (repeat with FUZZ_SEED=${seed})\n`);
const jobs: [string, string, number, (t: Tally) => fc.IProperty<never>][] = [
  ['valid', 'valid networks', runs, validNetworksRun as (t: Tally) => fc.IProperty<never>],
  ['mutants', 'mutated netlists', runs * 10, mutantsAreHandled as (t: Tally) => fc.IProperty<never>],
];
if (only && !jobs.some(([key]) => key === only)) {
  process.stderr.write(`fuzz: FUZZ_ONLY must be valid or mutants, not ${only}\n`);
  process.exit(2);
}
for (const [key, name, numRuns, property] of jobs) {
  if (only && key !== only) continue;
  const tally = newTally();
  const started = Date.now();
  const out = fc.check(property(tally), { numRuns, seed });
  report(name, tally, Date.now() - started);
  if (out.failed) {
    failed = true;
    process.stdout.write(`${name}: FAILED after ${out.numRuns} runs\n${fc.defaultReportMessage(out) ?? ''}\n`);
  }
}
process.exit(failed ? 1 : 0);
