/**
 * Wall-law fits recover the parameters of seeded noisy synthetic bench data made from the
 * laws of physics/membrane.ts (Treloar 1975; Ogden 1984; Gent 1996), and their standard errors
 * mean what they say (Seber & Wild, Nonlinear Regression, 1989, §2.1: asymptotic coverage).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitJson, fitWall, chamberSnippet, measuredSnippet, readBenchCsv, splitSegments, type FitLaw, type FitReport } from '../../src/index.js';
import { buildModel } from '../../src/model/build.js';
import { readNetlist } from '../../src/netlist/read.js';
import { membranePressure, type Membrane } from '../../src/physics/membrane.js';
import { EXAMPLE_DEFLATION, EXAMPLE_LAW, exampleBench, syntheticBench } from './synthetic.js';

const r0 = 0.04;
const t0 = 0.0015;
const geometry = { radius: r0, thickness: t0 };
/** A netlist around a chamber snippet; the closed valve keeps the chamber sealed but connected. */
function netlistAround(snippet: string, name: string): string {
  return `format: 1\nchambers:\n${snippet}valves:\n  seal: { from: ${name}, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: closed }\nsimulate: { duration: 1 s }\n`;
}
const AMBIENT = 101325;

function fit(csv: string, law: FitLaw, g = geometry): FitReport {
  const d = readBenchCsv(csv, 'bench.csv', { radius: g.radius, ambient: AMBIENT });
  if (!d.ok) throw new Error(JSON.stringify(d.diagnostics));
  const f = fitWall(d.value, law, g, 'bench.csv');
  if (!f.ok) throw new Error(JSON.stringify(f.diagnostics));
  return f.value;
}

function param(f: FitReport, name: string, kind: 'inflation' | 'deflation' = 'inflation'): { value: number; se: number; low: number; high: number; atBound: boolean } {
  const p = f[kind]?.parameters.find((q) => q.name === name);
  if (!p) throw new Error(`no ${name}`);
  return p;
}

const TRUTH: { law: Membrane; params: Record<string, number> }[] = [
  { law: { kind: 'neo-hookean', r0, t0, mu: 0.35e6 }, params: { 'shear-modulus': 0.35e6 } },
  { law: { kind: 'mooney-rivlin', r0, t0, c1: 0.16e6, c2: 0.015e6 }, params: { c1: 0.16e6, c2: 0.015e6 } },
  { law: { kind: 'gent', r0, t0, mu: 0.4e6, jm: 30 }, params: { 'shear-modulus': 0.4e6, limit: 30 } },
];

describe('plenum fit: parameter recovery', () => {
  for (const { law, params } of TRUTH) {
    // "Within a few percent" is the acceptance criterion; 3 % is that, and 4 standard errors
    // checks the estimate is consistent with its own uncertainty (C2, the smallest parameter,
    // has a relative standard error near 1 % with this noise).
    it(`${law.kind}: recovers ${Object.keys(params).join(', ')} within 3 % from noisy volume–pressure data`, () => {
      const csv = syntheticBench(law, { seed: 3, noise: 150, readings: 60, lambdaMax: 3, size: 'volume' });
      const f = fit(csv, law.kind);
      expect(f.inflation?.converged).toBe(true);
      expect(f.deflation).toBeUndefined();
      for (const [name, truth] of Object.entries(params)) {
        const p = param(f, name);
        expect(Math.abs(p.value / truth - 1), `${name} = ${p.value}, true ${truth}`).toBeLessThan(0.03);
        // the truth lies within a few standard errors
        expect(Math.abs(p.value - truth)).toBeLessThan(4 * p.se);
      }
      expect(f.inflation?.r2).toBeGreaterThan(0.99);
      // the noise level comes back as the residual standard deviation
      expect(f.inflation?.residualSd).toBeGreaterThan(100);
      expect(f.inflation?.residualSd).toBeLessThan(200);
    });
  }

  it('95 % intervals cover the true shear modulus in about 95 % of 60 independent data sets', () => {
    const law: Membrane = { kind: 'neo-hookean', r0, t0, mu: 0.35e6 };
    let covered = 0;
    const n = 60;
    for (let seed = 100; seed < 100 + n; seed++) {
      const p = param(fit(syntheticBench(law, { seed, noise: 300, readings: 25, lambdaMax: 2.5, size: 'stretch' }), 'neo-hookean'), 'shear-modulus');
      if (p.low <= 0.35e6 && 0.35e6 <= p.high) covered++;
    }
    // Binomial(60, 0.95): 57 expected; below 52 has probability < 0.2 %.
    expect(covered).toBeGreaterThanOrEqual(52);
  });

  it('Gent: the 95 % interval of the limit Jm also has about its nominal coverage (40 data sets)', () => {
    const law: Membrane = { kind: 'gent', r0, t0, mu: 0.4e6, jm: 30 };
    let covered = 0;
    for (let seed = 500; seed < 540; seed++) {
      const p = param(fit(syntheticBench(law, { seed, noise: 300, readings: 30, lambdaMax: 3, size: 'volume' }), 'gent'), 'limit');
      if (p.low <= 30 && 30 <= p.high) covered++;
    }
    expect(covered).toBeGreaterThanOrEqual(34); // Binomial(40, 0.95): P(X < 34) ≈ 0.5 %
  });

  it('Mooney–Rivlin with C2 = 0 in truth: C2 comes out near zero (or on its bound) and C1 right', () => {
    const law: Membrane = { kind: 'mooney-rivlin', r0, t0, c1: 0.175e6, c2: 0 };
    const f = fit(syntheticBench(law, { seed: 9, noise: 150, readings: 60, lambdaMax: 3, size: 'volume' }), 'mooney-rivlin');
    const c1 = param(f, 'c1');
    const c2 = param(f, 'c2');
    expect(Math.abs(c1.value / 0.175e6 - 1)).toBeLessThan(0.02);
    expect(c2.value).toBeGreaterThanOrEqual(0);
    expect(c2.value).toBeLessThan(0.01 * c1.value);
  });

  it('Gent fitted to readings without stiffening: the limit is reported as undetermined, μ still right', () => {
    const law: Membrane = { kind: 'neo-hookean', r0, t0, mu: 0.35e6 };
    const f = fit(syntheticBench(law, { seed: 1, noise: 150, readings: 40, lambdaMax: 2, size: 'volume' }), 'gent');
    const mu = param(f, 'shear-modulus');
    expect(Math.abs(mu.value / 0.35e6 - 1)).toBeLessThan(0.02);
    expect(mu.se).toBeGreaterThan(0);
    expect(param(f, 'limit').value).toBeGreaterThan(1e3);
    expect(f.notes.join('\n')).toMatch(/`limit` is not determined/);
  });

  it('separates inflation and deflation (hysteresis) and fits each: μ and 0.85 μ', () => {
    const law: Membrane = { kind: 'neo-hookean', r0, t0, mu: 0.35e6 };
    const f = fit(syntheticBench(law, { seed: 4, noise: 150, readings: 50, lambdaMax: 3, deflation: 0.85, size: 'volume' }), 'neo-hookean');
    expect(f.segments.map((s) => s.kind)).toEqual(['inflation', 'deflation']);
    expect(f.segments[0].readings).toBe(50);
    expect(f.segments[1].readings).toBe(49);
    expect(Math.abs(param(f, 'shear-modulus').value / 0.35e6 - 1)).toBeLessThan(0.02);
    expect(Math.abs(param(f, 'shear-modulus', 'deflation').value / (0.85 * 0.35e6) - 1)).toBeLessThan(0.02);
  });

  it('reads stretch, radius and absolute-pressure columns alike', () => {
    const law: Membrane = { kind: 'neo-hookean', r0, t0, mu: 0.3e6 };
    const lam = [1, 1.2, 1.4, 1.7, 2, 2.4, 2.8];
    const p = lam.map((l) => membranePressure(law, l).dp);
    const byRadius = ['radius [mm],pressure [kPa abs]', ...lam.map((l, i) => `${l * 40},${(p[i] + AMBIENT) / 1000}`)].join('\n');
    const byStretch = ['time [s];stretch [-];gauge [Pa]', ...lam.map((l, i) => `${i};${l};${p[i]}`)].join('\n');
    for (const csv of [byRadius, byStretch]) expect(param(fit(csv, 'neo-hookean'), 'shear-modulus').value).toBeCloseTo(0.3e6, 3);
  });

  it('leaves out readings below the unstretched size (a slack sample) and says so', () => {
    const law: Membrane = { kind: 'neo-hookean', r0, t0, mu: 0.3e6 };
    const lam = [0.8, 0.9, 1, 1.3, 1.6, 2, 2.5];
    const csv = ['stretch [-],gauge [Pa]', ...lam.map((l) => `${l},${l < 1 ? 0 : membranePressure(law, l).dp}`)].join('\n');
    const f = fit(csv, 'neo-hookean');
    expect(f.inflation?.excluded).toBe(2);
    expect(f.notes.join(' ')).toMatch(/2 readings below the unstretched size/);
    expect(param(f, 'shear-modulus').value).toBeCloseTo(0.3e6, 3);
  });
});

describe('plenum fit: outputs', () => {
  const gentCsv = syntheticBench({ kind: 'gent', r0, t0, mu: 0.4e6, jm: 30 }, { seed: 5, noise: 150, readings: 40, lambdaMax: 3, deflation: 0.9, size: 'volume' });

  it('the chamber snippet pasted into a netlist reads, builds, and gives the fitted law', () => {
    const f = fit(gentCsv, 'gent');
    const netlist = netlistAround(chamberSnippet(f), 'sample');
    const doc = readNetlist(netlist, 'snippet.yaml');
    expect(doc.ok, JSON.stringify(!doc.ok && doc.diagnostics)).toBe(true);
    if (!doc.ok) return;
    const m = buildModel(doc.value);
    expect(m.ok).toBe(true);
    if (!m.ok) return;
    const wall = m.value.chambers[0].wall;
    const mu = param(f, 'shear-modulus').value;
    const jm = param(f, 'limit').value;
    const V = wall.volumeAtStretch(2.2);
    const out = { p: 0, dpdV: 0 };
    wall.eval(V, out);
    // the snippet rounds to about a tenth of a standard error
    expect(out.p / membranePressure({ kind: 'gent', r0, t0, mu, jm }, 2.2).dp - 1).toBeLessThan(1e-3);
  });

  it('the measured snippet (both curves) reads and builds as a wall with hysteresis', () => {
    const f = fit(gentCsv, 'gent');
    const snippet = measuredSnippet(f) as string;
    expect(snippet).toContain('deflation:');
    const doc = readNetlist(netlistAround(snippet, 'sample_measured'), 'measured.yaml');
    expect(doc.ok, JSON.stringify(!doc.ok && doc.diagnostics)).toBe(true);
    if (!doc.ok) return;
    const m = buildModel(doc.value);
    expect(m.ok).toBe(true);
    if (m.ok) expect(m.value.chambers[0].deflation).toBeDefined();
  });

  it('JSON names parameters as the netlist does, in SI, with errors, intervals and residuals', () => {
    const j = JSON.parse(fitJson(fit(gentCsv, 'gent')));
    expect(j.wall).toBe('gent');
    expect(Object.keys(j.parameters)).toEqual(['shear-modulus', 'limit']);
    expect(j.parameters['shear-modulus']).toBeGreaterThan(1e5);
    expect(j.confidence_95.limit[0]).toBeLessThan(j.parameters.limit);
    expect(j.confidence_95.limit[1]).toBeGreaterThan(j.parameters.limit);
    expect(j.standard_errors['shear-modulus']).toBeGreaterThan(0);
    expect(j.residuals.length).toBe(j.fit.readings);
    expect(j.deflation.parameters.limit).toBeGreaterThan(0);
    expect(j.snippet).toContain('shear-modulus:');
  });
});

describe('plenum fit: bench data problems', () => {
  const read = (csv: string) => readBenchCsv(csv, 'bench.csv', { radius: r0, ambient: AMBIENT });

  it('a bad number is reported with its line and column', () => {
    const r = read('# comment\nvolume [mL],gauge [kPa]\n300,1\n400,abc\n500,2\n');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.diagnostics[0].line).toBe(4);
    expect(r.diagnostics[0].column).toBe(5);
    expect(r.diagnostics[0].message).toContain('abc');
  });

  it('a pressure column must say gauge or absolute; a volume needs a unit; units must fit', () => {
    const noRef = read('volume [mL],pressure [kPa]\n300,1\n');
    expect(!noRef.ok && noRef.diagnostics[0].hint).toMatch(/gauge/);
    const noUnit = read('volume,gauge [kPa]\n300,1\n');
    expect(!noUnit.ok && noUnit.diagnostics[0].message).toMatch(/no unit/);
    const wrong = read('volume [kPa],gauge [kPa]\n300,1\n');
    expect(!wrong.ok && wrong.diagnostics[0].message).toMatch(/expected a volume/);
    const none = read('time [s],gauge [kPa]\n1,1\n');
    expect(!none.ok && none.diagnostics[0].message).toMatch(/size/);
  });

  it('short rows and empty files are errors', () => {
    const short = read('stretch [-],gauge [kPa]\n1.2\n');
    expect(!short.ok && short.diagnostics[0].line).toBe(2);
    expect(read('# only a comment\n').ok).toBe(false);
  });
});

describe('splitSegments', () => {
  it('does not split on noise smaller than 1 % of the range, and splits at a real reversal', () => {
    const rows = [1, 1.5, 2, 1.995, 2.5, 3, 2.5, 2, 1.5, 2, 2.5].map((stretch, i) => ({ line: i + 2, stretch, gauge: 0 }));
    const s = splitSegments(rows);
    expect(s.map((x) => x.kind)).toEqual(['inflation', 'deflation', 'inflation']);
    expect(s.map((x) => x.rows.length)).toEqual([6, 3, 2]);
  });
});

describe('the example bench file networks/data/latex-cell-bench-synthetic.csv', () => {
  it('is what test/study/synthetic.ts makes (so its documented truth holds)', () => {
    expect(readFileSync('networks/data/latex-cell-bench-synthetic.csv', 'utf8')).toBe(exampleBench());
  });

  it('fits back to its Gent parameters within 1 % (inflation) and to the hysteresis factor (deflation)', () => {
    const f = fit(readFileSync('networks/data/latex-cell-bench-synthetic.csv', 'utf8'), 'gent');
    const law = EXAMPLE_LAW as Extract<Membrane, { kind: 'gent' }>;
    expect(Math.abs(param(f, 'shear-modulus').value / law.mu - 1)).toBeLessThan(0.01);
    expect(Math.abs(param(f, 'limit').value / law.jm - 1)).toBeLessThan(0.01);
    expect(Math.abs(param(f, 'shear-modulus', 'deflation').value / (EXAMPLE_DEFLATION * law.mu) - 1)).toBeLessThan(0.01);
  });
});
