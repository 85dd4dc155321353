/** Selections for summaries of large networks (terminal tables, report charts, study summaries). */

/**
 * The `max` items with the largest score, in their original order (ties: the earlier first).
 * All of them when there are no more than `max`.
 */
export function keepLargest<T>(items: readonly T[], score: (item: T) => number, max: number): T[] {
  if (items.length <= max) return [...items];
  const scored = items.map((item, i) => ({ i, s: score(item) }));
  scored.sort((a, b) => b.s - a.s || a.i - b.i);
  const keep = new Set(scored.slice(0, max).map((x) => x.i));
  return items.filter((_, i) => keep.has(i));
}
