// The project's ODEX core (src/solve/odex-core.ts) against the odex 2.0.4 package it was carried
// over from: the same accepted steps, states and dense values to the last bit, on problems with
// rejections, order changes, stability-check failures, a step-size cap and an early stop. The
// package is a dev dependency kept for this comparison only.
import { describe, expect, it } from 'vitest';
import { Solver } from '#odex';
import { odexSolve, type OdexSettings } from '../../src/solve/odex-core.js';
import { NetworkSystem } from '../../src/assemble/system.js';
import { modelFromText } from '../helpers.js';

interface Problem { n: number; y0: number[]; x0: number; xEnd: number; f: (x: number, y: ArrayLike<number>, d: Float64Array) => void; rtol: number; atol: number[] }

/** What both codes report: every callback's (nr, xOld, x, y) and the dense output at three points. */
function recordPackage(p: Problem, opts: Partial<OdexSettings> & { stopAfter?: number }): number[] {
  const out: number[] = [];
  const s = new Solver(p.n);
  s.denseOutput = true;
  s.relativeTolerance = p.rtol;
  s.absoluteTolerance = p.atol.slice();
  if (opts.maxSteps !== undefined) s.maxSteps = opts.maxSteps;
  if (opts.maxStepSize !== undefined) s.maxStepSize = opts.maxStepSize;
  if (opts.initialStepSize !== undefined) s.initialStepSize = opts.initialStepSize;
  if (opts.stabilityCheckCount !== undefined) s.stabilityCheckCount = opts.stabilityCheckCount;
  const d = new Float64Array(p.n);
  const r = s.solve((x, y) => { p.f(x, y, d); return Array.from(d); }, p.x0, p.y0.slice(), p.xEnd, (nr, xOld, x, y, dense) => {
    out.push(nr, xOld, x, ...y);
    if (dense) for (const th of [0.13, 0.5, 0.91]) for (let c = 0; c < p.n; c++) out.push(dense(c, xOld + th * (x - xOld)));
    if (opts.stopAfter !== undefined && nr >= opts.stopAfter) return false;
  });
  out.push(r.outcome, r.nStep, r.nAccept, r.nReject, r.nEval);
  return out;
}

function recordCore(p: Problem, opts: Partial<OdexSettings> & { stopAfter?: number }): number[] {
  const out: number[] = [];
  const row = new Float64Array(p.n);
  const r = odexSolve(p.n, (x, y, d) => p.f(x, y, d), p.x0, Float64Array.from(p.y0), p.xEnd, (nr, xOld, x, y, dense) => {
    out.push(nr, xOld, x, ...y);
    if (dense) {
      for (const th of [0.13, 0.5, 0.91]) {
        dense.into(xOld + th * (x - xOld), row);
        for (let c = 0; c < p.n; c++) {
          expect(Object.is(dense.at(c, xOld + th * (x - xOld)), row[c])).toBe(true);
          out.push(row[c]);
        }
      }
    }
    if (opts.stopAfter !== undefined && nr >= opts.stopAfter) return false;
  }, {
    maxSteps: opts.maxSteps ?? 10000, initialStepSize: opts.initialStepSize ?? 1e-4, maxStepSize: opts.maxStepSize ?? 0,
    stabilityCheckCount: opts.stabilityCheckCount ?? 1, rtol: p.rtol, atol: Float64Array.from(p.atol),
  });
  const code = { converged: 0, 'max-steps': 1, 'early-return': 2 }[r.outcome];
  out.push(code, r.nStep, r.nAccept, r.nReject, r.nEval);
  return out;
}

function sameBits(a: number[], b: number[]): void {
  expect(b.length).toBe(a.length);
  const firstDiff = a.findIndex((v, i) => !Object.is(v, b[i]));
  expect(firstDiff).toBe(-1);
}

// Van der Pol with μ = 5: relaxation oscillations, many rejections and order changes
// (Hairer, Nørsett & Wanner, Solving ODEs I, §II.10 uses it as a test problem).
const vdp: Problem = {
  n: 2, y0: [2, 0], x0: 0, xEnd: 12, rtol: 1e-7, atol: [1e-9, 1e-9],
  f: (_x, y, d) => { d[0] = y[1]; d[1] = 5 * (1 - y[0] * y[0]) * y[1] - y[0]; },
};
// Arenstorf orbit (Hairer, Nørsett & Wanner, Solving ODEs I, §II.0): sharp turns near the moon.
const arenstorf: Problem = (() => {
  const m = 0.012277471, mh = 1 - m;
  return {
    n: 4, y0: [0.994, 0, 0, -2.00158510637908252240537862224], x0: 0, xEnd: 17.0652165601579625588917206249, rtol: 1e-9, atol: [1e-9, 1e-9, 1e-9, 1e-9],
    f: (_x: number, y: ArrayLike<number>, d: Float64Array) => {
      const d1 = Math.pow((y[0] + m) ** 2 + y[1] ** 2, 1.5), d2 = Math.pow((y[0] - mh) ** 2 + y[1] ** 2, 1.5);
      d[0] = y[2]; d[1] = y[3];
      d[2] = y[0] + 2 * y[3] - mh * (y[0] + m) / d1 - m * (y[0] - mh) / d2;
      d[3] = y[1] - 2 * y[2] - mh * y[1] / d1 - m * y[1] / d2;
    },
  };
})();
// A mildly stiff linear chain (the stability check fires) with an explicit t dependence.
const heat: Problem = {
  n: 12, y0: Array.from({ length: 12 }, (_, i) => Math.sin(i)), x0: 0.5, xEnd: 3, rtol: 1e-6, atol: Array(12).fill(1e-8),
  f: (x, y, d) => {
    for (let i = 0; i < 12; i++) d[i] = 30 * ((i > 0 ? y[i - 1] : 0) - 2 * y[i] + (i < 11 ? y[i + 1] : Math.cos(x)));
  },
};

describe('ODEX core against odex 2.0.4 (identical to the bit)', () => {
  it.each([
    ['Van der Pol μ = 5', vdp, {}],
    ['Arenstorf orbit', arenstorf, {}],
    ['stiff-ish heat chain, forcing in t', heat, {}],
    ['heat chain without the stability check', heat, { stabilityCheckCount: 0 }],
    ['Van der Pol with a step cap and a first step', vdp, { maxStepSize: 0.05, initialStepSize: 0.01 }],
    ['Van der Pol backwards in x', { ...vdp, x0: 12, xEnd: 0 }, {}],
    ['step budget exhausted', vdp, { maxSteps: 7 }],
    ['stopped by the callback', arenstorf, { stopAfter: 9 }],
  ] as [string, Problem, Partial<OdexSettings> & { stopAfter?: number }][])('%s', (_name, p, opts) => {
    const a = recordPackage(p, opts);
    expect(a.length).toBeGreaterThan(20);
    sameBits(a, recordCore(p, opts));
  });

  it('a generated chain of 30 chambers through NetworkSystem', () => {
    const chain = ['format: 1', 'ambient: { pressure: 101.325 kPa, temperature: 20 degC }', 'chambers:'];
    for (let i = 0; i < 30; i++) {
      chain.push(i % 2 ? `  c${i}: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.05 } }`
        : `  c${i}: { wall: rigid, volume: 20 mL, start: { pressure: 0 kPa gauge } }`);
    }
    chain.push('lines:');
    for (let i = 0; i + 1 < 30; i++) chain.push(`  l${i}: { from: c${i}, to: c${i + 1}, diameter: 2 mm, length: 100 mm }`);
    chain.push('simulate: { duration: 20 ms, tolerance: 1e-6 }');
    const sys = new NetworkSystem(modelFromText(chain.join('\n') + '\n'));
    const y0 = sys.initialState();
    const p: Problem = {
      n: sys.n, y0: Array.from(y0), x0: 0, xEnd: 0.02, rtol: sys.rtol, atol: Array.from(sys.atol),
      f: (x, y, d) => sys.rhs(x, Float64Array.from(y as ArrayLike<number>), d),
    };
    const a = recordPackage(p, {});
    expect(a.length).toBeGreaterThan(20);
    sameBits(a, recordCore(p, {}));
  });
});
