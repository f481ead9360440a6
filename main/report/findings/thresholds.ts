// The fixed thresholds behind every verdict the product states, each with its source. The memo
// prints them as constants (memo-constants.ts reads them from here), so a threshold changes in
// one place only.

import { WEAK_F_THRESHOLD } from '../../estimate/weak-iv.ts';

export const FINDING_THRESHOLDS = {
  /** First-stage F below which an instrument is called weak: Staiger and Stock (1997), Econometrica 65:557–586. */
  WEAK_F: WEAK_F_THRESHOLD,
  /** F at or above which the usual ±1.96 t-test is valid at 5%, so the tF interval need not be read: Lee, McCrary, Moreira and Porter (2022), AER 112(10):3260–3290. */
  TF_FULL: 104.7,
  /** Significance level of every check (common practice, no source). */
  ALPHA: 0.05,
  /** A density-test p from ALPHA up to (not including) this is a weak sign of sorting (common practice, no source). */
  WEAK_SIGN_P: 0.1,
  /** |standardized difference| beyond which a characteristic is flagged whatever its p: Rubin (2001),
   * "Using propensity scores to help design observational studies", Health Services & Outcomes
   * Research Methodology 2:169–188 (his bound of a quarter of a standard deviation, as commonly read). */
  LARGE_STD_DIFF: 0.25,
  /** Below this many clusters the usual cluster-robust interval can be too narrow: Cameron, Gelbach
   * and Miller (2008), Rev. Econ. Stat. 90(3):414–427 (from memory; they study 5 to 30 clusters). */
  FEW_CLUSTERS: 50,
  /** Share of recorded decisions differing from the formula from which fidelity is in doubt (common practice, no source). */
  OVERRIDE_SHARE: 0.01,
  /** Share of the units with the outcome inside the local-linear bandwidth above which the cross-check is close to a global fit ("most of the data"; common practice, no source). */
  NEAR_GLOBAL_SHARE: 0.5,
} as const;
