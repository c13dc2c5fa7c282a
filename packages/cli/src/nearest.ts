/**
 * The edit distance between two strings: the fewest single-character
 * insertions, deletions, substitutions and swaps of two adjacent characters
 * that turn `a` into `b`.
 * Method: optimal string alignment distance (Damerau, 1964; Wagner & Fischer,
 * 1974, dynamic programming over a (|a|+1)×(|b|+1) table, kept here as three rows).
 * @example
 * editDistance("threshhold", "threshold"); // 1
 * editDistance("sacle", "scale"); // 1 (one swap)
 */
export function editDistance(a: string, b: string): number {
  const n = b.length;
  let before = new Array<number>(n + 1).fill(0); // row i−2
  let previous = Array.from({ length: n + 1 }, (_, j) => j); // row i−1
  let current = new Array<number>(n + 1).fill(0); // row i
  for (let i = 1; i <= a.length; i++) {
    current[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min((previous[j] as number) + 1, (current[j - 1] as number) + 1, (previous[j - 1] as number) + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, (before[j - 2] as number) + 1);
      current[j] = d;
    }
    [before, previous, current] = [previous, current, before];
  }
  return previous[n] as number;
}

/**
 * The candidate closest to `word` by {@link editDistance} (case-insensitive),
 * or undefined when none is close enough to be a likely misspelling: the
 * distance must be at most max(1, ⌊length/3⌋) of the longer string, or the
 * one must be a prefix of the other.
 * @example
 * nearestWord("hiden", ["hidden", "seed", "members"]); // "hidden"
 * nearestWord("colour", ["seed", "scale"]); // undefined
 */
export function nearestWord(word: string, candidates: readonly string[]): string | undefined {
  const lower = word.toLowerCase();
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const candidate of candidates) {
    const c = candidate.toLowerCase();
    const d = c.startsWith(lower) || lower.startsWith(c) ? Math.min(1, editDistance(lower, c)) : editDistance(lower, c);
    if (d < bestDistance) {
      bestDistance = d;
      best = candidate;
    }
  }
  if (best === undefined) return undefined;
  const limit = Math.max(1, Math.floor(Math.max(lower.length, best.length) / 3));
  return bestDistance <= limit ? best : undefined;
}

/** "; did you mean X?" when a near candidate exists, else "" (to append to an error message). */
export function suggestion(word: string, candidates: readonly string[], render: (s: string) => string = (s) => s): string {
  const near = nearestWord(word, candidates);
  return near === undefined ? "" : `; did you mean ${render(near)}?`;
}
