/** `--vary` syntax, the study layout and the cases it makes. */
import { describe, expect, it } from 'vitest';
import { caseSpec, parseVary, planStudy, preflightSpecs, readScalar, type StudyPlan, type VarySpec } from '../../src/studies/sweep-spec.js';
import { shardIndices } from '../../src/studies/sweep.js';
import { readWithOverrides } from '../../src/netlist/override.js';

function vary(arg: string): VarySpec {
  const r = parseVary(arg);
  if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('; '));
  return r.value;
}

function plan(args: string[], samples?: number, seed?: number): StudyPlan {
  const r = planStudy(args.map(vary), { samples, seed });
  if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('; '));
  return r.value;
}

describe('parseVary', () => {
  it('reads a list with units, keeping the text and giving SI values', () => {
    const v = vary('chambers.cell_a.thickness=1.2mm,1.5 mm,0.18 cm');
    expect(v.kind).toBe('list');
    expect(v.values).toEqual(['1.2mm', '1.5 mm', '0.18 cm']);
    expect(v.si?.map((x) => Number((x as number).toPrecision(12)))).toEqual([0.0012, 0.0015, 0.0018]);
    expect(v.siLabel).toBe('m');
  });

  it('reads a range FROM:TO:N with both ends, in the unit of FROM', () => {
    const v = vary('lines.crossover.diameter=1 mm:2 mm:5');
    expect(v.values).toEqual(['1 mm', '1.25 mm', '1.5 mm', '1.75 mm', '2 mm']);
    const p = vary('reservoirs.supply.pressure=100 kPa gauge:3 bar gauge:3');
    expect(p.values).toEqual(['100 kPa gauge', '200 kPa gauge', '300 kPa gauge']);
    expect(p.siLabel).toBe('Pa gauge');
  });

  it('reads normal, uniform and tolerance distributions', () => {
    const n = vary('a.b=normal(1.5 mm, 50 um)').dist;
    expect(n).toMatchObject({ kind: 'normal', a: 1.5 });
    expect(n?.b).toBeCloseTo(0.05, 14);
    expect(vary('a.b=uniform(1.4 mm, 1.6 mm)').dist).toMatchObject({ kind: 'uniform', a: 1.4, b: 1.6 });
    const t = vary('a.b=1.5 mm±3%');
    expect(t.kind).toBe('tolerance');
    expect(t.dist?.a).toBeCloseTo(1.455, 12);
    expect(t.dist?.b).toBeCloseTo(1.545, 12);
    const abs = vary('a.b=20 kPa gauge+-1 kPa');
    expect(abs.dist).toMatchObject({ kind: 'uniform', a: 19, b: 21 });
    expect(abs.siLabel).toBe('Pa gauge');
    // a percentage-point tolerance on a fraction
    expect(vary('a.b=40%±0.05').dist).toMatchObject({ a: 35, b: 45 });
  });

  it('keeps the ANR of a standard volume flow, and the netlist reads the drawn value', () => {
    const p = plan(['feeds.pump.rate=10 L/min ANR±10%'], 3, 1);
    const c = caseSpec(p, 0).params[0];
    expect(c.text).toMatch(/^[\d.]+ L \/ min ANR$/);
    expect(c.si as number).toBeGreaterThan(0.9 * 10 / 60000);
    expect(p.vary[0].siLabel).toBe('m^3/s ANR');
    const netlist = 'format: 1\nchambers:\n  tank: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }\nfeeds:\n  pump: { into: tank, rate: 10 L/min ANR }\nsimulate: { duration: 1 s }\n';
    const doc = readWithOverrides(netlist, 'feed.yaml', [{ path: ['feeds', 'pump', 'rate'], value: c.text, label: c.text }]);
    expect(doc.ok).toBe(true);
    if (doc.ok) expect(doc.value.feeds[0].rate).toEqual({ kind: 'anr', value: expect.closeTo(c.si as number, 15) });
  });

  it('keeps text values (`open`, `adiabatic`) for the reader to judge', () => {
    const v = vary('heat=isothermal,adiabatic');
    expect(v.values).toEqual(['isothermal', 'adiabatic']);
    expect(v.si).toEqual([null, null]);
    expect(v.siLabel).toBeUndefined();
  });

  it('refuses what it cannot read, with a hint', () => {
    const bad = ['nopath', 'a.b=', 'a.b=1 mm:2 kPa:3', 'a.b=1 mm:2 mm:0', 'a.b=normal(1 mm)', 'a.b=normal(1 mm, -1 mm)', 'a.b=uniform(2 mm, 1 mm)', 'a.b=1 mm,2 kPa', 'a.b=uniform(1 kPa gauge, 2 kPa abs)', 'a.b=1 mm±2 kPa'];
    for (const arg of bad) {
      const r = parseVary(arg);
      expect(r.ok, arg).toBe(false);
      if (!r.ok) expect(r.diagnostics[0].hint, arg).toBeTruthy();
    }
  });

  it('readScalar converts °C with its offset', () => {
    const r = readScalar('20 degC');
    expect(r.ok && r.value.si).toBeCloseTo(293.15, 10);
  });
});

describe('planStudy and caseSpec', () => {
  it('lays out the grid with the first --vary slowest', () => {
    const p = plan(['a.x=1,2', 'a.y=10 mm,20 mm,30 mm']);
    expect(p.cases).toBe(6);
    const texts = Array.from({ length: 6 }, (_, k) => caseSpec(p, k).params.map((q) => q.text).join(' '));
    expect(texts).toEqual(['1 10 mm', '1 20 mm', '1 30 mm', '2 10 mm', '2 20 mm', '2 30 mm']);
  });

  it('repeats each grid point for the random draws, which depend only on (seed, case)', () => {
    const p = plan(['a.x=1,2', 'a.t=1.5 mm±3%'], 4, 9);
    expect(p.cases).toBe(8);
    const cases = Array.from({ length: 8 }, (_, k) => caseSpec(p, k));
    expect(cases.map((c) => c.group)).toEqual([0, 0, 0, 0, 1, 1, 1, 1]);
    for (const c of cases) {
      const t = c.params[1].si as number;
      expect(t).toBeGreaterThanOrEqual(0.001455);
      expect(t).toBeLessThanOrEqual(0.001545);
    }
    // the draws of case 5 are the same whether computed alone or in sequence
    expect(caseSpec(plan(['a.x=1,2', 'a.t=1.5 mm±3%'], 4, 9), 5)).toEqual(cases[5]);
    // another seed draws differently
    expect(caseSpec(plan(['a.x=1,2', 'a.t=1.5 mm±3%'], 4, 10), 5).params[1].text).not.toBe(cases[5].params[1].text);
  });

  it('a normal draw has the given mean and spread (2000 cases, within 5 standard errors)', () => {
    const p = plan(['a.t=normal(1.5 mm, 0.05 mm)'], 2000, 3);
    const xs = Array.from({ length: 2000 }, (_, k) => caseSpec(p, k).params[0].si as number);
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    const sd = Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / (xs.length - 1));
    expect(Math.abs(mean - 0.0015)).toBeLessThan((5 * 0.00005) / Math.sqrt(2000));
    expect(Math.abs(sd / 0.00005 - 1)).toBeLessThan(5 / Math.sqrt(2 * 2000));
    // the netlist text round-trips to the SI value
    const c = caseSpec(p, 7).params[0];
    const back = readScalar(c.text);
    expect(back.ok && back.value.si).toBeCloseTo(c.si as number, 15);
  });

  it('needs --samples for random parameters and refuses it without them; refuses a path twice', () => {
    expect(planStudy([vary('a.t=1.5 mm±3%')], {}).ok).toBe(false);
    expect(planStudy([vary('a.t=1 mm,2 mm')], { samples: 5 }).ok).toBe(false);
    expect(planStudy([vary('a.t=1 mm'), vary('a.t=2 mm')], {}).ok).toBe(false);
  });

  it('preflight checks every grid value once and the ends of uniform ranges', () => {
    const p = plan(['a.x=1,2,3', 'a.t=uniform(1 mm, 2 mm)'], 5);
    const checks = preflightSpecs(p).map((c) => c.map((q) => q.text).join(' '));
    expect(checks).toEqual(['1 1.5 mm', '2 1.5 mm', '3 1.5 mm', '1 1 mm', '1 2 mm']);
  });
});

describe('shardIndices', () => {
  it('shards K/N take k mod N = K − 1, and together cover every case once', () => {
    expect(shardIndices(10, { index: 2, count: 3 })).toEqual([1, 4, 7]);
    const all = [1, 2, 3].flatMap((k) => shardIndices(10, { index: k, count: 3 })).sort((a, b) => a - b);
    expect(all).toEqual(Array.from({ length: 10 }, (_, k) => k));
    expect(shardIndices(2, { index: 4, count: 4 })).toEqual([]);
  });
});
