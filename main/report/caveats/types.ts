// A caveat is written from the results when its condition holds, and is absent otherwise.
// Each writer is a pure function of the results (and the memo's count ledger, so any count it
// prints is suppressed like every other).

import type { Results } from '../../contract/results.ts';
import type { CountLedger } from '../model/memo-counts.ts';
import type { Paragraph } from '../model/document.ts';

export interface Caveat {
  /** Stable id, e.g. "weak-instrument". */
  id: string;
  title: string;
  tone: 'limitation' | 'caution';
  body: Paragraph[];
}

export interface CaveatContext {
  ledger: CountLedger;
  /** Index of the headline delta in results.settings.deltas. */
  headline: number;
}

export type CaveatWriter = (results: Results, ctx: CaveatContext) => Caveat | null;

export const para = (...runs: Paragraph['runs']): Paragraph => ({ kind: 'paragraph', runs });
