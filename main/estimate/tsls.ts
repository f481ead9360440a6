// Two-stage least squares with one or more endogenous regressors, excluded instruments and
// exogenous controls (Theil 1953; Basmann 1957; textbook treatment: Wooldridge, "Econometric
// Analysis of Cross Section and Panel Data", 2nd ed., 2010, ch. 5).
//
//   Z = [1, controls, excluded instruments], X = [1, endogenous, controls]
//   X̂ = P_Z X (the exogenous columns are their own projection),  b = (X̂'X̂)⁻¹ X̂'y,
//   structural residuals u = y − X b (not the second-stage y − X̂ b).
// Variance: the formulas of variance.ts applied to X̂ with u — classical σ²(X̂'X̂)⁻¹ with
// σ² = u'u/(N−K), HC0, HC1 = HC0·N/(N−K), CR1 with G/(G−1)·(N−1)/(N−K) — the conventions of the
// reference results in tests/fixtures/robust-se/README.md. HC2/HC3 are not offered: the leverage
// of 2SLS is not uniquely defined.
//
// Collinearity is screened on Z in the order [1, controls, instruments], so a control collinear
// with others is dropped from both stages, and an instrument that adds nothing beyond the
// controls is the one dropped. The second stage is screened in the order [1, controls,
// endogenous], so an endogenous column that the instruments do not move beyond the controls is
// reported as not identified rather than silently dropping a control.

import { EstimateInputError } from './errors.ts';
import { decompose, solve, type Decomposition } from './linalg.ts';
import { collinearityWarnings, designNames, olsOnDecomposition, requireUnits, summarize } from './ols.ts';
import type { EstimateWarning, NamedColumn, OlsResult, RegressionOptions, RegressionResult, VarianceType } from './types.ts';
import { checkColumns, INTERCEPT_NAME, resolveVariance } from './validate.ts';
import { clusterCodes, waldF } from './variance.ts';

export const TSLS_VARIANCE_TYPES: readonly VarianceType[] = ['classical', 'HC0', 'HC1', 'CR1'];

export interface TslsInput {
  outcome: NamedColumn;
  /** Regressors treated as endogenous (e.g. take-up D). */
  endogenous: readonly NamedColumn[];
  /** Excluded instruments (e.g. the offer Z). */
  instruments: readonly NamedColumn[];
  /** Exogenous controls, included in both stages (e.g. the APS). */
  controls?: readonly NamedColumn[];
}

export interface FirstStage {
  /** The endogenous column this first stage explains. */
  endogenous: string;
  /** OLS of the endogenous column on [1, controls, instruments] (kept columns). */
  fit: OlsResult;
  /** Kept excluded instruments. */
  instruments: string[];
  /** Wald F on the excluded instruments, with the variance type of the 2SLS fit
   *  (b_R' V_R⁻¹ b_R / q; for one instrument, the squared t statistic). */
  F: number;
  /** Number of excluded instruments tested, q. */
  df: number;
}

export interface TslsResult extends RegressionResult {
  /** One first stage per endogenous column, in the given order. */
  firstStages: FirstStage[];
  /** OLS of the outcome on [1, controls, instruments] (the reduced form). */
  reducedForm: OlsResult;
  /** Kept excluded instruments. */
  instruments: string[];
  /** Kept controls. */
  controls: string[];
}

export function tsls(input: TslsInput, options: RegressionOptions = {}): TslsResult {
  const { outcome, endogenous, instruments } = input;
  const controls = input.controls ?? [];
  const n = outcome.values.length;
  checkColumns(
    [
      { role: 'outcome', column: outcome },
      ...endogenous.map((column) => ({ role: 'treatment (endogenous)', column })),
      ...instruments.map((column) => ({ role: 'instrument', column })),
      ...controls.map((column) => ({ role: 'control', column })),
    ],
    n,
  );
  if (endogenous.length === 0) {
    throw new EstimateInputError('bad-option', 'Two-stage least squares needs at least one treatment (endogenous) column; with none, use OLS.');
  }
  if (instruments.length < endogenous.length) {
    throw new EstimateInputError(
      'not-identified',
      `The model has ${endogenous.length} treatment column(s) but ${instruments.length} instrument(s); it needs at least one instrument per treatment column.`,
    );
  }
  if (options.variance === 'HC2' || options.variance === 'HC3') {
    throw new EstimateInputError(
      'bad-option',
      `${options.variance} standard errors are not offered for two-stage least squares (its leverage is not uniquely defined); use HC1, or CR1 with clusters.`,
    );
  }
  const type = resolveVariance(options, TSLS_VARIANCE_TYPES);
  const intercept = options.intercept ?? true;
  const level = options.level ?? 0.95;
  const tolerance = options.rankTolerance;
  requireUnits(n, (intercept ? 1 : 0) + controls.length + instruments.length);
  const clusters = options.clusters ? clusterCodes(options.clusters, n) : undefined;

  // Instrument set Z = [1, controls, instruments], screened in that order.
  const zColumns = [...controls, ...instruments];
  const zNames = designNames(zColumns, intercept);
  const decZ = decompose(
    n,
    zColumns.map((c) => c.values),
    { intercept, tolerance },
  );
  const warnings: EstimateWarning[] = collinearityWarnings(decZ, zNames);
  const offset = intercept ? 1 : 0;
  const keptSet = new Set(decZ.kept);
  const keptControls = controls.filter((_, j) => keptSet.has(offset + j));
  const keptInstruments = instruments.filter((_, j) => keptSet.has(offset + controls.length + j));
  if (keptInstruments.length < endogenous.length) {
    throw new EstimateInputError(
      'not-identified',
      `After dropping instruments that add nothing beyond the controls, ${keptInstruments.length} instrument(s) remain for ${endogenous.length} treatment column(s); the effect cannot be estimated. Check that the instruments vary among units with the same controls.`,
    );
  }

  // First stages (and the fitted, projected regressors X̂).
  const instrumentPositions = decZ.kept
    .map((d, pos) => ({ d, pos }))
    .filter(({ d }) => d >= offset + controls.length)
    .map(({ pos }) => pos);
  const firstStages: FirstStage[] = [];
  const projected: Float64Array[] = [];
  for (const d of endogenous) {
    const fit = olsOnDecomposition(decZ, zNames, d.values, type, clusters, level);
    const coef = Float64Array.from(fit.coefficients, (c) => c.estimate);
    firstStages.push({
      endogenous: d.name,
      fit,
      instruments: keptInstruments.map((c) => c.name),
      F: waldF(coef, fit.covariance, fit.k, instrumentPositions),
      df: instrumentPositions.length,
    });
    const fitted = new Float64Array(n);
    for (let i = 0; i < n; i++) fitted[i] = d.values[i]! - fit.residuals[i]!;
    projected.push(fitted);
  }
  const reducedForm = olsOnDecomposition(decZ, zNames, outcome.values, type, clusters, level);

  // Second stage on X̂, screened in the order [1, controls, endogenous].
  const xhatColumns = [...keptControls.map((c) => c.values), ...projected];
  const xhatNames = designNames([...keptControls, ...endogenous], intercept);
  const decX = decompose(n, xhatColumns, { intercept, tolerance });
  if (decX.dropped.length > 0) {
    const lost = decX.dropped.map((d) => `"${xhatNames[d.index]!}"`).join(', ');
    throw new EstimateInputError(
      'not-identified',
      `The instruments do not move ${lost} beyond what the controls already explain, so its effect cannot be separated from theirs. Check the first stage: the instrument must change take-up among units with the same controls.`,
    );
  }
  const fit2 = solveSecondStage(decX, outcome.values, intercept, keptControls, endogenous);
  const result = summarize(decX, xhatNames, fit2.beta, fit2.residuals, fit2.rss, type, clusters, level);

  // Present the coefficients as [1, endogenous, controls].
  const order = [...(intercept ? [INTERCEPT_NAME] : []), ...endogenous.map((c) => c.name), ...keptControls.map((c) => c.name)];
  const reordered = reorder(result, order);
  return {
    ...reordered,
    dropped: zNames.filter((_, d) => !keptSet.has(d)),
    warnings: [...warnings, ...result.warnings],
    firstStages,
    reducedForm,
    instruments: keptInstruments.map((c) => c.name),
    controls: keptControls.map((c) => c.name),
  };
}

/** b from the regression of y on X̂, then the structural residuals u = y − X b with X's own columns. */
function solveSecondStage(
  decX: Decomposition,
  y: Float64Array,
  intercept: boolean,
  controls: readonly NamedColumn[],
  endogenous: readonly NamedColumn[],
): { beta: Float64Array; residuals: Float64Array; rss: number } {
  // Coefficients: b = (X̂'X̂)⁻¹X̂'y, i.e. least squares of y on X̂.
  const { coefficients: beta } = solve(decX, y);
  const n = y.length;
  const u = y.slice();
  const original = [...controls.map((c) => c.values), ...endogenous.map((c) => c.values)];
  const b0 = intercept ? beta[0]! : 0;
  for (let i = 0; i < n; i++) u[i] = u[i]! - b0;
  original.forEach((x, j) => {
    const b = beta[(intercept ? 1 : 0) + j]!;
    for (let i = 0; i < n; i++) u[i] = u[i]! - b * x[i]!;
  });
  let rss = 0;
  for (let i = 0; i < n; i++) rss += u[i]! * u[i]!;
  return { beta, residuals: u, rss };
}

/** Reorder the coefficients and covariance of a result to the given names (all must be present). */
function reorder(result: RegressionResult, names: readonly string[]): RegressionResult {
  const k = result.k;
  const from = names.map((name) => result.coefficients.findIndex((c) => c.name === name));
  const covariance = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) covariance[i * k + j] = result.covariance[from[i]! * k + from[j]!]!;
  return { ...result, coefficients: from.map((f) => result.coefficients[f]!), covariance };
}
