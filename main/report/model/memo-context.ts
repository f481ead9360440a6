// What every section of the memo is built from.

import type { Results } from '../../contract/results.ts';
import type { FigureData } from './figure-types.ts';
import type { CountLedger } from './memo-counts.ts';

export interface MemoContext {
  r: Results;
  ledger: CountLedger;
  /** Index of the headline delta in r.settings.deltas. */
  headline: number;
  figures: FigureData;
  words: { one: string; many: string };
}
