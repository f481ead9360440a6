// One factorization of the design [1, controls..., Z] shared by every regression that asks "what
// does the offer Z change, holding the controls fixed?": the first stage, the reduced forms of
// several outcomes, the balance regressions of several covariates, the Anderson–Rubin set and the
// just-identified 2SLS. The numerical work is linalg.ts (pivoted Householder QR); this module only
// reads off the offer's coefficient and its robust covariances.
//
// Why one factorization suffices (Frisch–Waugh–Lovell; Davidson & MacKinnon, "Econometric Theory
// and Methods", 2004, §2.4): the coefficient on Z in the regression of any y on [1, W, Z] is
// b = Σ_i c_i y_i with c_i = z̃_i / Σ z̃², z̃ the residual of Z on [1, W]. The row of (X'X)⁻¹X' that
// belongs to Z is c = Q₁·(row of T for Z) (linalg.ts: β = T·Q₁'y), so c costs O(n·K) once.
// The robust covariance of two such coefficients b_j, b_k with residuals e_j, e_k is
//   HC1:  N/(N−K) · Σ_i c_i² e_j,i e_k,i                       (White 1980; MacKinnon & White 1985)
//   CR1:  G/(G−1)·(N−1)/(N−K) · Σ_g (Σ_{i∈g} c_i e_j,i)(Σ_{i∈g} c_i e_k,i)   (Cameron & Miller 2015)
// which is the (Z, Z) element of the sandwich of variance.ts, and for j = k its square root is the
// usual robust standard error. For the just-identified 2SLS with the same controls in both stages,
// β = π_Y/π_D (indirect least squares) and the structural residual is u = e_Y − β·e_D, so the
// robust variance of β is (V_YY − 2β·V_YD + β²·V_DD)/π_D² exactly — the same number the sandwich on
// the projected regressors gives (tsls.ts), without a second factorization.

import { decompose, type Decomposition } from './linalg.ts';
import { collinearityWarnings, designNames } from './ols.ts';
import type { EstimateWarning, NamedColumn } from './types.ts';
import { smallSampleFactor, type ClusterCodes } from './variance.ts';

/** The variance types the design checks use: HC1 by default, CR1 with clusters (CLI.md). */
export type OfferVariance = 'HC1' | 'CR1';

/** The factorization of [1, controls..., Z] and what is read off it; independent of the variance type. */
export interface OfferFactor {
  /** Units in the regression. */
  n: number;
  /** Kept columns K (intercept, kept controls and Z). */
  k: number;
  dec: Decomposition;
  /** Design names in design order: '(intercept)', controls..., offer. */
  names: string[];
  /** The kept design columns other than the intercept, in kept order (for residuals y − Xb). */
  keptColumns: Float64Array[];
  /** Kept controls (collinear ones are dropped, the later one in the given order). */
  keptControls: string[];
  /** Names of dropped columns. */
  dropped: string[];
  /** `collinear-dropped` warnings naming each dropped column. */
  warnings: EstimateWarning[];
  /** False when Z itself is collinear with the controls (it does not vary once they are fixed). */
  identified: boolean;
  /** c_i: the offer coefficient of any outcome y is Σ c_i y_i (empty when not identified). */
  weights: Float64Array;
}

export interface OfferDesign extends OfferFactor {
  variance: OfferVariance;
  clusters: ClusterCodes | undefined;
  /** Small-sample factor: N/(N−K) for HC1, G/(G−1)·(N−1)/(N−K) for CR1. */
  factor: number;
}

/** The offer's coefficient in one regression and its residuals. */
export interface OfferFit {
  coef: number;
  residuals: Float64Array;
}

/**
 * Factor [1, controls..., offer] for n units (all values finite; callers check and word the
 * errors).
 */
export function factorOfferDesign(offer: NamedColumn, controls: readonly NamedColumn[], tolerance?: number): OfferFactor {
  const n = offer.values.length;
  const columns = [...controls, offer];
  const names = designNames(columns, true);
  const dec = decompose(
    n,
    columns.map((c) => c.values),
    { intercept: true, tolerance },
  );
  const zIndex = names.length - 1;
  const identified = dec.kept[dec.kept.length - 1] === zIndex;
  const k = dec.rank;
  const keptSet = new Set(dec.kept);
  const keptControls = controls.filter((_, j) => keptSet.has(1 + j)).map((c) => c.name);
  const dropped = names.filter((_, d) => !keptSet.has(d));
  const keptColumns = dec.kept.filter((d) => d !== 0).map((d) => columns[d - 1]!.values);
  let weights = new Float64Array(0);
  if (identified) {
    // c = Q₁ · tᵀ, t the last row of T (Z is the last kept column).
    weights = new Float64Array(n);
    const row = (k - 1) * k;
    for (let l = 0; l < k; l++) {
      const t = dec.t[row + l]!;
      if (t === 0) continue;
      const off = l * n;
      for (let i = 0; i < n; i++) weights[i] = weights[i]! + t * dec.q[off + i]!;
    }
  }
  return { n, k, dec, names, keptColumns, keptControls, dropped, warnings: collinearityWarnings(dec, names), identified, weights };
}

/** Attach the variance convention: CR1 with clusters (at least 2), else HC1. */
export function withVariance(factor: OfferFactor, clusters: ClusterCodes | undefined): OfferDesign {
  const n = factor.n;
  const variance: OfferVariance = clusters ? 'CR1' : 'HC1';
  const f = smallSampleFactor(n, factor.k, clusters ? clusters.count : null);
  return { ...factor, variance, clusters, factor: f };
}

/** factorOfferDesign + withVariance. */
export function buildOfferDesign(
  offer: NamedColumn,
  controls: readonly NamedColumn[],
  clusters: ClusterCodes | undefined,
  tolerance?: number,
): OfferDesign {
  return withVariance(factorOfferDesign(offer, controls, tolerance), clusters);
}

/**
 * Factorizations kept for reuse while one study is estimated: the headline estimator, the
 * balance checks and both variance conventions share the decomposition of the same design on the
 * same units (issue 3 §7: the dominant cost at a million units is the decomposition).
 * A plain object owned by the caller; nothing global.
 */
export interface DesignCache {
  entries: Array<{ sources: readonly unknown[]; idx: Int32Array; factor: OfferFactor }>;
}

export function createDesignCache(): DesignCache {
  return { entries: [] };
}

/**
 * The factor of the design whose whole-data columns are `sources` (by identity, in design
 * order) restricted to the rows idx; built by `build` on a miss.
 */
export function cachedFactor(cache: DesignCache, sources: readonly unknown[], idx: Int32Array, build: () => OfferFactor): OfferFactor {
  for (const e of cache.entries) {
    if (e.sources.length !== sources.length || e.idx.length !== idx.length) continue;
    if (!e.sources.every((s, j) => s === sources[j])) continue;
    if (e.idx === idx) return e.factor;
    let same = true;
    for (let i = 0; i < idx.length && same; i++) if (e.idx[i] !== idx[i]) same = false;
    if (same) return e.factor;
  }
  const factor = build();
  cache.entries.push({ sources, idx, factor });
  return factor;
}

/**
 * Regress y on the design: β = T·Q₁'(y − ȳ) (+ ȳ on the intercept) with the documented map of
 * linalg.ts, in one fused pass over the K columns of Q₁, then the residuals y − Xβ from the
 * design's own columns in a second pass. Centring y first keeps the residuals accurate when its
 * mean is large. (Memory traffic, not arithmetic, bounds this at a million units: two sweeps
 * instead of one per column and pass.)
 */
export function offerFit(design: OfferFactor, y: Float64Array): OfferFit {
  const { n, k, dec } = design;
  const q = dec.q;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += y[i]!;
  const mean = n > 0 ? sum / n : 0;
  const coords = new Float64Array(k);
  if (k === 3) {
    // The common case [1, APS, Z]: three running sums in one sweep.
    let a = 0;
    let b = 0;
    let c = 0;
    for (let i = 0; i < n; i++) {
      const v = y[i]! - mean;
      a += q[i]! * v;
      b += q[n + i]! * v;
      c += q[2 * n + i]! * v;
    }
    coords[0] = a;
    coords[1] = b;
    coords[2] = c;
  } else {
    for (let i = 0; i < n; i++) {
      const v = y[i]! - mean;
      for (let l = 0; l < k; l++) coords[l] = coords[l]! + q[l * n + i]! * v;
    }
  }
  const beta = new Float64Array(k);
  for (let r = 0; r < k; r++) {
    let s = 0;
    for (let l = 0; l < k; l++) s += dec.t[r * k + l]! * coords[l]!;
    beta[r] = s;
  }
  // The intercept is design column 0 and always kept (it is the first column, never a
  // combination of earlier ones).
  const b0 = beta[0]! + mean;
  const residuals = new Float64Array(n);
  const cols = design.keptColumns;
  if (cols.length === 2) {
    const x1 = cols[0]!;
    const x2 = cols[1]!;
    const b1 = beta[1]!;
    const b2 = beta[2]!;
    for (let i = 0; i < n; i++) residuals[i] = y[i]! - b0 - b1 * x1[i]! - b2 * x2[i]!;
  } else {
    for (let i = 0; i < n; i++) residuals[i] = y[i]! - b0;
    cols.forEach((x, j) => {
      const b = beta[j + 1]!;
      for (let i = 0; i < n; i++) residuals[i] = residuals[i]! - b * x[i]!;
    });
  }
  return { coef: design.identified ? beta[k - 1]! : NaN, residuals };
}

/** Robust covariance of the offer coefficients of two fits on the same design (see header). */
export function offerCovariance(design: OfferDesign, a: Float64Array, b: Float64Array): number {
  return offerCovarianceMatrix(design, a === b ? [a] : [a, b])[a === b ? 0 : 1]!;
}

/**
 * Robust covariance matrix (m×m row-major) of the offer coefficients of m fits on one design,
 * in one pass over the units (the joint covariance of "seemingly unrelated" regressions with the
 * same regressors; Zellner 1962, JASA 57:348–368).
 */
export function offerCovarianceMatrix(design: OfferDesign, residuals: readonly Float64Array[]): Float64Array {
  const m = residuals.length;
  const c = design.weights;
  const n = design.n;
  const out = new Float64Array(m * m);
  if (design.clusters) {
    const { codes, count } = design.clusters;
    const scores = new Float64Array(count * m);
    for (let j = 0; j < m; j++) {
      const e = residuals[j]!;
      for (let i = 0; i < n; i++) scores[codes[i]! * m + j] = scores[codes[i]! * m + j]! + c[i]! * e[i]!;
    }
    for (let g = 0; g < count; g++)
      for (let j = 0; j < m; j++) {
        const sj = scores[g * m + j]!;
        for (let l = j; l < m; l++) out[j * m + l] = out[j * m + l]! + sj * scores[g * m + l]!;
      }
  } else if (m <= 2) {
    const e0 = residuals[0]!;
    const e1 = residuals[m - 1]!;
    let s00 = 0;
    let s01 = 0;
    let s11 = 0;
    for (let i = 0; i < n; i++) {
      const w = c[i]! * c[i]!;
      const u = e0[i]!;
      const v = e1[i]!;
      s00 += w * u * u;
      s01 += w * u * v;
      s11 += w * v * v;
    }
    out[0] = s00;
    if (m === 2) {
      out[1] = s01;
      out[3] = s11;
    }
  } else {
    const row = new Float64Array(m);
    for (let i = 0; i < n; i++) {
      const w = c[i]! * c[i]!;
      for (let j = 0; j < m; j++) row[j] = residuals[j]![i]!;
      for (let j = 0; j < m; j++) {
        const wj = w * row[j]!;
        for (let l = j; l < m; l++) out[j * m + l] = out[j * m + l]! + wj * row[l]!;
      }
    }
  }
  for (let j = 0; j < m; j++)
    for (let l = j; l < m; l++) {
      out[j * m + l] = design.factor * out[j * m + l]!;
      out[l * m + j] = out[j * m + l]!;
    }
  return out;
}
