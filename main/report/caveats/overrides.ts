// Overrides: recorded decisions that differ from the formula. Triggered when they are at least
// 1% of the decisions compared (common practice, no source). The estimate then describes units
// whose receipt follows the formula's verdict; many overrides also suggest the formula in the
// study is not exactly the rule that was applied.

import type { Results } from '../../contract/results.ts';
import { constNum, stateRun, text } from '../model/memo-source.ts';
import { PERCENT, unitWords } from '../model/memo-format.ts';
import { MEMO_CONSTANTS } from '../model/memo-constants.ts';
import { para, type Caveat, type CaveatContext } from './types.ts';

export function overrideCaveat(r: Results, ctx: CaveatContext): Caveat | null {
  const f = r.fidelity;
  if (!f || f.compared === 0 || f.disagree / f.compared < MEMO_CONSTANTS.OVERRIDE_SHARE) return null;
  const { many } = unitWords(r);
  const share = ctx.ledger.share(f.disagree / f.compared, 'fidelity.disagree', 'fidelity.compared');
  return {
    id: 'overrides',
    title: 'Many recorded decisions differ from the formula',
    tone: 'caution',
    body: [para(
      text('The recorded decision differs from the formula’s verdict for '),
      stateRun(ctx.ledger.get('fidelity.disagree'), 'fidelity.disagree'),
      text(` ${many} (`),
      stateRun(share, 'fidelity.disagree / fidelity.compared', PERCENT),
      text(' of those compared; the memo flags shares from '),
      constNum('OVERRIDE_SHARE', MEMO_CONSTANTS.OVERRIDE_SHARE, { style: 'percent', decimals: 0 }),
      text(`). Either staff overrode the formula, or the formula in the study is not exactly the rule that was applied. Check the rule with the program: if it differs, the boundary the analysis uses is in the wrong place.`),
    )],
  };
}
