// Fixed numbers the memo states beside the results (each a NumberRun with source
// "constant:NAME", checked by the memo tests against this table), with their sources. The
// verdict thresholds are those of the findings (main/report/findings/thresholds.ts).

import { FINDING_THRESHOLDS as T } from '../findings/thresholds.ts';

export const MEMO_CONSTANTS = {
  /** First-stage F below which an instrument is called weak: Staiger and Stock (1997), Econometrica 65:557–586. */
  WEAK_F: T.WEAK_F,
  /** F above which the usual ±1.96 t-test is valid at 5%: Lee, McCrary, Moreira and Porter (2022), AER 112(10):3260–3290. */
  TF_FULL: T.TF_FULL,
  /** |Standardized difference| flagged whatever its p: Rubin (2001), Health Services & Outcomes Research Methodology 2:169–188. */
  LARGE_STD_DIFF: T.LARGE_STD_DIFF,
  /** Standardized difference drawn as the balance figure's band: the flag above. */
  BALANCE_BAND: T.LARGE_STD_DIFF,
  /** Significance level of the checks (common practice, no source). */
  ALPHA: T.ALPHA,
  /** Density-test p below which (and from ALPHA) a limit shows a weak sign of sorting (common practice, no source). */
  WEAK_SIGN_P: T.WEAK_SIGN_P,
  /** Clusters below which the usual cluster-robust interval can be too narrow (see thresholds.ts). */
  FEW_CLUSTERS: T.FEW_CLUSTERS,
  /** Share of rows excluded above which the memo adds a caveat (common practice, no source). */
  EXCLUSION_SHARE: 0.05,
  /** Share of recorded decisions differing from the formula above which the memo adds a caveat (common practice, no source). */
  OVERRIDE_SHARE: T.OVERRIDE_SHARE,
  /** Share of the units inside the local-linear bandwidth above which the cross-check is close to a global fit (common practice). */
  NEAR_GLOBAL_SHARE: T.NEAR_GLOBAL_SHARE,
  /** Confidence level of every interval, in percent. */
  LEVEL_PERCENT: 95,
} as const;

export type MemoConstant = keyof typeof MEMO_CONSTANTS;
