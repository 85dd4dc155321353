// The element-wise network jacobian (src/assemble/jacobian.ts) against the column-by-column
// difference quotient of the full rhs (Dennis & Schnabel 1983, §5.4: forward differences with
// increments √eps·scale are accurate to about √eps relative, so the two agree to ~1e-6 of each
// row's scale), and its pattern holds every nonzero the difference quotient finds.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { NetworkSystem } from '../../src/assemble/system.js';
import { patternIndex, patternSize, scatterDense } from '../../src/linalg/sparse-pattern.js';
import { FiniteJacobian } from '../../src/solve/finite-jacobian.js';
import { chainNetlist, gridNetlist, starNetlist } from '../../bench/networks.js';
import { modelFromText } from '../helpers.js';

function withHeat(text: string, heat: string): string {
  return text.replace(/^heat: .*\n/m, '').replace(/^format: 1\n/m, `format: 1\nheat: ${heat}\n`);
}

/** A state away from rest: masses and temperatures nudged so that every branch carries flow. */
function nudged(sys: NetworkSystem): Float64Array {
  const y = sys.initialState();
  for (let i = 0; i < y.length; i++) y[i] *= 1 + 0.04 * Math.sin(1.7 * i + 0.3);
  for (const k of sys.hIdx) if (k >= 0) y[k] = 0.6;
  return y;
}

function compare(text: string, t: number): { worst: number; missing: number; n: number } {
  const sys = new NetworkSystem(modelFromText(text));
  const y = nudged(sys);
  const n = sys.n;
  const f0 = new Float64Array(n);
  sys.rhs(t, y, f0);
  const fd = new Float64Array(n * n);
  new FiniteJacobian(n).jacobian(sys, t, y, f0, fd);
  const values = new Float64Array(patternSize(sys.jacobianPattern));
  sys.jacobianSparse(t, y, values);
  const J = new Float64Array(n * n);
  scatterDense(sys.jacobianPattern, values, J);
  // compare in tolerance-scaled units, relative to each row's largest scaled entry
  const w = (i: number): number => sys.atol[i] + sys.rtol * Math.abs(y[i]);
  let worst = 0;
  let missing = 0;
  for (let i = 0; i < n; i++) {
    let scale = 0;
    for (let j = 0; j < n; j++) scale = Math.max(scale, Math.abs(fd[i * n + j]) * w(j) / w(i));
    for (let j = 0; j < n; j++) {
      const d = (Math.abs(fd[i * n + j] - J[i * n + j]) * w(j)) / w(i) / (scale || 1);
      worst = Math.max(worst, d);
      if (patternIndex(sys.jacobianPattern, i, j) < 0 && Math.abs(fd[i * n + j]) * w(j) / w(i) > 1e-6 * scale) missing++;
    }
  }
  return { worst, missing, n };
}

const examples = ['networks/manifold-mixed.yaml', 'networks/cushion-runaway.yaml', 'networks/gripper-charge.yaml', 'test/reference/chain-mixed.yaml'];

describe('network jacobian, element by element, against differences of the whole rhs', () => {
  for (const file of examples) {
    for (const heat of ['isothermal', 'adiabatic'] as const) {
      it(`${file}, heat: ${heat}`, () => {
        const r = compare(withHeat(readFileSync(file, 'utf8'), heat), 0.4);
        expect(r.missing).toBe(0);
        expect(r.worst).toBeLessThan(2e-5);
      });
    }
  }
  for (const [name, text] of [['chain', chainNetlist(12)], ['grid', gridNetlist(30)], ['star', starNetlist(12)]] as const) {
    for (const heat of ['isothermal', 'adiabatic'] as const) {
      it(`generated ${name}, heat: ${heat} (turbulent and laminar lines, valves, mixed walls)`, () => {
        const r = compare(withHeat(text, heat), 0.6);
        expect(r.missing).toBe(0);
        expect(r.worst).toBeLessThan(2e-5);
      });
    }
  }

  it('a mass row of the jacobian sums to zero over its column (mass conservation: every flow leaves one slot and enters another)', () => {
    const sys = new NetworkSystem(modelFromText(gridNetlist(40)));
    const y = nudged(sys);
    const values = new Float64Array(patternSize(sys.jacobianPattern));
    sys.jacobianSparse(0.5, y, values);
    const colSum = new Float64Array(sys.n);
    const colMax = new Float64Array(sys.n);
    const p = sys.jacobianPattern;
    for (let i = 0; i < sys.n; i++) {
      for (let k = p.rowPtr[i]; k < p.rowPtr[i + 1]; k++) {
        colSum[p.colIdx[k]] += values[k];
        colMax[p.colIdx[k]] = Math.max(colMax[p.colIdx[k]], Math.abs(values[k]));
      }
    }
    for (let j = 0; j < sys.n; j++) expect(Math.abs(colSum[j])).toBeLessThanOrEqual(1e-12 * colMax[j]);
  });
});
