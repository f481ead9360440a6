// Covariance of least-squares coefficients: classical, heteroskedasticity-robust (HC0–HC3) and
// cluster-robust (CR1), all as sandwiches T·M·Tᵀ over the thin QR factor (linalg.ts), so that
// X'X is never formed or inverted.
//
// Conventions (N units, K kept columns — dropped collinear columns do not count —, G clusters,
// e_i residuals, h_ii leverages, x_i the i-th row of the design; for 2SLS the same formulas are
// applied to the projected regressors X̂ = P_Z X with the structural residuals u = y − Xb):
//   classical  s²(X'X)⁻¹, s² = e'e/(N−K).
//   HC0        (X'X)⁻¹ [Σ e_i² x_i x_i'] (X'X)⁻¹ — White (1980), Econometrica 48:817–838.
//   HC1        HC0 · N/(N−K) — MacKinnon & White (1985), J. Econometrics 29:305–325 (after Hinkley 1977).
//   HC2        weights e_i²/(1−h_ii) — MacKinnon & White (1985).
//   HC3        weights e_i²/(1−h_ii)² — MacKinnon & White (1985); recommended in small samples by
//              Long & Ervin (2000), Am. Statistician 54:217–224.
//   CR1        G/(G−1)·(N−1)/(N−K) · (X'X)⁻¹ [Σ_g X_g'e_g e_g'X_g] (X'X)⁻¹ — Cameron & Miller (2015),
//              "A practitioner's guide to cluster-robust inference", J. Human Resources 50:317–372.
// These match the conventions of the reference results in tests/fixtures/robust-se/README.md.

import { EstimateInputError } from './errors.ts';
import { clusterMeat, inverseGram, leverages, sandwich, weightedMeat, type Decomposition } from './linalg.ts';
import type { ClusterIds, VarianceType } from './types.ts';
import { globalClusterCodes, type ClusterCodes } from './cluster-codes.ts';

export const VARIANCE_TYPES: readonly VarianceType[] = ['classical', 'HC0', 'HC1', 'HC2', 'HC3', 'CR1'];

export type { ClusterCodes };

/** Map cluster ids to dense codes; refuses missing ids with the position of the first one. */
export function clusterCodes(ids: ClusterIds, n: number, what = 'the cluster column'): ClusterCodes {
  if (ids.length !== n) {
    throw new EstimateInputError(
      'length-mismatch',
      `${capitalize(what)} has ${ids.length} values but the data have ${n} units; give one cluster id per unit.`,
    );
  }
  const { codes, count } = globalClusterCodes(ids);
  const missing = codes.indexOf(-1);
  if (missing >= 0) {
    throw new EstimateInputError(
      'bad-clusters',
      `${capitalize(what)} is missing for unit ${missing + 1} of the estimation sample; every unit needs a cluster id (or leave clustering out).`,
    );
  }
  return { codes, count };
}

export interface CovarianceResult {
  /** K×K row-major covariance of the kept coefficients. */
  matrix: Float64Array;
  /** Number of clusters for CR1, else null. */
  clusters: number | null;
}

/**
 * Covariance of the coefficients of a fit with decomposition `dec` and residuals `residuals`.
 * `clusters` is required for CR1. Refuses HC2/HC3 when some unit has leverage 1 (its weight
 * 1/(1−h) is infinite).
 */
export function coefficientCovariance(
  dec: Decomposition,
  residuals: Float64Array,
  type: VarianceType,
  clusters?: ClusterCodes,
): CovarianceResult {
  const n = dec.n;
  const k = dec.rank;
  const df = n - k;
  if (df <= 0) {
    throw new EstimateInputError(
      'too-few-units',
      `There are ${n} units for ${k} coefficients; standard errors need more units than coefficients.`,
    );
  }
  switch (type) {
    case 'classical': {
      let rss = 0;
      for (let i = 0; i < n; i++) rss += residuals[i]! * residuals[i]!;
      const s2 = rss / df;
      return { matrix: inverseGram(dec).map((v) => v * s2), clusters: null };
    }
    case 'HC0':
    case 'HC1':
    case 'HC2':
    case 'HC3': {
      const w = new Float64Array(n);
      for (let i = 0; i < n; i++) w[i] = residuals[i]! * residuals[i]!;
      if (type === 'HC2' || type === 'HC3') {
        const h = leverages(dec);
        for (let i = 0; i < n; i++) {
          const oneMinusH = 1 - h[i]!;
          if (!(oneMinusH > 1e-10)) {
            throw new EstimateInputError(
              'leverage-one',
              `${type} standard errors are undefined here: unit ${i + 1} of the estimation sample alone determines a coefficient (leverage 1). Use HC1, or remove the column that singles it out.`,
            );
          }
          w[i] = type === 'HC2' ? w[i]! / oneMinusH : w[i]! / (oneMinusH * oneMinusH);
        }
      }
      const v = sandwich(dec, weightedMeat(dec, w));
      if (type === 'HC1') {
        const f = smallSampleFactor(n, k, null);
        for (let i = 0; i < v.length; i++) v[i] = v[i]! * f;
      }
      return { matrix: v, clusters: null };
    }
    case 'CR1': {
      if (!clusters) {
        throw new EstimateInputError('bad-option', 'CR1 (cluster-robust) standard errors need a cluster id for every unit; give the cluster column or choose HC1.');
      }
      const g = clusters.count;
      if (g < 2) {
        throw new EstimateInputError('bad-clusters', `Cluster-robust standard errors need at least 2 clusters; the data have ${g}. Choose HC1 instead.`);
      }
      const v = sandwich(dec, clusterMeat(dec, residuals, clusters.codes, g));
      const f = smallSampleFactor(n, k, g);
      for (let i = 0; i < v.length; i++) v[i] = v[i]! * f;
      return { matrix: v, clusters: g };
    }
  }
}

/**
 * The finite-sample factor of HC1, n/(n − k), and of CR1, G/(G − 1) · (n − 1)/(n − k) (MacKinnon and
 * White 1985; Cameron and Miller 2015, §VI.B): `clusters` is G, or null for HC1.
 */
export function smallSampleFactor(n: number, k: number, clusters: number | null): number {
  return clusters === null ? n / (n - k) : (clusters / (clusters - 1)) * ((n - 1) / (n - k));
}

/** Square roots of the diagonal of a K×K row-major covariance. */
export function standardErrors(cov: Float64Array, k: number): Float64Array {
  const se = new Float64Array(k);
  for (let i = 0; i < k; i++) se[i] = Math.sqrt(Math.max(0, cov[i * k + i]!));
  return se;
}

/**
 * Wald statistic b_Rᵀ V_R⁻¹ b_R / q for the coefficients at `positions` (q of them), by a
 * Cholesky factorization of the q×q block (Golub & Van Loan §4.2). NaN when the block is not
 * positive definite (the hypothesis is then not testable with this covariance).
 */
export function waldF(coef: Float64Array, cov: Float64Array, k: number, positions: readonly number[]): number {
  const q = positions.length;
  if (q === 0) return NaN;
  const l = new Float64Array(q * q);
  for (let i = 0; i < q; i++)
    for (let j = 0; j <= i; j++) {
      let s = cov[positions[i]! * k + positions[j]!]!;
      for (let m = 0; m < j; m++) s -= l[i * q + m]! * l[j * q + m]!;
      if (i === j) {
        if (!(s > 0)) return NaN;
        l[i * q + i] = Math.sqrt(s);
      } else {
        l[i * q + j] = s / l[j * q + j]!;
      }
    }
  // Solve L w = b_R; then the statistic is wᵀw / q.
  let stat = 0;
  const w = new Float64Array(q);
  for (let i = 0; i < q; i++) {
    let s = coef[positions[i]!]!;
    for (let m = 0; m < i; m++) s -= l[i * q + m]! * w[m]!;
    w[i] = s / l[i * q + i]!;
    stat += w[i]! * w[i]!;
  }
  return stat / q;
}

function capitalize(s: string): string {
  return s.length === 0 ? s : s[0]!.toUpperCase() + s.slice(1);
}
