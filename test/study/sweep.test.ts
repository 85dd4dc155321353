/**
 * Studies through the library: reproducible for a seed, the same in worker threads as in one
 * thread, every case validated like a netlist, and a cushion tolerance study whose outcome
 * probabilities agree with the equilibria and stability analysis (Müller & Strehlow, Rubber and
 * Rubber Balloons, LNP 637, 2004: two balloons past their pressure maximum cannot share gas
 * at equal size).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { runSweep, sweepJson, sweepSummaryText, summariseCases, type SweepResult } from '../../src/index.js';
import { chainNetlist } from '../../bench/networks.js';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { CaseRunner } from '../../src/studies/sweep-case.js';
import { runCases, workerScript } from '../../src/studies/sweep-pool.js';

/** A quick network: a supply tank charging a small neo-Hookean bladder through a tube. */
const QUICK = `format: 1
title: quick charge
chambers:
  supply: { wall: rigid, volume: 0.2 L, start: { pressure: 60 kPa gauge } }
  bladder:
    wall: neo-hookean
    radius: 15 mm
    thickness: 1 mm
    shear-modulus: 0.4 MPa
    start: { pressure: 0 kPa gauge }
lines:
  tube: { from: supply, to: bladder, diameter: 2 mm, length: 0.5 m }
simulate: { duration: 0.5 s, sample: 10 ms, tolerance: 1e-7 }
expect:
  - name: bladder below 32 kPa
    probe: bladder.gauge
    over: [0 s, 0.5 s]
    stat: max
    below: 32 kPa gauge
`;

async function study(opts: Partial<Parameters<typeof runSweep>[0]> & { vary: string[] }, source = QUICK): Promise<SweepResult> {
  const r = await runSweep({ source, file: 'quick.yaml', jobs: 2, ...opts });
  if (!r.ok) throw new Error(r.diagnostics.map((d) => `${d.file}: ${d.message} (${d.hint})`).join('\n'));
  return r.value;
}

function checkMass(r: SweepResult): void {
  for (const c of r.cases) if (c.status === 'completed') expect(Math.abs(c.mass_drift as number), `case ${c.index}`).toBeLessThan(1e-9);
}

describe('runSweep', () => {
  const mc = { vary: ['chambers.bladder.thickness=1 mm±10%', 'lines.tube.diameter=normal(2 mm, 0.1 mm)'], samples: 4, seed: 21 };

  it('is reproducible for a seed, and another seed draws other cases', async () => {
    const a = await study(mc);
    const b = await study(mc);
    expect(sweepJson(b)).toBe(sweepJson(a));
    checkMass(a);
    const c = await study({ ...mc, seed: 22 });
    expect(c.cases[0].params[0].text).not.toBe(a.cases[0].params[0].text);
    expect(c.study.id).not.toBe(a.study.id);
  });

  it('gives the same result in one thread as on worker threads, in case order', async () => {
    const inThread = await study({ ...mc, jobs: 1 });
    const pooled = await study({ ...mc, jobs: 3 });
    expect(sweepJson(pooled)).toBe(sweepJson(inThread));
    expect(pooled.cases.map((c) => c.index)).toEqual([0, 1, 2, 3]);
  });

  it('finds the bundled worker (so the pooled runs above really ran on worker threads)', async () => {
    const url = workerScript();
    expect(url?.pathname).toMatch(/\/dist\/studies\/sweep-worker\.js$/);
    // a pool given a script that is not a worker fails loudly instead of falling back
    const bogus = new URL('../../package.json', import.meta.url);
    await expect(runCases(QUICK, 'quick.yaml', [{ index: 0, group: 0, params: [] }, { index: 1, group: 0, params: [] }], { jobs: 2, worker: bogus })).rejects.toThrow();
  });

  it('a case reports its parameters, status, largest chamber, outcome, expectations and peaks', async () => {
    const r = await study({ vary: ['chambers.supply.start.pressure=40 kPa gauge,80 kPa gauge'] });
    expect(r.cases.length).toBe(2);
    checkMass(r);
    const [low, high] = r.cases;
    expect(low.params[0]).toEqual({ path: 'chambers.supply.start.pressure', text: '40 kPa gauge', si: 40000 });
    expect(low.status).toBe('completed');
    // the rigid 0.2 L supply stays larger than the 14 mL bladder even at stretch 2
    expect(low.largest).toBe('supply');
    expect(low.chambers.supply.volume).toBeGreaterThan(low.chambers.bladder.volume);
    expect(low.outcome).toMatch(/settled|moving/);
    expect(high.chambers.bladder.peak_gauge).toBeGreaterThan(low.chambers.bladder.peak_gauge);
    // more supply pressure fails the expectation on the bladder's peak
    expect(low.expectations[0].passed).toBe(true);
    expect(high.expectations[0].passed).toBe(false);
    const s = summariseCases(r.study, r.cases);
    const all = s.categorical.find((c) => c.key === 'all expectations passed');
    expect(all?.values.map((v) => [v.value, v.count])).toEqual([['no', 1], ['yes', 1]]);
  });

  it('lays grid × random studies out in groups, each with its own summary', async () => {
    const r = await study({ vary: ['lines.tube.diameter=1.5 mm,2.5 mm', 'chambers.bladder.thickness=1 mm±5%'], samples: 3, seed: 4 });
    const j = JSON.parse(sweepJson(r));
    expect(j.groups.length).toBe(2);
    expect(j.groups[1].params).toEqual([{ path: 'lines.tube.diameter', text: '2.5 mm', si: 0.0025 }]);
    expect(j.groups[0].summary.cases).toBe(3);
    // each group's summary is the summary of its own three cases
    expect(j.groups[1].summary).toEqual(JSON.parse(JSON.stringify(summariseCases(r.study, r.cases.slice(3)))));
    expect(r.cases.slice(3).every((c) => c.group === 1 && c.params[0].text === '2.5 mm')).toBe(true);
  });

  it('refuses a misspelt path, naming the closest one, before running anything', async () => {
    const r = await runSweep({ source: QUICK, file: 'quick.yaml', vary: ['chambers.bladdr.thickness=1 mm,2 mm'] });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.diagnostics[0].code).toBe('vary-path');
      expect(r.diagnostics[0].hint).toContain('`bladder`');
    }
  });

  it('checks every grid value like a netlist value, reporting it against the override', async () => {
    const r = await runSweep({ source: QUICK, file: 'quick.yaml', vary: ['chambers.bladder.thickness=1 mm,20 mm'] });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.diagnostics[0].file).toBe('quick.yaml (override chambers.bladder.thickness = 20 mm)');
      expect(r.diagnostics[0].message).toMatch(/smaller than `radius`/);
    }
  });

  it('a random draw that makes the netlist invalid is an `invalid` case, counted among the outcomes', async () => {
    // a wide normal spread reaches negative thicknesses in about 16 % of draws
    const r = await study({ vary: ['chambers.bladder.thickness=normal(1 mm, 1 mm)'], samples: 24, seed: 2 });
    const invalid = r.cases.filter((c) => c.status === 'invalid');
    expect(invalid.length).toBeGreaterThan(0);
    expect(invalid.length).toBeLessThan(24);
    for (const c of invalid) expect(c.message).toMatch(/override chambers\.bladder\.thickness/);
    const status = summariseCases(r.study, r.cases).categorical.find((c) => c.key === 'status');
    expect(status?.values.find((v) => v.value === 'invalid')?.count).toBe(invalid.length);
    checkMass(r);
  });
});

describe('a cushion tolerance study agrees with the equilibria analysis', () => {
  const source = readFileSync('networks/cushion-runaway.yaml', 'utf8');
  // Both cells pre-inflated to the same stretch 1.65, past the pressure maximum at 7^(1/6) =
  // 1.383; each wall's thickness within ±3 % (uniform). The equal-size state is then unstable:
  // the equilibria analysis finds it unstable and finds two stable lopsided states, one cell on
  // each side of the maximum. So the study must never end at equal size; the thinner cell
  // (lower pressure at equal stretch past the maximum) must take the gas and end largest.
  const common = ['chambers.cell_a.start.stretch=1.65', 'chambers.cell_b.start.stretch=1.65', 'simulate.duration=10 s', 'simulate.sample=20 ms'];

  it('past the maximum: every case ends lopsided at a stable equilibrium, the thinner cell largest', async () => {
    const r = await runSweep({ source, file: 'networks/cushion-runaway.yaml', vary: [...common, 'chambers.cell_a.thickness=1.5 mm±3%', 'chambers.cell_b.thickness=1.5 mm±3%'], samples: 10, seed: 5, jobs: 2 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const runner = new CaseRunner(source, 'networks/cushion-runaway.yaml');
    for (const c of r.value.cases) {
      expect(c.status).toBe('completed');
      expect(Math.abs(c.mass_drift as number)).toBeLessThan(1e-9);
      const ta = c.params[4].si as number;
      const tb = c.params[5].si as number;
      expect(c.largest, `case ${c.index}: thickness ${ta} vs ${tb}`).toBe(ta < tb ? 'cell_a' : 'cell_b');
      // the equilibria of this very case: one unstable near-equal state, the end state a stable one
      const m = runner.model(c.params);
      expect(m.ok).toBe(true);
      if (!m.ok) continue;
      const eq = findEquilibria(m.model, { transient: false });
      const unstable = eq.equilibria.filter((e) => !e.stable);
      expect(unstable.length).toBe(1);
      const sa = c.chambers.cell_a.stretch as number;
      const sb = c.chambers.cell_b.stretch as number;
      const match = eq.equilibria.find((e) => Math.abs((e.chambers.cell_a.stretch as number) / sa - 1) < 2e-3 && Math.abs((e.chambers.cell_b.stretch as number) / sb - 1) < 2e-3);
      expect(match?.stable, `case ${c.index} ends at (${sa}, ${sb})`).toBe(true);
      expect(Math.min(sa, sb)).toBeLessThan(1.383);
      expect(Math.max(sa, sb)).toBeGreaterThan(1.383);
    }
    // the probability of ending at equal size: 0 of 10, Wilson upper bound z²/(n + z²) ≈ 0.28
    const largest = summariseCases(r.value.study, r.value.cases).categorical.find((f) => f.key === 'largest');
    expect(largest?.values.some((v) => v.value.includes('='))).toBe(false);
    expect(largest?.values.reduce((s, v) => s + v.count, 0)).toBe(10);
  });

  it('below the maximum (stretch 1.2): the cells end near equal size, as the single stable equilibrium predicts', async () => {
    const below = common.map((v) => v.replace('=1.65', '=1.2'));
    const r = await runSweep({ source, file: 'networks/cushion-runaway.yaml', vary: [...below, 'chambers.cell_a.thickness=1.5 mm±3%', 'chambers.cell_b.thickness=1.5 mm±3%'], samples: 4, seed: 5, jobs: 2 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const runner = new CaseRunner(source, 'networks/cushion-runaway.yaml');
    for (const c of r.value.cases) {
      expect(c.status).toBe('completed');
      const sa = c.chambers.cell_a.stretch as number;
      const sb = c.chambers.cell_b.stretch as number;
      expect(Math.abs(sa / sb - 1)).toBeLessThan(0.05);
      const m = runner.model(c.params);
      if (!m.ok) throw new Error('invalid case');
      const eq = findEquilibria(m.model, { transient: false });
      expect(eq.equilibria.filter((e) => e.stable).length).toBe(1);
      expect(eq.equilibria.every((e) => e.stable)).toBe(true);
    }
  });
});

describe('the terminal summary of a study of a large network', () => {
  it('shows the varied parameter, the 40 outputs that vary most and a count of the rest; ties of many chambers shortened', async () => {
    const source = chainNetlist(60, { duration: '20 ms', sample: '1 ms' });
    const r = await study({ vary: ['lines.l3.diameter=1 mm,3 mm'], jobs: 1 }, source);
    checkMass(r);
    const text = sweepSummaryText(r);
    const lines = text.split('\n');
    const start = lines.findIndex((l) => l.includes('values (completed cases)'));
    const rows = lines.slice(start + 1).filter((l) => /^ {4}\S/.test(l) && !l.includes('more outputs'));
    expect(rows[0]).toContain('lines.l3.diameter [mm]');
    expect(rows.length).toBeLessThanOrEqual(1 + 40 + 1); // the parameter, 40 outputs, the settling time
    const summary = summariseCases(r.study, r.cases);
    const hidden = summary.numeric.length - rows.length;
    expect(hidden).toBeGreaterThan(0);
    expect(text).toContain(`... ${hidden} more outputs, which vary less`);
    // the outputs shown are those with the largest relative spread
    const spread = (f: { sd: number; mean: number }): number => f.sd / Math.max(Math.abs(f.mean), 1e-300);
    const outputs = summary.numeric.filter((f) => f.key !== 'lines.l3.diameter' && f.key !== 'settling_time');
    const cut = [...outputs].sort((a, b) => spread(b) - spread(a))[39];
    for (const f of outputs) if (spread(f) > spread(cut)) expect(text, f.key).toContain(`    ${f.key}`);
    for (const l of lines) expect(l.length).toBeLessThan(140);
  });
});
