// Manipulation: more (or fewer) units just on one side of a limit than just on the other, by
// McCrary's (2008, J. Econometrics 142(2):698–714) density test on value − limit, at the 5% level.
// A jump is consistent with units (or staff) adjusting reported values to meet a limit, but can
// also come from how values are recorded (rounding, limits that differ by group).

import type { Results } from '../../contract/results.ts';
import { constNum, pRun, text } from '../model/memo-source.ts';
import { criterionText, unitWords } from '../model/memo-format.ts';
import { MEMO_CONSTANTS } from '../model/memo-constants.ts';
import type { Inline } from '../model/document.ts';
import { para, type Caveat } from './types.ts';

export function manipulationCaveat(r: Results): Caveat | null {
  const jumps = r.density.map((d, k) => ({ d, k })).filter(({ d }) => d.p !== null && d.p < MEMO_CONSTANTS.ALPHA);
  if (!jumps.length) return null;
  const { one, many } = unitWords(r);
  const items: Inline[] = [text(`The number of ${many} changes abruptly at a limit (density test, p below `),
    constNum('ALPHA', MEMO_CONSTANTS.ALPHA, { style: 'decimal', decimals: 2 }), text('). At '),
  ];
  jumps.forEach(({ d, k }, i) => {
    if (i) items.push(text('; at '));
    items.push(text(`“${criterionText(r, d.atom, one)}”: ${d.logDifference !== null && d.logDifference > 0 ? 'more' : 'fewer'} ${many} just above the limit than just below it, `), ...pRun(r, `density[${k}].p`));
  });
  items.push(text('.'));
  return {
    id: 'manipulation',
    title: 'Possible sorting at a limit',
    tone: 'caution',
    body: [
      para(...items),
      para(text(`Such a jump is what one would see if reported values were adjusted to meet a limit; then a ${one} just inside the limit is not like one just outside, and the estimate may be biased. It can also come from how values are recorded (rounded amounts, or limits that differ by group). Ask the program how the inputs are verified before relying on the estimate.`)),
    ],
  };
}
