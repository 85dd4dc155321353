/**
 * Fill-reducing ordering for sparse LU: the minimum degree algorithm on the symmetric structure
 * A + Aᵀ, simulated on an explicit elimination graph. Each step eliminates a node of least
 * current degree (ties: lowest index, so the result is deterministic) and joins its remaining
 * neighbours into a clique, which is exactly the fill that Gaussian elimination without
 * pivoting creates. The neighbour set of each node at its elimination is therefore the
 * structure of its column of L and its row of U, so the symbolic factorisation falls out of
 * the ordering at no extra cost.
 *
 * For the graphs of pneumatic networks (chains, trees, manifolds, stars around a tank, sparse
 * meshes) this creates no fill on trees and little on meshes: leaves go first, a hub last.
 * Cost is O(Σ d_k²) over the degrees d_k at elimination, which is O(n) for trees and stars.
 *
 * References: Tinney & Walker, Proc. IEEE 55 (1967) 1801 (scheme 2, minimum degree);
 * George & Liu, SIAM Review 31 (1989) 1, "The evolution of the minimum degree ordering
 * algorithm" (elimination graph model, §2); Rose, in Graph Theory and Computing, 1972
 * (elimination graphs and fill).
 */
import type { SparsePattern } from './sparse-pattern.js';

export interface EliminationOrder {
  /** perm[k] = original index of the k-th pivot. */
  perm: Int32Array;
  /** inverse: iperm[perm[k]] = k. */
  iperm: Int32Array;
  /**
   * Structure of the factors in pivot order: for pivot k, the pivot positions (> k) of its
   * neighbours at elimination, ascending, in upper[upperPtr[k] .. upperPtr[k+1]−1]. These are
   * the off-diagonal columns of row k of U and, by symmetry, the rows of column k of L.
   */
  upperPtr: Int32Array;
  upper: Int32Array;
}

/** A binary min-heap of integer keys with lazy deletion (stale keys are skipped by the caller). */
class KeyHeap {
  private a: number[] = [];
  get size(): number { return this.a.length; }
  push(x: number): void {
    const a = this.a;
    let i = a.length;
    a.push(x);
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (a[p] <= x) break;
      a[i] = a[p];
      i = p;
    }
    a[i] = x;
  }
  pop(): number {
    const a = this.a;
    const top = a[0];
    const last = a.pop() as number;
    if (a.length > 0) {
      let i = 0;
      const n = a.length;
      for (;;) {
        const l = 2 * i + 1;
        if (l >= n) break;
        const r = l + 1;
        const c = r < n && a[r] < a[l] ? r : l;
        if (a[c] >= last) break;
        a[i] = a[c];
        i = c;
      }
      a[i] = last;
    }
    return top;
  }
}

/** Minimum degree ordering and symbolic factorisation of the symmetric structure of p. */
export function minimumDegreeOrder(p: SparsePattern): EliminationOrder {
  const { n, rowPtr, colIdx } = p;
  const adj: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j === i) continue;
      adj[i].add(j);
      adj[j].add(i);
    }
  }
  const eliminated = new Uint8Array(n);
  const heap = new KeyHeap();
  for (let v = 0; v < n; v++) heap.push(adj[v].size * n + v);
  const perm = new Int32Array(n);
  const iperm = new Int32Array(n);
  /** Neighbours (original indices) of each pivot at its elimination. */
  const reach: Int32Array[] = new Array(n);
  let k = 0;
  while (k < n) {
    const key = heap.pop();
    const v = key % n;
    const deg = (key - v) / n;
    if (eliminated[v] || deg !== adj[v].size) continue; // stale entry
    eliminated[v] = 1;
    perm[k] = v;
    iperm[v] = k;
    k++;
    const nb = Int32Array.from(adj[v]);
    reach[v] = nb;
    for (let a = 0; a < nb.length; a++) adj[nb[a]].delete(v);
    for (let a = 0; a < nb.length; a++) {
      const sa = adj[nb[a]];
      for (let b = 0; b < nb.length; b++) if (b !== a) sa.add(nb[b]);
    }
    for (let a = 0; a < nb.length; a++) heap.push(adj[nb[a]].size * n + nb[a]);
    adj[v].clear();
  }
  const upperPtr = new Int32Array(n + 1);
  for (let q = 0; q < n; q++) upperPtr[q + 1] = upperPtr[q] + reach[perm[q]].length;
  const upper = new Int32Array(upperPtr[n]);
  for (let q = 0; q < n; q++) {
    const nb = reach[perm[q]];
    const seg = upper.subarray(upperPtr[q], upperPtr[q + 1]);
    for (let a = 0; a < nb.length; a++) seg[a] = iperm[nb[a]];
    seg.sort();
  }
  return { perm, iperm, upperPtr, upper };
}

/** The identity order with its symbolic factorisation (for tests and comparisons). */
export function naturalOrder(p: SparsePattern): EliminationOrder {
  // Symbolic elimination in the natural order on the same explicit graph.
  const { n, rowPtr, colIdx } = p;
  const adj: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j !== i) { adj[i].add(j); adj[j].add(i); }
    }
  }
  const perm = Int32Array.from({ length: n }, (_, i) => i);
  const upperPtr = new Int32Array(n + 1);
  const rows: Int32Array[] = [];
  for (let v = 0; v < n; v++) {
    const nb = Int32Array.from(adj[v]).filter((u) => u > v).sort();
    rows.push(nb);
    upperPtr[v + 1] = upperPtr[v] + nb.length;
    for (let a = 0; a < nb.length; a++) for (let b = 0; b < nb.length; b++) if (a !== b) adj[nb[a]].add(nb[b]);
  }
  const upper = new Int32Array(upperPtr[n]);
  rows.forEach((r, v) => upper.set(r, upperPtr[v]));
  return { perm, iperm: perm.slice(), upperPtr, upper };
}
