/**
 * Column colouring for finite-difference jacobians: columns that share no row
 * (structurally orthogonal) get the same colour, so one rhs evaluation with all of a colour's
 * columns perturbed at once yields all their entries. Greedy distance-2 colouring of the
 * column intersection graph, columns taken in order of decreasing size (largest first).
 *
 * A dense row (a tank with a line to every other chamber) forces every column it touches into
 * a colour of its own; problems with such hubs should give their jacobian directly.
 *
 * References: Curtis, Powell & Reid, J. Inst. Maths Applics 13 (1974) 117 (grouping of
 * structurally orthogonal columns); Coleman & Moré, SIAM J. Numer. Anal. 20 (1983) 187
 * (the graph colouring view, largest-first ordering).
 */
import { transposePattern, type SparsePattern } from './sparse-pattern.js';

export interface ColumnColouring {
  /** Number of colours (rhs evaluations per jacobian). */
  count: number;
  /** colour[j] of column j, 0-based. */
  colour: Int32Array;
  /** Columns of colour c: columns[colourPtr[c] .. colourPtr[c+1]−1], ascending. */
  colourPtr: Int32Array;
  columns: Int32Array;
}

export function colourColumns(p: SparsePattern): ColumnColouring {
  const { n, rowPtr, colIdx } = p;
  const { colPtr, rowIdx } = transposePattern(p);
  const order = Int32Array.from({ length: n }, (_, j) => j);
  order.sort((a, b) => (colPtr[b + 1] - colPtr[b]) - (colPtr[a + 1] - colPtr[a]) || a - b);
  const colour = new Int32Array(n).fill(-1);
  /** forbidden[c] === j + 1 while colouring column j means colour c is taken by a neighbour. */
  const forbidden = new Int32Array(n + 1);
  let count = 0;
  for (let t = 0; t < n; t++) {
    const j = order[t];
    for (let a = colPtr[j]; a < colPtr[j + 1]; a++) {
      const i = rowIdx[a];
      for (let b = rowPtr[i]; b < rowPtr[i + 1]; b++) {
        const c = colour[colIdx[b]];
        if (c >= 0) forbidden[c] = j + 1;
      }
    }
    let c = 0;
    while (forbidden[c] === j + 1) c++;
    colour[j] = c;
    if (c + 1 > count) count = c + 1;
  }
  const colourPtr = new Int32Array(count + 1);
  for (let j = 0; j < n; j++) colourPtr[colour[j] + 1]++;
  for (let c = 0; c < count; c++) colourPtr[c + 1] += colourPtr[c];
  const next = colourPtr.slice(0, count);
  const columns = new Int32Array(n);
  for (let j = 0; j < n; j++) columns[next[colour[j]]++] = j;
  return { count, colour, colourPtr, columns };
}
