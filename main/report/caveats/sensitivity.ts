// Delta sensitivity: the 95% intervals at two deltas do not overlap (main/estimate/sensitivity.ts;
// Schenker and Gentleman 2001, Am. Statistician 55:182–186). The result then depends on how far
// from the edge units are allowed to be.

import type { Results } from '../../contract/results.ts';
import { num, text } from '../model/memo-source.ts';
import { DELTA, outcomeName } from '../model/memo-format.ts';
import type { Inline } from '../model/document.ts';
import { para, type Caveat } from './types.ts';

export function sensitivityCaveat(r: Results): Caveat | null {
  const items: Inline[][] = [];
  r.outcomes.forEach((o, i) => o.sensitivity.flagged.forEach((p) => {
    const a = r.settings.deltas.indexOf(p.deltaA);
    const b = r.settings.deltas.indexOf(p.deltaB);
    if (a < 0 || b < 0) return;
    items.push([text(`${outcomeName(o).name}: delta `), num(r, `settings.deltas[${a}]`, DELTA), text(' and delta '), num(r, `settings.deltas[${b}]`, DELTA)]);
  }));
  if (!items.length) return null;
  const runs: Inline[] = [text('The estimates at different deltas disagree by more than their uncertainty allows (their 95% intervals do not overlap): ')];
  items.forEach((it, j) => { if (j) runs.push(text('; ')); runs.push(...it); });
  runs.push(text('. The result depends on how far from the edge units are allowed to be, which suggests the outcome changes with the formula’s inputs faster than the analysis absorbs. Give most weight to the smallest delta and report all of them.'));
  return { id: 'delta-sensitivity', title: 'The estimate depends on the choice of delta', tone: 'caution', body: [para(...runs)] };
}
