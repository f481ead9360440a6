// Sorting at a limit: more (or fewer) units just on one side of a limit than just on the other,
// by McCrary's (2008, J. Econometrics 142(2):698–714) density test on value − limit. Worded from
// the findings: a jump (p below 0.05) is a caution; a p from 0.05 to below 0.10 is a weak sign of
// sorting, a limitation worded as such. A jump is consistent with units (or staff) adjusting
// reported values to meet a limit, but can also come from how values are recorded.

import type { Results } from '../../contract/results.ts';
import { text } from '../model/memo-source.ts';
import { unitWords } from '../model/memo-format.ts';
import { manipulationVerdictRuns } from '../model/memo-verdicts.ts';
import { para, type Caveat } from './types.ts';

export function manipulationCaveat(r: Results): Caveat | null {
  const v = r.findings.manipulation.verdict;
  if (v !== 'jump' && v !== 'weak sign of sorting') return null;
  const { one } = unitWords(r);
  return {
    id: 'manipulation',
    title: v === 'jump' ? 'Possible sorting at a limit' : 'A weak sign of sorting at a limit',
    tone: v === 'jump' ? 'caution' : 'limitation',
    body: [
      para(...manipulationVerdictRuns(r)),
      para(text(`A jump is what one would see if reported values were adjusted to meet a limit; then a ${one} just inside the limit is not like one just outside, and the estimate may be biased. It can also come from how values are recorded (rounded amounts, or limits that differ by group). Ask the program how the inputs are verified before relying on the estimate.`)),
    ],
  };
}
