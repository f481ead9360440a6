// Imbalance: near the edge, offered and not-offered units should not differ in what was fixed
// before the offer, once the APS is controlled for (docs/method.md §1, "Balance"). Triggered by
// a joint test below the 5% level at some delta, or a standardized difference beyond ±0.1 at the
// headline delta (Austin 2009, Statistics in Medicine 28(25):3083–3107; common practice).

import type { Results } from '../../contract/results.ts';
import { constNum, num, pRun, text } from '../model/memo-source.ts';
import { DELTA, STD_DIFF } from '../model/memo-format.ts';
import { MEMO_CONSTANTS } from '../model/memo-constants.ts';
import type { Inline } from '../model/document.ts';
import { para, type Caveat, type CaveatContext } from './types.ts';

export function imbalanceCaveat(r: Results, ctx: CaveatContext): Caveat | null {
  const joint = r.balanceJoint.map((j, k) => ({ j, k })).filter(({ j }) => j.p !== null && j.p < MEMO_CONSTANTS.ALPHA);
  const delta = r.settings.deltas[ctx.headline];
  const large = r.balance.map((b, k) => ({ b, k })).filter(({ b }) => b.delta === delta && b.standardizedDiff !== null && Math.abs(b.standardizedDiff) > MEMO_CONSTANTS.BALANCE_BAND);
  if (!joint.length && !large.length) return null;
  const body = [];
  if (joint.length) {
    const runs: Inline[] = [text('Offered and not-offered units near the edge differ in their characteristics before the offer more than chance explains (joint test, p below '),
      constNum('ALPHA', MEMO_CONSTANTS.ALPHA, { style: 'decimal', decimals: 2 }), text(', at delta ')];
    joint.forEach(({ k }, i) => {
      if (i) runs.push(text(', '));
      runs.push(num(r, `balanceJoint[${k}].delta`, DELTA), text(': '), ...pRun(r, `balanceJoint[${k}].p`));
    });
    runs.push(text(').'));
    body.push(para(...runs));
  }
  if (large.length) {
    const runs: Inline[] = [text('At the headline delta these characteristics differ by more than '),
      constNum('BALANCE_BAND', MEMO_CONSTANTS.BALANCE_BAND, { style: 'decimal', decimals: 1 }), text(' standard deviations: ')];
    large.forEach(({ b, k }, i) => {
      if (i) runs.push(text('; '));
      runs.push(text(`${b.covariate} `), num(r, `balance[${k}].standardizedDiff`, STD_DIFF));
    });
    runs.push(text('.'));
    body.push(para(...runs));
  }
  body.push(para(text('The comparison near the edge may then not be like for like: the estimate could mix the effect of the benefit with these differences. Check how the inputs of the formula were recorded, and try a smaller delta.')));
  return { id: 'imbalance', title: 'Offered and not-offered units differ near the edge', tone: 'caution', body };
}
