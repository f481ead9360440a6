// Fixed numbers the memo states beside the results (each a NumberRun with source
// "constant:NAME", checked by the memo tests against this table), with their sources.

import { WEAK_F_THRESHOLD } from '../../estimate/weak-iv.ts';

export const MEMO_CONSTANTS = {
  /** First-stage F below which an instrument is called weak: Staiger and Stock (1997), Econometrica 65:557–586. */
  WEAK_F: WEAK_F_THRESHOLD,
  /** F above which the usual ±1.96 t-test is valid at 5%: Lee, McCrary, Moreira and Porter (2022), AER 112(10):3260–3290. */
  TF_FULL: 104.7,
  /** Standardized difference treated as negligible: Austin (2009), Statistics in Medicine 28(25):3083–3107 (common practice, not a test). */
  BALANCE_BAND: 0.1,
  /** Significance level of the checks (common practice, no source). */
  ALPHA: 0.05,
  /** Share of rows excluded above which the memo adds a caveat (common practice, no source). */
  EXCLUSION_SHARE: 0.05,
  /** Share of recorded decisions differing from the formula above which the memo adds a caveat (common practice, no source). */
  OVERRIDE_SHARE: 0.01,
  /** Confidence level of every interval, in percent. */
  LEVEL_PERCENT: 95,
} as const;

export type MemoConstant = keyof typeof MEMO_CONSTANTS;
