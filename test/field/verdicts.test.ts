/**
 * Verdicts that mean what they say: the run's outcome and `settles:` share one definition of
 * "settled" (a band relative to each quantity's own excursion, with an absolute floor), and an
 * oscillation is judged on swings above the integrator's resolution.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitJson, fitText, fitWall, measuredSnippet, readBenchCsv, runSweep, summariseCases, sweepJson, sweepSummaryText } from '../../src/index.js';
import { classifyOutcomes } from '../../src/transient/outcome.js';
import type { Trace } from '../../src/transient/results.js';
import { modelFromText, runChecked } from '../helpers.js';

const PA = 101325;

/** Two 1 L rigid tanks at `pa` and `pb` kPa gauge joined by a line; `rest` ends the netlist. */
function tanks(pa: number, pb: number, rest: string): string {
  return `
format: 1
chambers:
  a: { wall: rigid, volume: 1 L, start: { pressure: ${pa} kPa gauge } }
  b: { wall: rigid, volume: 1 L, start: { pressure: ${pb} kPa gauge } }
lines:
  j: { from: a, to: b, diameter: 1 mm, length: 1 m }
${rest}`;
}

describe('outcome: round-off is not an oscillation (item 11)', () => {
  const model = modelFromText(tanks(5, 5, 'simulate: { duration: 20 s, sample: 10 ms, tolerance: 1e-6 }\n'));
  /** a decays slowly towards its end; b sits still apart from a wiggle of `amp` Pa, period 5 s. */
  function trace(amp: number): Trace {
    const times: number[] = [];
    for (let k = 0; k <= 2000; k++) times.push(k * 0.01);
    const a = times.map((t) => PA + 5000 * Math.exp(-t / 20));
    const b = times.map((t) => PA + 5000 + amp * Math.sin((2 * Math.PI * t) / 5));
    const v = times.map(() => 1e-3);
    return {
      channels: [{ key: 'a.pressure', unit: 'Pa' }, { key: 'a.volume', unit: 'm^3' }, { key: 'b.pressure', unit: 'Pa' }, { key: 'b.volume', unit: 'm^3' }],
      times, values: [a, v, b, v.slice()],
    };
  }

  it('a chamber wiggling by 5e-6 Pa (far below the tolerance of 1e-6 × 106 kPa) leaves the group "still moving"', () => {
    const [o] = classifyOutcomes(model, trace(5e-6), []);
    expect(o?.outcome).toBe('moving');
    expect(o?.evidence).toContain('a.pressure');
  });

  it('a swing of 50 Pa, well above the resolution, is still an oscillation with its period', () => {
    const [o] = classifyOutcomes(model, trace(50), []);
    expect(o?.outcome).toBe('oscillating');
    expect(o?.period).toBeGreaterThan(4);
    expect(o?.period).toBeLessThan(6);
  });
});

describe('settles: relative to the excursion, with a floor, as the outcome judges it (item 12)', () => {
  // two equal rigid tanks at 10 and 0 kPa gauge equalise at 5 kPa gauge
  const net = (checks: string): string => tanks(10, 0, `simulate: { duration: 30 s, sample: 10 ms, tolerance: 1e-8 }\nexpect:\n${checks}\n`);

  it('two tanks going from 10 and 0 kPa gauge to 5 kPa gauge do not "settle within 5 %" from t = 0', () => {
    const r = runChecked(modelFromText(net('  - { name: at once, settles: { within: 0 s, band: 5% } }')));
    const e = r.expectations[0]!;
    expect(e.passed).toBe(false);
    // at t = 0 each tank is its whole excursion (5 kPa) away from its final value
    expect(e.actual).toBeCloseTo(1, 6);
    expect(e.message).toMatch(/^[ab]\.pressure is 100 % of its excursion \(4\.99\d kPa\) away from its final value 106\.3 kPa abs at t = 0 s/);
  });

  it('the old meaning survives under a name that says it: `relative-to: final-value` passes from t = 0', () => {
    const r = runChecked(modelFromText(net('  - { name: loose, settles: { within: 0 s, band: 5%, relative-to: final-value } }')));
    const e = r.expectations[0]!;
    expect(e.passed).toBe(true);
    expect(e.actual).toBeCloseTo(5000 / (PA + 5000), 4);
  });

  it('the settling time the outcome reports is where a settles check of the same 2 % band starts to pass', () => {
    const probe = runChecked(modelFromText(net('  - { name: never, settles: { within: 30 s, band: 100% } }')));
    const o = probe.outcomes?.[0];
    expect(o?.outcome).toBe('settled');
    const ts = o?.settling_time ?? Number.NaN;
    expect(ts).toBeGreaterThan(1);
    expect(ts).toBeLessThan(29);
    const r = runChecked(modelFromText(net(`  - { name: after, settles: { within: ${ts} s, band: 2% } }\n  - { name: before, settles: { within: ${(0.9 * ts).toPrecision(6)} s, band: 2% } }`)));
    expect(r.expectations[0]?.passed).toBe(true);
    expect(r.expectations[1]?.passed).toBe(false);
  });
});

describe('sweeps: intervals only for random draws; values with units (items 15 and 17)', () => {
  const source = readFileSync('networks/cushion-settle.yaml', 'utf8');

  it('a deterministic grid reports exact shares without Wilson intervals; a Monte Carlo study keeps them', async () => {
    const grid = await runSweep({ source, file: 'cushion-settle.yaml', vary: ['chambers.cell_a.thickness=1.4 mm,1.5 mm,1.6 mm'], jobs: 1 });
    if (!grid.ok) throw new Error(grid.diagnostics.map((d) => d.message).join('\n'));
    const status = summariseCases(grid.value.study, grid.value.cases).categorical.find((c) => c.key === 'status');
    expect(status?.values[0]).toMatchObject({ value: 'completed', count: 3, n: 3, p: 1, low: null, high: null });
    const text = sweepSummaryText(grid.value);
    expect(text).not.toMatch(/\[\d/);
    expect(text).toContain('deterministic grid');
    expect(JSON.parse(sweepJson(grid.value)).summary.categorical[0].values[0].low).toBeNull();

    const mc = await runSweep({ source, file: 'cushion-settle.yaml', vary: ['chambers.cell_a.thickness=1.5 mm±2%'], samples: 3, seed: 4, jobs: 1 });
    if (!mc.ok) throw new Error(mc.diagnostics.map((d) => d.message).join('\n'));
    expect(sweepSummaryText(mc.value)).toMatch(/100(\.0)? %\s+\[43\.\d %, 100(\.0)? %\]\s+\(3 of 3\)/);
  }, 120_000);

  it('`--vary lines.crossover.diameter=2,3` is refused: a bare number would mean 2 m', async () => {
    const r = await runSweep({ source, file: 'cushion-settle.yaml', vary: ['lines.crossover.diameter=2,3'], jobs: 1 });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.diagnostics[0]?.code).toBe('vary-unit');
    expect(r.diagnostics[0]?.message).toContain('2 m, 3 m');
    expect(r.diagnostics[0]?.hint).toContain('2 mm,3 mm');
  });

  it('messages show rounded values with units (the override, the volume of the problem)', async () => {
    const r = await runSweep({ source, file: 'cushion-settle.yaml', vary: ['lines.crossover.diameter=2 m'], jobs: 1 });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const m = r.diagnostics[0]?.message ?? '';
    expect(m).toMatch(/near \d+(\.\d)? mL\)/);
    expect(m).toContain('(with lines.crossover.diameter = 2 m)');
  });

  it('`plenum trace` summaries carry the unit of the varied parameter everywhere', () => {
    const r = spawnSync(process.execPath, ['bin/plenum', 'trace', 'networks/cushion-runaway.yaml', '--vary', 'mass:cell_a', '--from', '1 g', '--to', '4 g'], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain('reached mass:cell_a = 1 g');
    expect(r.stdout).not.toMatch(/= \d+(\.\d+)?(;|\n)/);
  }, 120_000);
});

describe('fit: a law that cannot describe the data says so; the measured curve keeps its ends (item 16)', () => {
  const FILE = 'networks/data/latex-cell-bench-synthetic.csv';
  const geometry = { radius: 0.04, thickness: 0.0015 };
  function fit(law: 'neo-hookean' | 'gent') {
    const data = readBenchCsv(readFileSync(FILE, 'utf8'), FILE, { radius: geometry.radius, ambient: 101325 });
    if (!data.ok) throw new Error('bench data');
    const r = fitWall(data.value, law, geometry, FILE);
    if (!r.ok) throw new Error('fit');
    return { data: data.value, report: r.value };
  }

  it('a neo-Hookean fit of stiffening (Gent) data warns, names the other laws with their R², and the text and JSON carry it', () => {
    const { report } = fit('neo-hookean');
    expect(report.inflation?.r2).toBeLessThan(0.5);
    const w = report.warnings.find((x) => x.startsWith('inflation:'));
    expect(w).toMatch(/the neo-hookean law does not describe these readings \(R² = /);
    expect(w).toMatch(/gent: R² = 0\.99\d+/);
    expect(w).toContain('mooney-rivlin: R² = ');
    expect(fitText(report)).toContain('WARNING: inflation: the neo-hookean law');
    expect(JSON.parse(fitJson(report)).warnings.length).toBe(2);
  });

  it('the Gent fit of the same data raises no warning', () => {
    expect(fit('gent').report.warnings).toEqual([]);
  });

  it('the measured snippet starts at the first reading and ends at the last', () => {
    const { data, report } = fit('gent');
    const snippet = measuredSnippet(report) ?? '';
    const points = [...snippet.matchAll(/- \[([\d.]+) mL, (-?[\d.]+) kPa\]/g)].map((m) => Number(m[1]));
    const v0 = (4 / 3) * Math.PI * geometry.radius ** 3 * 1e6;
    const up = data.rows.slice(0, report.inflation?.points ?? 0);
    const first = Math.min(...up.map((r) => v0 * r.stretch ** 3));
    const last = Math.max(...up.map((r) => v0 * r.stretch ** 3));
    expect(points[0]).toBeCloseTo(first, 1);
    expect(points.slice(0, 20).some((v) => Math.abs(v - last) < 0.05)).toBe(true);
  });
});
