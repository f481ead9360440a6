// Exclusion rate: rows of the data file the analysis could not use. Triggered above 5% of the
// rows read (common practice, no source): if the excluded rows differ from the rest, the
// estimate describes the rows kept, not the whole caseload.

import type { Results } from '../../contract/results.ts';
import { constNum, stateRun, text } from '../model/memo-source.ts';
import { PERCENT } from '../model/memo-format.ts';
import { MEMO_CONSTANTS } from '../model/memo-constants.ts';
import { para, type Caveat, type CaveatContext } from './types.ts';

export function exclusionCaveat(r: Results, ctx: CaveatContext): Caveat | null {
  const s = r.study;
  if (s.rowsRead === 0) return null;
  const share = (s.rowsRead - s.rowsUsed) / s.rowsRead;
  if (share <= MEMO_CONSTANTS.EXCLUSION_SHARE) return null;
  const paths = s.rowsExcluded.map((_, i) => `study.rowsExcluded[${i}].count`);
  const shown = ctx.ledger.share(share, 'study.rowsRead', 'study.rowsUsed', ...paths);
  return {
    id: 'exclusions',
    title: 'Many rows could not be used',
    tone: 'caution',
    body: [para(
      stateRun(shown, '(study.rowsRead - study.rowsUsed) / study.rowsRead', PERCENT),
      text(' of the rows read were left out (the reasons are in "The data"; the memo flags more than '),
      constNum('EXCLUSION_SHARE', MEMO_CONSTANTS.EXCLUSION_SHARE, { style: 'percent', decimals: 0 }),
      text('). If the rows left out differ from the others, the estimate describes the rows kept, not the whole caseload. Fix the data where the reason allows and run the study again.'),
    )],
  };
}
