/**
 * "Did you mean ...?" suggestions for misspelt keys, names and units.
 *
 * References: F. J. Damerau, "A technique for computer detection and correction of spelling
 * errors", CACM 7(3), 1964 (adjacent transpositions count as one edit); the restricted
 * (optimal string alignment) variant is used, which is enough for typing slips.
 */

/**
 * Restricted Damerau–Levenshtein distance between a and b (insert, delete, substitute, swap).
 * With `limit`, any distance above it is reported as limit + 1, and only the band of cells
 * within `limit` of the diagonal is computed (Ukkonen's cut-off), so the cost is
 * O(min(n, m)·limit) rather than O(n·m): a 100 000-character name costs as much as its length.
 */
let rows = new Int32Array(3 * 64);

export function editDistance(a: string, b: string, limit = Infinity): number {
  const n = a.length;
  const m = b.length;
  if (Math.abs(n - m) > limit) return limit + 1;
  if (n === 0) return m;
  if (m === 0) return n;
  const big = 0x3fffffff;
  const band = Number.isFinite(limit) ? limit : Math.max(n, m);
  // Three rolling rows (two back for transpositions, previous, current), reused between calls.
  if (rows.length < 3 * (m + 1)) rows = new Int32Array(3 * (m + 1) * 2);
  let prev2 = rows.subarray(0, m + 1);
  let prev = rows.subarray(m + 1, 2 * (m + 1));
  let cur = rows.subarray(2 * (m + 1), 3 * (m + 1));
  prev2.fill(big);
  cur.fill(big);
  for (let j = 0; j <= m; j++) prev[j] = j <= band ? j : big;
  for (let i = 1; i <= n; i++) {
    const lo = Math.max(1, i - band);
    const hi = Math.min(m, i + band);
    cur[lo - 1] = lo === 1 ? (i <= band ? i : big) : big;
    let rowMin = cur[lo - 1];
    for (let j = lo; j <= hi; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d;
      if (d < rowMin) rowMin = d;
    }
    if (hi < m) cur[hi + 1] = big;
    if (rowMin > limit) return limit + 1;
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[m] > limit ? limit + 1 : prev[m];
}

/** How many edits still count as a slip for a word of this length. */
function tolerance(length: number): number {
  if (length <= 3) return 1;
  if (length <= 6) return 2;
  return 3;
}

/** Words longer than this get no suggestion: nobody mistypes a name of this length by a slip. */
const LONGEST_SUGGESTED = 200;
/**
 * Candidates compared by edit distance in one reading of a netlist (see `resetSuggestions`):
 * 3 000 misspelt references among 3 000 names would be 9 million comparisons; past the budget only
 * case-insensitive exact matches are suggested, so bad input cannot make the reader quadratic.
 */
const SUGGESTION_BUDGET = 300_000;
let budget = SUGGESTION_BUDGET;

/** Gives did-you-mean its full budget again (called once per netlist read). */
export function resetSuggestions(): void {
  budget = SUGGESTION_BUDGET;
}

/**
 * The candidates closest to `word`, best first. A case-insensitive exact match wins outright;
 * otherwise candidates within a length-dependent edit distance (case-insensitive) are kept.
 * Only candidates of a length within that distance are compared, and only while the budget
 * lasts.
 */
export function closestMatches(word: string, candidates: Iterable<string>, max = 3): string[] {
  const lower = word.toLowerCase();
  const scored: { c: string; d: number }[] = [];
  const tooLong = word.length > LONGEST_SUGGESTED;
  for (const c of new Set(candidates)) {
    if (c === word) continue;
    if (c.length === word.length && c.toLowerCase() === lower) {
      scored.push({ c, d: 0 });
      continue;
    }
    if (tooLong) continue;
    const tol = tolerance(Math.max(word.length, c.length));
    if (Math.abs(c.length - word.length) > tol || budget <= 0) continue;
    budget--;
    const d = editDistance(lower, c.toLowerCase(), tol);
    if (d <= tol) scored.push({ c, d });
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
