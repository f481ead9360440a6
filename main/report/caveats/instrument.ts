// Weak instrument (findings.instrument.weakAt, every delta where it is weak): at some delta the offer moves take-up too little (robust first-stage F below
// 10; Staiger and Stock 1997, Econometrica 65:557–586). Then the usual interval is unreliable and
// the tF interval (Lee, McCrary, Moreira and Porter 2022, AER 112(10):3260–3290) or the
// Anderson–Rubin set should be read instead.

import type { Results } from '../../contract/results.ts';
import { constNum, num, text } from '../model/memo-source.ts';
import { DELTA, F_STAT, outcomeName } from '../model/memo-format.ts';
import { MEMO_CONSTANTS } from '../model/memo-constants.ts';
import type { Inline } from '../model/document.ts';
import { para, type Caveat } from './types.ts';

export function weakInstrumentCaveat(r: Results): Caveat | null {
  const weak: Inline[][] = [];
  r.outcomes.forEach((o, i) => o.byDelta.forEach((b, k) => {
    if (!r.findings.instrument.weakAt.includes(b.delta) || !b.firstStage || typeof b.firstStage.F !== 'number' || b.firstStage.F >= MEMO_CONSTANTS.WEAK_F) return;
    weak.push([text(`${outcomeName(o).name} at delta `), num(r, `outcomes[${i}].byDelta[${k}].delta`, DELTA), text(': F = '), num(r, `outcomes[${i}].byDelta[${k}].firstStage.F`, F_STAT)]);
  }));
  if (!weak.length) return null;
  const runs: Inline[] = [text('Near the edge, being offered the benefit changes who receives it too little for the usual interval to be trusted where the first-stage F is below '),
    constNum('WEAK_F', MEMO_CONSTANTS.WEAK_F, { style: 'integer' }), text(' ('),
  ];
  weak.forEach((w, j) => { if (j) runs.push(text('; ')); runs.push(...w); });
  runs.push(text('). There, read the tF interval and the Anderson–Rubin set in the Checks section instead of the usual interval; they stay valid when the offer matters little.'));
  return { id: 'weak-instrument', title: 'The offer barely changes who receives the benefit', tone: 'caution', body: [para(...runs)] };
}
