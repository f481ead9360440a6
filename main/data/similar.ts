// "Did you mean ...?": the closest of some names to a name that was not found. Pure.

/** Levenshtein edit distance (insertions, deletions, substitutions; Levenshtein 1966). */
export function editDistance(a: string, b: string): number {
  if (a === b) return 0;
  let prev = new Array<number>(b.length + 1);
  let cur = new Array<number>(b.length + 1);
  for (let j = 0; j <= b.length; j++) prev[j] = j;
  for (let i = 1; i <= a.length; i++) {
    cur[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      cur[j] = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + cost);
    }
    [prev, cur] = [cur, prev];
  }
  return prev[b.length]!;
}

/** Lower case, and spaces, dashes and underscores ignored: HH Income ≈ hh_income. */
function loose(name: string): string {
  return name.trim().toLowerCase().replace(/[\s_\-.]+/g, '');
}

/**
 * The candidate closest to `wanted`, or null when none is close: within a third of the
 * longer name's length in edits (at least 1, common practice), or one containing the other.
 */
export function closestName(wanted: string, candidates: readonly string[]): string | null {
  const w = loose(wanted);
  let best: string | null = null;
  let bestScore = Number.POSITIVE_INFINITY;
  for (const c of candidates) {
    const l = loose(c);
    if (l === '') continue;
    let d = editDistance(w, l);
    if (w.length >= 3 && l.length >= 3 && (l.includes(w) || w.includes(l))) d = Math.min(d, 1);
    const allowed = Math.max(1, Math.floor(Math.max(w.length, l.length) / 3));
    if (d <= allowed && d < bestScore) {
      best = c;
      bestScore = d;
    }
  }
  return best;
}
