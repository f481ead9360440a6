// The figures that show a rule's edge when there is no two-input map to draw (and beside it when
// there is): take-up and each outcome against the signed distance to the nearest edge, and the
// density of units around each limit. The same figure builders as the memo's (memo-charts.ts),
// with the same small-cell rules, so the app and the memo show one picture.

import type { Results } from '../../contract/results.ts';
import type { Figure } from './document.ts';
import type { FigureData } from './figure-types.ts';
import { densityFigure, distanceFigure } from './memo-charts.ts';
import type { MemoContext } from './memo-context.ts';
import { buildCountLedger } from './memo-counts.ts';
import { headlineIndex, unitWords } from './memo-format.ts';

export function edgeFigures(results: Results, figures: Pick<FigureData, 'signedDistance' | 'density'>): Figure[] {
  const ctx: MemoContext = {
    r: results, ledger: buildCountLedger(results), headline: headlineIndex(results),
    figures: { boundaryMap: null, boundaryMapNote: null, balanceAll: [], ...figures }, words: unitWords(results),
  };
  const all = [
    distanceFigure(ctx, 'takeUp'),
    ...results.outcomes.map((_, i) => distanceFigure(ctx, i)),
    ...results.density.map((_, k) => densityFigure(ctx, k)),
  ];
  return all.filter((f): f is Figure => f !== null);
}
