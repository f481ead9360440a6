// Delta sensitivity, described (not tested): the estimate at one delta lies outside the 95%
// interval at another (findings.sensitivity). The samples are nested, so the estimates are
// correlated and overlap of intervals proves little (Schenker and Gentleman 2001, Am.
// Statistician 55(3):182–186); the memo says what it sees and makes no test of the difference.

import type { Results } from '../../contract/results.ts';
import { text } from '../model/memo-source.ts';
import { outcomeName } from '../model/memo-format.ts';
import { deltaList } from '../model/memo-deltas.ts';
import type { Inline } from '../model/document.ts';
import { para, type Caveat } from './types.ts';

export function sensitivityCaveat(r: Results): Caveat | null {
  const items: Inline[][] = [];
  r.findings.sensitivity.forEach((f, i) => f.outside.forEach((p) => {
    items.push([text(`${outcomeName(r.outcomes[i]!).name}: the estimate at delta `), ...deltaList({ r }, [p.delta]), text(' lies outside the interval at delta '), ...deltaList({ r }, [p.outsideIntervalOf])]);
  }));
  if (!items.length) return null;
  const runs: Inline[] = [text('The estimates at different deltas differ by more than one interval allows: ')];
  items.forEach((it, j) => { if (j) runs.push(text('; ')); runs.push(...it); });
  runs.push(text('. This is a description, not a test (the smaller samples are part of the larger ones). The result may depend on how far from the edge units are allowed to be, which suggests the outcome changes with the formula’s inputs faster than the analysis absorbs. Report the estimate at every delta.'));
  return { id: 'delta-sensitivity', title: 'The estimate depends on the choice of delta', tone: 'caution', body: [para(...runs)] };
}
