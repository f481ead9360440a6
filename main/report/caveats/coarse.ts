// Coarse inputs: a continuous input recorded in steps as large as the neighbourhood at some delta
// (main/design/resolution.ts; Lee and Card 2008, J. Econometrics 142(2):655–674). The warning's
// own text from results.json names the variable, the step and the deltas affected.

import type { Results } from '../../contract/results.ts';
import { text } from '../model/memo-source.ts';
import { para, type Caveat } from './types.ts';

export function coarseVariableCaveat(r: Results): Caveat | null {
  const ws = r.warnings.filter((w) => w.code === 'coarse-variable');
  if (!ws.length) return null;
  return {
    id: 'coarse-variable',
    title: 'An input is recorded too coarsely for the smallest deltas',
    tone: 'caution',
    body: ws.map((w) => para(text(w.message))),
  };
}
