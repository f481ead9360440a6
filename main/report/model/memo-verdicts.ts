// The words of the check verdicts that both the Checks section and the caveats print, from the
// findings (main/report/findings), with every number traced to results.json.

import type { Results } from '../../contract/results.ts';
import type { Inline } from './document.ts';
import { MEMO_CONSTANTS } from './memo-constants.ts';
import { deltaList } from './memo-deltas.ts';
import { STD_DIFF, columnLabel, criterionShort, unitWords } from './memo-format.ts';
import { constNum, num, pRun, text } from './memo-source.ts';

const ALPHA = () => constNum('ALPHA', MEMO_CONSTANTS.ALPHA, { style: 'decimal', decimals: 2 });
const LARGE = () => constNum('LARGE_STD_DIFF', MEMO_CONSTANTS.LARGE_STD_DIFF, { style: 'decimal', decimals: 2 });

/** "6 tests of single characteristics and 3 joint tests were run" */
export function balanceCountRuns(r: Results): Inline[] {
  const b = r.findings.balance;
  return [
    num(r, 'findings.balance.tests', { style: 'integer' }), text(` test${b.tests === 1 ? '' : 's'} of single characteristics (each at each delta) and `),
    num(r, 'findings.balance.jointTests', { style: 'integer' }), text(` joint test${b.jointTests === 1 ? '' : 's'} were run`),
  ];
}

/** The flagged characteristics, each with the number that flagged it. */
export function balanceFlagRuns(r: Results, which: 'large difference' | 'adjusted p' | 'unadjusted p only'): Inline[] {
  const runs: Inline[] = [];
  r.findings.balance.flagged.forEach((f, j) => {
    if (!f.why.includes(which)) return;
    if (runs.length) runs.push(text('; '));
    const k = r.balance.findIndex((b) => b.covariate === f.covariate && b.delta === f.delta);
    runs.push(text(`${columnLabel(r, f.covariate)} at delta `), ...deltaList({ r }, [f.delta]), text(': '));
    if (which === 'large difference' && k >= 0) runs.push(num(r, `balance[${k}].standardizedDiff`, STD_DIFF), text(' standard deviations'));
    else if (which === 'adjusted p') runs.push(text('adjusted '), ...pRun(r, `findings.balance.flagged[${j}].adjustedP`));
    else if (k >= 0) runs.push(...pRun(r, `balance[${k}].p`), text(', adjusted '), ...pRun(r, `findings.balance.flagged[${j}].adjustedP`));
  });
  return runs;
}

/** The whole balance verdict after the label. */
export function balanceVerdictRuns(r: Results): Inline[] {
  const b = r.findings.balance;
  const has = (w: 'large difference' | 'adjusted p' | 'unadjusted p only') => b.flagged.some((f) => f.why.includes(w));
  const runs: Inline[] = [...balanceCountRuns(r), text('; the p-values are adjusted for their number (Holm 1979). ')];
  if (b.verdict === 'balanced') {
    runs.push(text('None is below '), ALPHA(), text(' after the adjustment, and no standardized difference is beyond '), LARGE(), text(' (Rubin 2001): the differences are within what chance explains.'));
    return runs;
  }
  if (b.verdict === 'imbalance') {
    runs.push(text('After the adjustment the differences are beyond chance (below '), ALPHA(), text(')'));
    if (has('adjusted p')) runs.push(text(' for '), ...balanceFlagRuns(r, 'adjusted p'));
    if (b.jointRejectedAt.length) runs.push(text(has('adjusted p') ? ', and in' : ' in'), text(' the joint test at delta '), ...deltaList({ r }, b.jointRejectedAt));
    runs.push(text('.'));
  } else {
    runs.push(text('No test is below '), ALPHA(), text(' after the adjustment, so this is no evidence of imbalance.'));
  }
  if (has('large difference')) runs.push(text(' These differ by more than '), LARGE(), text(' standard deviations whatever their p-value (Rubin 2001): '), ...balanceFlagRuns(r, 'large difference'), text('.'));
  if (has('unadjusted p only')) runs.push(text(' Below '), ALPHA(), text(' before the adjustment only: '), ...balanceFlagRuns(r, 'unadjusted p only'), text('.'));
  runs.push(...balanceAdviceRuns(r));
  return runs;
}

export function balanceAdviceRuns(r: Results): Inline[] {
  const a = r.findings.balance.advice;
  if (a === 'read the smaller delta') return [text(' The smallest delta shows no such difference: give its estimate the most weight.')];
  if (a === 'check the inputs and characteristics') return [text(' The smallest delta is among those flagged, so a smaller delta is no remedy: check how the inputs of the formula and these characteristics were recorded.')];
  return [];
}

/** The density verdict after the label: how many tests, how many ran, and each limit's p. */
export function manipulationVerdictRuns(r: Results): Inline[] {
  const m = r.findings.manipulation;
  const { one } = unitWords(r);
  const runs: Inline[] = [num(r, 'findings.manipulation.tests', { style: 'integer' }), text(` density test${m.tests === 1 ? '' : 's'} at the limits`)];
  const notRun = m.tests - m.ran;
  if (notRun > 0) runs.push(text('; '), num(r, 'findings.manipulation.ran', { style: 'integer' }), text(' ran and the others could not (too few values near the limit)'));
  runs.push(text('. '));
  if (m.verdict === 'not tested') { runs.push(text('No test could be run, so sorting at the limits was not checked.')); return runs; }
  const at = (v: string) => m.limits.map((l, k) => ({ l, k })).filter(({ l }) => l.verdict === v);
  const list = (items: Array<{ l: { atom: number }; k: number }>) => {
    const out: Inline[] = [];
    items.forEach(({ l, k }, i) => { if (i) out.push(text('; ')); out.push(text(`“${criterionShort(r, l.atom, one)}”, `), ...pRun(r, `density[${k}].p`)); });
    return out;
  };
  const jumps = at('jump');
  const weak = at('weak sign of sorting');
  if (jumps.length) runs.push(text('p is below '), ALPHA(), text(' at '), ...list(jumps), text(': the number of units changes abruptly there. '));
  if (weak.length) runs.push(text('p is between '), ALPHA(), text(' and '), constNum('WEAK_SIGN_P', MEMO_CONSTANTS.WEAK_SIGN_P, { style: 'decimal', decimals: 2 }), text(' at '), ...list(weak), text(': a weak sign of sorting, not a finding of it. '));
  if (!jumps.length && !weak.length) runs.push(text(`At every limit tested p is at least `), constNum('WEAK_SIGN_P', MEMO_CONSTANTS.WEAK_SIGN_P, { style: 'decimal', decimals: 2 }), text(', above '), ALPHA(), text(': no jump.'));
  return runs;
}
