// Delta sensitivity: the estimates at every delta side by side, and a flag for each pair of
// deltas whose 95% intervals do not overlap. A smaller delta keeps only units closer to the
// formula's edge (less bias, more noise; docs METHOD.md §1, "Asymptotics"); estimates that move
// more than their noise allows between deltas suggest the outcome changes with the formula's
// inputs faster than the linear APS control absorbs. Non-overlap of two intervals is a
// conservative screen, not a test of equality (Schenker & Gentleman 2001, Am. Statistician
// 55:182–186: non-overlapping 95% intervals imply a difference at well below the 5% level).

import type { DeltaEstimate } from './aps-iv.ts';
import { formatNumber } from './subset.ts';
import type { EstimateWarning } from './types.ts';

export interface SensitivityRow {
  delta: number;
  n: number;
  estimate: number | null;
  ci: [number, number] | null;
}

export interface SensitivityPair {
  deltaA: number;
  deltaB: number;
  /** True when both intervals exist and share at least one point. */
  overlap: boolean;
}

export interface SensitivityResult {
  column: string;
  rows: SensitivityRow[];
  /** Every pair of deltas with an interval at both. */
  pairs: SensitivityPair[];
  /** The pairs whose intervals do not overlap. */
  flagged: SensitivityPair[];
  warnings: EstimateWarning[];
}

export function deltaSensitivity(column: string, byDelta: readonly DeltaEstimate[]): SensitivityResult {
  const rows = byDelta
    .map((b) => ({ delta: b.delta, n: b.n, estimate: b.estimate, ci: b.ci }))
    .sort((a, b) => a.delta - b.delta);
  const pairs: SensitivityPair[] = [];
  for (let i = 0; i < rows.length; i++)
    for (let j = i + 1; j < rows.length; j++) {
      const a = rows[i]!.ci;
      const b = rows[j]!.ci;
      if (!a || !b) continue;
      pairs.push({ deltaA: rows[i]!.delta, deltaB: rows[j]!.delta, overlap: a[0] <= b[1] && b[0] <= a[1] });
    }
  const flagged = pairs.filter((p) => !p.overlap);
  const warnings = flagged.map((p) => {
    const a = rows.find((r) => r.delta === p.deltaA)!;
    const b = rows.find((r) => r.delta === p.deltaB)!;
    return {
      code: 'delta-sensitive',
      message: `Outcome "${column}": the estimate at delta ${p.deltaA} (${formatNumber(a.estimate!)}) and at delta ${p.deltaB} (${formatNumber(b.estimate!)}) have 95% intervals that do not overlap: the result depends on how far from the formula's edge units are allowed to be. Prefer the smaller delta and report both.`,
    };
  });
  return { column, rows, pairs, flagged, warnings };
}
