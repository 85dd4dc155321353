/**
 * "Did you mean ...?" suggestions for misspelt keys, names and units.
 *
 * References: F. J. Damerau, "A technique for computer detection and correction of spelling
 * errors", CACM 7(3), 1964 (adjacent transpositions count as one edit); the restricted
 * (optimal string alignment) variant is used, which is enough for typing slips.
 */

/** Restricted Damerau–Levenshtein distance between a and b (insert, delete, substitute, swap). */
export function editDistance(a: string, b: string): number {
  const n = a.length;
  const m = b.length;
  if (n === 0) return m;
  if (m === 0) return n;
  // Three rolling rows: two back (for transpositions), previous, current.
  let prev2 = new Array<number>(m + 1).fill(0);
  let prev = Array.from({ length: m + 1 }, (_, j) => j);
  let cur = new Array<number>(m + 1).fill(0);
  for (let i = 1; i <= n; i++) {
    cur[0] = i;
    for (let j = 1; j <= m; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d;
    }
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[m];
}

/** How many edits still count as a slip for a word of this length. */
function tolerance(length: number): number {
  if (length <= 3) return 1;
  if (length <= 6) return 2;
  return 3;
}

/**
 * The candidates closest to `word`, best first. A case-insensitive exact match wins outright;
 * otherwise candidates within a length-dependent edit distance (case-insensitive) are kept.
 */
export function closestMatches(word: string, candidates: Iterable<string>, max = 3): string[] {
  const lower = word.toLowerCase();
  const scored: { c: string; d: number }[] = [];
  for (const c of new Set(candidates)) {
    if (c === word) continue;
    const cl = c.toLowerCase();
    if (cl === lower) {
      scored.push({ c, d: 0 });
      continue;
    }
    const d = editDistance(lower, cl);
    if (d <= tolerance(Math.max(word.length, c.length))) scored.push({ c, d });
  }
  scored.sort((x, y) => x.d - y.d || x.c.localeCompare(y.c));
  const best = scored.length && scored[0].d === 0 ? scored.filter((s) => s.d === 0) : scored;
  return best.slice(0, max).map((s) => s.c);
}

/** "did you mean `diameter`?" or undefined when nothing is close. */
export function didYouMean(word: string, candidates: Iterable<string>): string | undefined {
  const found = closestMatches(word, candidates);
  if (!found.length) return undefined;
  return `did you mean ${found.map((c) => `\`${c}\``).join(' or ')}?`;
}

/** `a`, `b` or `c` — for hints that list what is allowed. */
export function listChoices(choices: readonly string[]): string {
  const q = choices.map((c) => `\`${c}\``);
  if (q.length <= 1) return q.join('');
  return `${q.slice(0, -1).join(', ')} or ${q[q.length - 1]}`;
}
