// Coloured finite differences (Curtis, Powell & Reid, J. Inst. Maths Applics 13 (1974) 117):
// perturbing structurally orthogonal columns together gives the same difference quotients as
// one column at a time; and the stiff integrator gives the same solution with sparse and dense
// LU (Hairer & Wanner, Solving ODEs II, §IV.7–8: only the linear algebra differs, so the
// results agree to round-off amplified by the step-size controller).
import { describe, expect, it } from 'vitest';
import { colourColumns } from '../../src/linalg/sparse-colouring.js';
import { patternFromEntries, patternIndex, patternSize, transposePattern } from '../../src/linalg/sparse-pattern.js';
import { ColouredJacobian, FiniteJacobian } from '../../src/solve/finite-jacobian.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import { chooseLinearAlgebra } from '../../src/solve/iteration-matrix.js';
import type { OdeProblem } from '../../src/solve/types.js';

/**
 * A stiff nonlinear reaction–diffusion line with a hub: u_i' = D(u_{i−1} − 2u_i + u_{i+1}) − u_i³ +
 * κ(u_0 − u_i), u_0' = Σ κ(u_i − u_0) (every node tied to node 0, a dense row and column).
 */
function hubLine(n: number, D: number, kappa: number): OdeProblem & { pattern: ReturnType<typeof patternFromEntries> } {
  const rows: number[] = [], cols: number[] = [];
  for (let i = 1; i < n; i++) {
    if (i > 1) { rows.push(i); cols.push(i - 1); }
    if (i + 1 < n) { rows.push(i); cols.push(i + 1); }
    rows.push(i, 0); cols.push(0, i);
  }
  const pattern = patternFromEntries(n, rows, cols);
  const rhs = (_t: number, y: Float64Array, f: Float64Array): void => {
    let hub = 0;
    for (let i = 1; i < n; i++) {
      const l = i > 1 ? y[i - 1] : 0, r = i + 1 < n ? y[i + 1] : 0;
      f[i] = D * (l - 2 * y[i] + r) - y[i] ** 3 + kappa * (y[0] - y[i]);
      hub += kappa * (y[i] - y[0]);
    }
    f[0] = hub;
  };
  return { n, rhs, rtol: 1e-8, atol: new Float64Array(n).fill(1e-10), jacobianPattern: pattern, pattern };
}

describe('column colouring', () => {
  it('gives no colour twice within a row; a tridiagonal pattern needs three colours', () => {
    const n = 40;
    const r: number[] = [], c: number[] = [];
    for (let i = 0; i + 1 < n; i++) { r.push(i, i + 1); c.push(i + 1, i); }
    const p = patternFromEntries(n, r, c);
    const col = colourColumns(p);
    expect(col.count).toBe(3);
    for (let i = 0; i < n; i++) {
      const seen = new Set<number>();
      for (let k = p.rowPtr[i]; k < p.rowPtr[i + 1]; k++) {
        const colour = col.colour[p.colIdx[k]];
        expect(seen.has(colour)).toBe(false);
        seen.add(colour);
      }
    }
  });

  it('a dense row forces a colour per column it touches', () => {
    const prob = hubLine(30, 1, 1);
    expect(colourColumns(prob.pattern).count).toBe(30);
  });
});

describe('ColouredJacobian equals the column-by-column difference jacobian', () => {
  it('on a banded problem with a coupling every third column (fewer colours than columns)', () => {
    const n = 60;
    const rows: number[] = [], cols: number[] = [];
    for (let i = 0; i < n; i++) for (const d of [-2, -1, 1, 3]) if (i + d >= 0 && i + d < n) { rows.push(i); cols.push(i + d); }
    const pattern = patternFromEntries(n, rows, cols);
    const problem: OdeProblem = {
      n, rtol: 1e-6, atol: new Float64Array(n).fill(1e-8), jacobianPattern: pattern,
      rhs: (t, y, f) => {
        for (let i = 0; i < n; i++) {
          let s = Math.sin(t + y[i]) * y[i];
          for (const d of [-2, -1, 1, 3]) if (i + d >= 0 && i + d < n) s += Math.exp(-0.1 * (i + d)) * y[i + d] * y[i + d] * (d + 5);
          f[i] = s;
        }
      },
    };
    const y = Float64Array.from({ length: n }, (_, i) => 1 + Math.cos(i));
    const f0 = new Float64Array(n);
    problem.rhs(0.3, y, f0);
    const dense = new Float64Array(n * n);
    new FiniteJacobian(n).jacobian(problem, 0.3, y, f0, dense);
    const coloured = new ColouredJacobian(pattern);
    expect(coloured.colouring.count).toBeLessThan(n / 4);
    const values = new Float64Array(patternSize(pattern));
    const used = coloured.jacobian(problem, 0.3, y, f0, values);
    expect(used).toBe(coloured.colouring.count);
    // the same quotients: a row sees only its own column of each colour
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const k = patternIndex(pattern, i, j);
      expect(k >= 0 ? values[k] : 0).toBe(dense[i * n + j]);
    }
    // and nothing outside the pattern
    const t = transposePattern(pattern);
    expect(t.colPtr[n]).toBe(patternSize(pattern));
  });
});

describe('RODAS with sparse and dense LU', () => {
  it('chooses sparse LU for a large problem with a pattern and dense below the threshold', () => {
    expect(chooseLinearAlgebra(hubLine(400, 1, 1))).toBe('sparse');
    expect(chooseLinearAlgebra(hubLine(10, 1, 1))).toBe('dense');
    expect(chooseLinearAlgebra({ ...hubLine(400, 1, 1), jacobianPattern: undefined })).toBe('dense');
  });

  it('gives the same solution with either, on a stiff problem with a hub (coloured differences)', () => {
    const n = 80;
    const p = hubLine(n, 2000, 50);
    const y0 = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 7) + (i === 0 ? 1 : 0));
    const run = (la: 'dense' | 'sparse'): { y: Float64Array; steps: number; status: string } => {
      const r = rosenbrock(p, 0, y0, 0.5, () => true, { linearAlgebra: la });
      return { y: r.y, steps: r.work.steps, status: r.status };
    };
    const d = run('dense'), s = run('sparse');
    expect(d.status).toBe('completed');
    expect(s.status).toBe('completed');
    expect(d.steps).toBeGreaterThan(5);
    for (let i = 0; i < n; i++) expect(Math.abs(s.y[i] - d.y[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(d.y[i])));
  });
});
