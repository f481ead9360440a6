// Types at the boundary of the regression core (OLS, 2SLS, variance, weak-instrument checks).
// Pure types: no behaviour lives here.

/** One design or outcome column: a name the analyst recognises and one value per unit. */
export interface NamedColumn {
  name: string;
  values: Float64Array;
}

/**
 * Variance estimators (formulas and sources in variance.ts):
 * - `classical`: s²(X'X)⁻¹, s² = e'e/(N−K)
 * - `HC0`..`HC3`: heteroskedasticity-robust sandwiches (White 1980; MacKinnon & White 1985)
 * - `CR1`: cluster-robust with the G/(G−1)·(N−1)/(N−K) factor (Cameron & Miller 2015)
 */
export type VarianceType = 'classical' | 'HC0' | 'HC1' | 'HC2' | 'HC3' | 'CR1';

/** Cluster identifiers, one per unit (numbers or strings; missing values are refused). */
export type ClusterIds = ArrayLike<number> | readonly string[];

/** Something the analyst should know about a result; it does not stop the estimate. */
export interface EstimateWarning {
  code: string;
  message: string;
}

/** One coefficient with its Wald (normal-reference) inference. */
export interface CoefficientEstimate {
  name: string;
  estimate: number;
  se: number;
  /** estimate / se, referred to the standard normal. */
  z: number;
  /** Two-sided p-value, 2·Φ(−|z|). */
  p: number;
  /** Wald interval estimate ± z_{1−α/2}·se at the requested level (default 95%). */
  ci: [number, number];
}

/** Options shared by the OLS and 2SLS estimators. */
export interface RegressionOptions {
  /** Add a column of ones (default true). */
  intercept?: boolean;
  /** Default: `CR1` when `clusters` is given, else `HC1` (docs CLI.md). */
  variance?: VarianceType;
  /** Cluster id per unit; required for `CR1` and only allowed with it. */
  clusters?: ClusterIds;
  /** Confidence level of the Wald intervals (default 0.95). */
  level?: number;
  /**
   * Relative tolerance for deciding that a column is a linear combination of earlier ones
   * (see linalg.ts). Default DEFAULT_RANK_TOLERANCE.
   */
  rankTolerance?: number;
}

/** The fitted linear model, shared by OLS and the stages of 2SLS. */
export interface RegressionResult {
  /** Kept columns in the given order (intercept first when added). */
  coefficients: CoefficientEstimate[];
  /** Covariance of the kept coefficients, K×K row-major, same order as `coefficients`. */
  covariance: Float64Array;
  /** Names of the columns dropped as collinear (their effect is not estimated). */
  dropped: string[];
  /** Number of units used. */
  n: number;
  /** Number of kept columns K (the degrees-of-freedom count uses only these). */
  k: number;
  /** N − K. */
  dfResidual: number;
  /** Number of clusters when the variance is CR1, else null. */
  clusters: number | null;
  variance: VarianceType;
  /** Sum of squared residuals. For 2SLS, of the structural residuals y − Xb. */
  rss: number;
  /** sqrt(rss/(N−K)). */
  sigma: number;
  /** Residuals, one per unit (2SLS: structural residuals y − Xb). */
  residuals: Float64Array;
  warnings: EstimateWarning[];
}

export interface OlsResult extends RegressionResult {
  /** Centred R² with an intercept, uncentred (1 − RSS/Σy²) without. */
  rSquared: number;
}
