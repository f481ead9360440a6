// Imbalance: among the units compared, offered and not-offered units should not differ in what was
// fixed before the offer, once the APS is controlled for (docs/method.md §1, "Balance"). Worded
// from the findings (main/report/findings): triggered when a test is below 5% after Holm's (1979)
// adjustment for the number of tests, or a standardized difference is beyond 0.25 at any delta
// (Rubin 2001, Health Services & Outcomes Research Methodology 2:169–188). One small p-value
// among many tests, before adjustment, does not trigger it (the Checks section lists it).

import type { Results } from '../../contract/results.ts';
import { text } from '../model/memo-source.ts';
import { balanceVerdictRuns } from '../model/memo-verdicts.ts';
import { para, type Caveat } from './types.ts';

export function imbalanceCaveat(r: Results): Caveat | null {
  const b = r.findings.balance;
  const large = b.flagged.some((f) => f.why.includes('large difference'));
  if (b.verdict !== 'imbalance' && !large) return null;
  return {
    id: 'imbalance',
    title: b.verdict === 'imbalance' ? 'Offered and not-offered units differ among those compared' : 'Some characteristics differ by more than a quarter of a standard deviation',
    tone: 'caution',
    body: [
      para(...balanceVerdictRuns(r)),
      para(text('The comparison may then not be like for like: the estimate could mix the effect of the benefit with these differences.')),
    ],
  };
}
