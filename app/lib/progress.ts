// One bar for a whole run: each stage reports its own done/total, and the bar maps them onto the
// run's share of work, never moving backwards. The shares are rough (common practice: the
// propensity stage dominates the run time; docs/benchmarks.md). Pure.

import type { ProgressEvent } from '../../main/contract/api.ts';

const STAGES: ReadonlyArray<[string, number]> = [
  ['saving', 0.02], ['import', 0.18], ['propensity', 0.5], ['estimate', 0.12], ['checks', 0.1], ['memo', 0.08],
];

/** The run's overall share done (0 to 1) for one stage's progress; unknown stages keep the last share. */
export function overallShare(p: ProgressEvent | null, previous = 0): number {
  if (!p) return previous;
  let start = 0;
  for (const [stage, share] of STAGES) {
    if (stage === p.stage) {
      const within = p.total > 0 ? Math.min(1, Math.max(0, p.done / p.total)) : 0;
      return Math.max(previous, start + share * within);
    }
    start += share;
  }
  return previous;
}
