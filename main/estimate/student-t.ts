// Student t distribution for cluster-robust inference with few clusters. Pure.
//
// CDF through the regularized incomplete beta function (Abramowitz & Stegun 1964, "Handbook of
// Mathematical Functions", 26.7.1 with 26.5.27): for ν degrees of freedom,
//   P(|T| > |t|) = I_{ν/(ν+t²)}(ν/2, 1/2),
// so the two-sided p-value is one call of the incomplete beta (from @stdlib, as the ball geometry
// of main/design already uses). The quantile inverts the CDF by bisection on [0, ∞) after a
// bracketing search: slow per call, but a study asks for a handful of critical values.
//
// Why t(G − 1) with CR1: with G clusters the cluster-robust variance is a sum of G outer products,
// and Wald tests referred to the normal over-reject when G is small; referring t = b/se_CR1 to
// t(G − 1) is the common small-G correction (Cameron, Gelbach & Miller 2008, REStat 90:414–427;
// Cameron & Miller 2015, J. Human Resources 50:317–372, §VI.C). Common practice, not an exact result.

import betainc from '@stdlib/math-base-special-betainc';
import { normalCritical, twoSidedNormalP } from './inference.ts';

/** Two-sided p-value P(|T_ν| ≥ |t|). ν = Infinity gives the normal p-value. */
export function twoSidedTP(t: number, df: number): number {
  if (Number.isNaN(t) || !(df > 0)) return NaN;
  if (df === Infinity) return twoSidedNormalP(t);
  if (!Number.isFinite(t)) return 0;
  return betainc(df / (df + t * t), df / 2, 0.5);
}

/** The t quantile c with P(|T_ν| ≤ c) = level (e.g. t(11), level 0.95 → 2.201). */
const criticalMemo = new Map<string, number>();

export function tCritical(level: number, df: number): number {
  const z = normalCritical(level); // also validates level
  if (df === Infinity) return z;
  if (!(df > 0)) return NaN;
  const key = `${level}:${df}`;
  const hit = criticalMemo.get(key);
  if (hit !== undefined) return hit;
  const c = invertTwoSided(1 - level, df, z);
  criticalMemo.set(key, c);
  return c;
}

function invertTwoSided(alpha: number, df: number, z: number): number {
  // twoSidedTP(c) decreases in c; the t quantile exceeds the normal one, so start there.
  let lo = 0;
  let hi = Math.max(z, 1);
  while (twoSidedTP(hi, df) > alpha) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Infinity;
  }
  for (let i = 0; i < 200 && hi - lo > 1e-13 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (twoSidedTP(mid, df) > alpha) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The reference distribution of a Wald statistic: t(G − 1) with CR1 and G clusters, else the
 * normal (HC1). One place so every clustered test of a study says the same.
 */
export interface Reference {
  /** Degrees of freedom: G − 1 with clusters, Infinity for the normal. */
  df: number;
  critical: number;
  p(stat: number): number;
}

export function referenceFor(level: number, clusters: number | null | undefined): Reference {
  const df = clusters && clusters >= 2 ? clusters - 1 : Infinity;
  const critical = tCritical(level, df);
  return { df, critical, p: (stat: number) => twoSidedTP(stat, df) };
}
