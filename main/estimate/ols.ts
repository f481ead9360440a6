// Ordinary least squares on named columns, with the variance estimators of variance.ts and
// normal-reference Wald inference. The numerical work is in linalg.ts (pivoted Householder QR).

import { EstimateInputError } from './errors.ts';
import { normalCritical, waldSummary } from './inference.ts';
import { accurateMean, decompose, solve, type Decomposition } from './linalg.ts';
import type { EstimateWarning, NamedColumn, OlsResult, RegressionOptions, RegressionResult, VarianceType } from './types.ts';
import { checkColumns, INTERCEPT_NAME, resolveVariance } from './validate.ts';
import { clusterCodes, coefficientCovariance, standardErrors, type ClusterCodes } from './variance.ts';

/**
 * OLS of `outcome` on `regressors` (an intercept is added unless `intercept: false`).
 * Collinear columns are dropped (the later one in the given order) with a `collinear-dropped`
 * warning; the degrees of freedom count only the kept columns.
 */
export function ols(outcome: NamedColumn, regressors: readonly NamedColumn[], options: RegressionOptions = {}): OlsResult {
  const n = outcome.values.length;
  checkColumns(
    [{ role: 'outcome', column: outcome }, ...regressors.map((column) => ({ role: 'explanatory', column }))],
    n,
  );
  const type = resolveVariance(options);
  const intercept = options.intercept ?? true;
  requireUnits(n, regressors.length + (intercept ? 1 : 0));
  const clusters = options.clusters ? clusterCodes(options.clusters, n) : undefined;
  const dec = decompose(
    n,
    regressors.map((c) => c.values),
    { intercept, tolerance: options.rankTolerance },
  );
  const names = designNames(regressors, intercept);
  return olsOnDecomposition(dec, names, outcome.values, type, clusters, options.level ?? 0.95);
}

/** Names of the design columns in design order: the intercept first when added. */
export function designNames(columns: readonly NamedColumn[], intercept: boolean): string[] {
  return [...(intercept ? [INTERCEPT_NAME] : []), ...columns.map((c) => c.name)];
}

/** Refuse designs with no residual degrees of freedom before any work is done. */
export function requireUnits(n: number, columns: number): void {
  if (n <= columns) {
    throw new EstimateInputError(
      'too-few-units',
      `There are ${n} units for ${columns} coefficients; the model needs more units than coefficients (drop controls or use more data).`,
    );
  }
}

/** OLS of y on an already factored design (shared by 2SLS first stages and reduced forms). */
export function olsOnDecomposition(
  dec: Decomposition,
  names: readonly string[],
  y: Float64Array,
  type: VarianceType,
  clusters: ClusterCodes | undefined,
  level: number,
): OlsResult {
  const sol = solve(dec, y);
  const base = summarize(dec, names, sol.coefficients, sol.residuals, sol.rss, type, clusters, level);
  let tss = 0;
  if (dec.hasIntercept) {
    const m = accurateMean(y);
    for (let i = 0; i < y.length; i++) tss += (y[i]! - m) * (y[i]! - m);
  } else {
    for (let i = 0; i < y.length; i++) tss += y[i]! * y[i]!;
  }
  return { ...base, rSquared: tss > 0 ? 1 - sol.rss / tss : NaN };
}

/**
 * Assemble a RegressionResult from coefficients and residuals of a fit whose variance is
 * computed on `dec` (for 2SLS: the decomposition of X̂ with the structural residuals).
 */
export function summarize(
  dec: Decomposition,
  names: readonly string[],
  coefficients: Float64Array,
  residuals: Float64Array,
  rss: number,
  type: VarianceType,
  clusters: ClusterCodes | undefined,
  level: number,
): RegressionResult {
  const k = dec.rank;
  const cov = coefficientCovariance(dec, residuals, type, clusters);
  const se = standardErrors(cov.matrix, k);
  const critical = normalCritical(level);
  const keptNames = dec.kept.map((d) => names[d]!);
  return {
    coefficients: keptNames.map((name, j) => waldSummary(name, coefficients[j]!, se[j]!, critical)),
    covariance: cov.matrix,
    dropped: dec.dropped.map((d) => names[d.index]!),
    n: dec.n,
    k,
    dfResidual: dec.n - k,
    clusters: cov.clusters,
    variance: type,
    rss,
    sigma: Math.sqrt(rss / (dec.n - k)),
    residuals,
    warnings: collinearityWarnings(dec, names),
  };
}

/** One `collinear-dropped` warning per dropped column, naming what it is a combination of. */
export function collinearityWarnings(dec: Decomposition, names: readonly string[]): EstimateWarning[] {
  const label = (d: number): string => (dec.hasIntercept && d === 0 ? 'the intercept' : `"${names[d]!}"`);
  return dec.dropped.map((d) => {
    const name = `"${names[d.index]!}"`;
    if (d.zero) {
      return {
        code: 'collinear-dropped',
        message: `${name} was dropped: it is zero for every unit, so its effect cannot be estimated.`,
      };
    }
    const parts = d.combinationOf.map(label);
    const list = parts.length === 0 ? 'the other columns' : joinList(parts);
    return {
      code: 'collinear-dropped',
      message: `${name} was dropped: it is a linear combination of ${list} (e.g. a constant APS in a pure lottery is collinear with the intercept).`,
    };
  });
}

function joinList(parts: readonly string[]): string {
  if (parts.length <= 1) return parts.join('');
  return `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]!}`;
}

/** Find a coefficient by name; undefined when the column was dropped or is not in the model. */
export function coefficientByName(result: RegressionResult, name: string): RegressionResult['coefficients'][number] | undefined {
  return result.coefficients.find((c) => c.name === name);
}
