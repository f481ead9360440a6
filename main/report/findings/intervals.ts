// Does an interval or a confidence set exclude zero? A set that reaches zero at an end point
// covers it (a 95% interval "touching" zero does not tell the effect apart from none).

import type { ZeroVerdict } from '../../contract/results.ts';

/** A closed interval [lo, hi]; null ends are ±infinity. */
export function intervalOnZero(ci: readonly [number | null, number | null] | null | undefined): ZeroVerdict | null {
  if (!ci) return null;
  const lo = ci[0] ?? -Infinity;
  const hi = ci[1] ?? Infinity;
  if (Number.isNaN(lo) || Number.isNaN(hi)) return null;
  return lo <= 0 && hi >= 0 ? 'covers' : 'excludes';
}

/** A union of closed intervals (the Anderson–Rubin set): covers zero when any piece does. An empty set is null (nothing to read). */
export function setOnZero(set: ReadonlyArray<readonly [number | null, number | null]> | null | undefined): ZeroVerdict | null {
  if (!set || set.length === 0) return null;
  const pieces = set.map((c) => intervalOnZero(c));
  if (pieces.some((v) => v === null)) return null;
  return pieces.includes('covers') ? 'covers' : 'excludes';
}
