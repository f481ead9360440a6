// Wald inference with a standard-normal reference distribution: z = b/se, two-sided p-value
// 2·Φ(−|z|) (computed from the lower tail so that tiny p-values keep their digits), and the
// interval b ± z_{1−α/2}·se. Φ and Φ⁻¹ come from @stdlib (normal cdf / quantile).

import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import { EstimateInputError } from './errors.ts';
import type { CoefficientEstimate } from './types.ts';

/** Two-sided critical value z_{1−α/2} for a confidence level (e.g. 1.959964 for 0.95). */
export function normalCritical(level: number): number {
  if (!(level > 0 && level < 1)) {
    throw new EstimateInputError('bad-option', `The confidence level must be between 0 and 1 (for example 0.95); got ${level}.`);
  }
  return normalQuantile(1 - (1 - level) / 2, 0, 1);
}

/** Two-sided p-value of a standard-normal statistic. */
export function twoSidedNormalP(z: number): number {
  if (Number.isNaN(z)) return NaN;
  return 2 * normalCdf(-Math.abs(z), 0, 1);
}

export function waldSummary(name: string, estimate: number, se: number, critical: number): CoefficientEstimate {
  const z = estimate / se;
  return {
    name,
    estimate,
    se,
    z,
    p: twoSidedNormalP(z),
    ci: [estimate - critical * se, estimate + critical * se],
  };
}
