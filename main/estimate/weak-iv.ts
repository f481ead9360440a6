// Weak-instrument diagnostics and weak-instrument-robust inference for one endogenous regressor
// and one excluded instrument (docs METHOD.md §2):
// - the robust first-stage F (the squared robust t of the instrument), flagged below 10
//   (Staiger & Stock 1997, Econometrica 65:557–586);
// - the tF critical value c(F) of Lee, McCrary, Moreira & Porter (2022), "Valid t-ratio inference
//   for IV", AER 112(10):3260–3290, and the interval b ± c(F)·se;
// - the Anderson–Rubin (1949) confidence set, heteroskedasticity- or cluster-robust, by inverting
//   a quadratic in β (set shapes: Mikusheva 2010, J. Econometrics 157:236–247).

import { EstimateInputError } from './errors.ts';
import { normalCritical } from './inference.ts';
import { decompose, leverages, solve, type Decomposition } from './linalg.ts';
import { collinearityWarnings, designNames, requireUnits } from './ols.ts';
import { tsls, type TslsResult } from './tsls.ts';
import type { EstimateWarning, NamedColumn, RegressionOptions, VarianceType } from './types.ts';
import { checkColumns, resolveVariance } from './validate.ts';
import { clusterCodes, smallSampleFactor, type ClusterCodes } from './variance.ts';

/** One endogenous regressor, one excluded instrument, exogenous controls. */
export interface SingleInstrumentInput {
  outcome: NamedColumn;
  endogenous: NamedColumn;
  instrument: NamedColumn;
  controls?: readonly NamedColumn[];
}

// ---- First-stage F --------------------------------------------------------------------------

/** Rule-of-thumb threshold for the first-stage F (Staiger & Stock 1997). */
export const WEAK_F_THRESHOLD = 10;

// ---- tF (Lee, McCrary, Moreira & Porter 2022) -----------------------------------------------

/**
 * 5% tF critical values c(F) as pairs [first-stage F, c]. FROM MEMORY ([M-transcribed] in
 * METHOD.md §2): the anchor points F = 104.7 → 1.96 and F = 10 → 3.43 were checked against the
 * paper's text; the rest must be verified against the paper's table before shipping.
 */
export const TF_CRITICAL_VALUES_5PCT: ReadonlyArray<readonly [number, number]> = [
  [4.0, 18.66],
  [4.84, 7.37],
  [6.25, 4.92],
  [9.0, 3.65],
  [10.0, 3.43],
  [16.0, 2.8],
  [25.0, 2.46],
  [36.0, 2.27],
  [49.0, 2.16],
  [64.0, 2.08],
  [81.0, 2.02],
  [100.0, 1.97],
  [104.7, 1.96],
];

/** At or below F = z²_{0.975} = 3.8415 no finite critical value gives 5% size: the tF interval is
 * the whole line (Lee et al. 2022). */
export const TF_UNBOUNDED_AT_OR_BELOW = normalCritical(0.95) ** 2;

/**
 * c(F) for a 5% two-sided tF test. Between table points: linear in F. The table is convex and
 * decreasing, so the chord lies above the curve and the interpolated value errs on the
 * conservative (wider) side — our choice, no published rule. Between 3.8415 (c = ∞) and the
 * first entry F = 4: linear in 1/c from 0 (also our choice). Infinity at or below 3.8415.
 */
export function tfCriticalValue(F: number): number {
  if (Number.isNaN(F)) return NaN;
  const table = TF_CRITICAL_VALUES_5PCT;
  const first = table[0]!;
  const last = table[table.length - 1]!;
  if (F <= TF_UNBOUNDED_AT_OR_BELOW) return Infinity;
  if (F >= last[0]) return last[1];
  if (F < first[0]) {
    const frac = (F - TF_UNBOUNDED_AT_OR_BELOW) / (first[0] - TF_UNBOUNDED_AT_OR_BELOW);
    return 1 / (frac * (1 / first[1]));
  }
  for (let i = 1; i < table.length; i++) {
    const [f1, c1] = table[i]!;
    if (F <= f1) {
      const [f0, c0] = table[i - 1]!;
      return c0 + ((F - f0) / (f1 - f0)) * (c1 - c0);
    }
  }
  return last[1];
}

export interface TfResult {
  /** c(F); null when the interval is unbounded (F ≤ 3.8415). */
  critical: number | null;
  /** b ± c(F)·se; [null, null] (the whole line) when unbounded. */
  interval: [number | null, number | null];
}

/** The 95% tF interval of Lee et al. (2022) for a 2SLS estimate with first-stage F. Always 95%:
 * the table is for a 5% test, whatever `level` the Wald intervals use. */
export function tfInterval(estimate: number, se: number, F: number): TfResult {
  const c = tfCriticalValue(F);
  if (!Number.isFinite(c)) return { critical: null, interval: [null, null] };
  return { critical: c, interval: [estimate - c * se, estimate + c * se] };
}

// ---- Anderson–Rubin set ---------------------------------------------------------------------

export type ArShape = 'interval' | 'two-rays' | 'whole-line' | 'half-line';

export interface ArSet {
  /**
   * `interval`: one bounded interval; `two-rays`: (−∞, l] ∪ [u, ∞); `whole-line`: every value;
   * `half-line`: one ray (only when the first-stage F equals the critical value exactly).
   */
  kind: ArShape;
  /** The set as intervals, null for ±infinity (the `arCi` field of results.json). */
  intervals: Array<[number | null, number | null]>;
  /** The quadratic a·β² + b·β + c ≤ 0 that defines the set. */
  quadratic: { a: number; b: number; c: number };
  /** Critical value of the χ²(1) test used, q = z²_{1−α/2}. */
  critical: number;
  /** Reduced-form and first-stage coefficients on the instrument, and their robust covariance. */
  piY: number;
  piD: number;
  vYY: number;
  vYD: number;
  vDD: number;
  variance: VarianceType;
  clusters: number | null;
  warnings: EstimateWarning[];
}

/**
 * The robust Anderson–Rubin confidence set (docs METHOD.md §2). With the controls W (and the
 * intercept) partialled out of the instrument (z̃), π_Y and π_D the coefficients on Z of the
 * reduced form and of the first stage, and e_Y, e_D their residuals,
 *   V_jk = f · Σ_i ω_i z̃_i² e_j,i e_k,i / (Σ z̃_i²)²      (HC types; ω_i = 1, 1/(1−h_ii), 1/(1−h_ii)²)
 *   V_jk = f · Σ_g (Σ_{i∈g} z̃_i e_j,i)(Σ_{i∈g} z̃_i e_k,i) / (Σ z̃_i²)²   (CR1)
 *   V_jk = (e_j'e_k/(N−K)) / Σ z̃_i²                        (classical)
 * with f the small-sample factor of the variance type (1, N/(N−K), G/(G−1)·(N−1)/(N−K)), K the
 * kept columns of (W, Z). This is the variance of the coefficient on Z in the regression of
 * Y − β0·D on (Z, W), by Frisch–Waugh–Lovell, so β0 is in the set iff that robust Wald test
 * accepts: (π_Y − β0 π_D)² ≤ q (V_YY − 2β0 V_YD + β0² V_DD), i.e.
 *   a β² + b β + c ≤ 0,  a = π_D² − q V_DD,  b = −2(π_Y π_D − q V_YD),  c = π_Y² − q V_YY.
 */
export function andersonRubinSet(input: SingleInstrumentInput, options: RegressionOptions = {}): ArSet {
  const { outcome, endogenous, instrument } = input;
  const controls = input.controls ?? [];
  const n = outcome.values.length;
  checkColumns(
    [
      { role: 'outcome', column: outcome },
      { role: 'treatment (endogenous)', column: endogenous },
      { role: 'instrument', column: instrument },
      ...controls.map((column) => ({ role: 'control', column })),
    ],
    n,
  );
  const type = resolveVariance(options);
  const intercept = options.intercept ?? true;
  const level = options.level ?? 0.95;
  requireUnits(n, (intercept ? 1 : 0) + controls.length + 1);
  const clusters = options.clusters ? clusterCodes(options.clusters, n) : undefined;
  const tolerance = options.rankTolerance;

  // Full regression on [1, W, Z], screened in that order.
  const columns = [...controls, instrument];
  const names = designNames(columns, intercept);
  const decFull = decompose(
    n,
    columns.map((c) => c.values),
    { intercept, tolerance },
  );
  const zIndex = names.length - 1;
  if (decFull.kept[decFull.kept.length - 1] !== zIndex) {
    throw new EstimateInputError(
      'not-identified',
      `The instrument "${instrument.name}" adds nothing beyond the controls (it is a linear combination of them), so the effect cannot be estimated.`,
    );
  }
  const warnings = collinearityWarnings(decFull, names);
  const keptControls = controls.filter((_, j) => decFull.kept.includes((intercept ? 1 : 0) + j));

  // z̃: the instrument with the controls (and intercept) partialled out.
  const zTilde =
    keptControls.length === 0 && !intercept
      ? instrument.values
      : solve(
          decompose(
            n,
            keptControls.map((c) => c.values),
            { intercept, tolerance },
          ),
          instrument.values,
        ).residuals;
  let szz = 0;
  for (let i = 0; i < n; i++) szz += zTilde[i]! * zTilde[i]!;

  const fitY = solve(decFull, outcome.values);
  const fitD = solve(decFull, endogenous.values);
  const piY = fitY.coefficients[decFull.rank - 1]!;
  const piD = fitD.coefficients[decFull.rank - 1]!;
  const v = reducedFormCovariance(decFull, zTilde, szz, fitY.residuals, fitD.residuals, type, clusters);

  const q = normalCritical(level) ** 2;
  const a = piD * piD - q * v.dd;
  const b = -2 * (piY * piD - q * v.yd);
  const c = piY * piY - q * v.yy;
  const { kind, intervals } = solveQuadraticSet(a, b, c);
  if (kind !== 'interval') {
    warnings.push({
      code: 'ar-unbounded',
      message:
        'The Anderson–Rubin confidence set is unbounded: the data cannot rule out very large effects in either direction because the offer moves take-up too little. Treat the point estimate as uninformative.',
    });
  }
  return {
    kind,
    intervals,
    quadratic: { a, b, c },
    critical: q,
    piY,
    piD,
    vYY: v.yy,
    vYD: v.yd,
    vDD: v.dd,
    variance: type,
    clusters: v.clusters,
    warnings,
  };
}

function reducedFormCovariance(
  dec: Decomposition,
  zTilde: Float64Array,
  szz: number,
  eY: Float64Array,
  eD: Float64Array,
  type: VarianceType,
  clusters: ClusterCodes | undefined,
): { yy: number; yd: number; dd: number; clusters: number | null } {
  const n = dec.n;
  const df = n - dec.rank;
  if (type === 'classical') {
    let yy = 0;
    let yd = 0;
    let dd = 0;
    for (let i = 0; i < n; i++) {
      yy += eY[i]! * eY[i]!;
      yd += eY[i]! * eD[i]!;
      dd += eD[i]! * eD[i]!;
    }
    const f = 1 / (df * szz);
    return { yy: yy * f, yd: yd * f, dd: dd * f, clusters: null };
  }
  if (type === 'CR1') {
    const g = clusters!.count;
    if (g < 2) {
      throw new EstimateInputError('bad-clusters', `Cluster-robust standard errors need at least 2 clusters; the data have ${g}. Choose HC1 instead.`);
    }
    const sY = new Float64Array(g);
    const sD = new Float64Array(g);
    const codes = clusters!.codes;
    for (let i = 0; i < n; i++) {
      sY[codes[i]!] = sY[codes[i]!]! + zTilde[i]! * eY[i]!;
      sD[codes[i]!] = sD[codes[i]!]! + zTilde[i]! * eD[i]!;
    }
    let yy = 0;
    let yd = 0;
    let dd = 0;
    for (let j = 0; j < g; j++) {
      yy += sY[j]! * sY[j]!;
      yd += sY[j]! * sD[j]!;
      dd += sD[j]! * sD[j]!;
    }
    const f = smallSampleFactor(n, dec.rank, g) / (szz * szz);
    return { yy: yy * f, yd: yd * f, dd: dd * f, clusters: g };
  }
  const h = type === 'HC2' || type === 'HC3' ? leverages(dec) : undefined;
  let yy = 0;
  let yd = 0;
  let dd = 0;
  for (let i = 0; i < n; i++) {
    let w = zTilde[i]! * zTilde[i]!;
    if (h) {
      const oneMinusH = 1 - h[i]!;
      if (!(oneMinusH > 1e-10)) {
        throw new EstimateInputError(
          'leverage-one',
          `${type} standard errors are undefined here: unit ${i + 1} of the estimation sample alone determines a coefficient (leverage 1). Use HC1, or remove the column that singles it out.`,
        );
      }
      w /= type === 'HC2' ? oneMinusH : oneMinusH * oneMinusH;
    }
    yy += w * eY[i]! * eY[i]!;
    yd += w * eY[i]! * eD[i]!;
    dd += w * eD[i]! * eD[i]!;
  }
  const f = (type === 'HC1' ? smallSampleFactor(n, dec.rank, null) : 1) / (szz * szz);
  return { yy: yy * f, yd: yd * f, dd: dd * f, clusters: null };
}

/**
 * {β : aβ² + bβ + c ≤ 0} as intervals. a > 0: [r1, r2]; a < 0 with b² − 4ac > 0: the two rays
 * outside the roots; a < 0 with b² − 4ac ≤ 0: the whole line; a = 0: one ray (or the whole line).
 * Roots by the cancellation-free form r1 = t/a, r2 = c/t with t = −(b + sign(b)√disc)/2
 * (Press et al., "Numerical Recipes", 3rd ed., §5.6). When a > 0 the discriminant cannot be
 * negative in exact arithmetic (β = π_Y/π_D is always in the set); rounding is clamped to 0.
 */
export function solveQuadraticSet(a: number, b: number, c: number): { kind: ArShape; intervals: Array<[number | null, number | null]> } {
  if (a === 0) {
    if (b === 0) return c <= 0 ? { kind: 'whole-line', intervals: [[null, null]] } : { kind: 'interval', intervals: [] };
    const root = -c / b;
    return b > 0 ? { kind: 'half-line', intervals: [[null, root]] } : { kind: 'half-line', intervals: [[root, null]] };
  }
  let disc = b * b - 4 * a * c;
  if (a < 0 && !(disc > 0)) return { kind: 'whole-line', intervals: [[null, null]] };
  if (disc < 0) disc = 0;
  const sq = Math.sqrt(disc);
  const t = -(b + (b >= 0 ? sq : -sq)) / 2;
  let r1: number;
  let r2: number;
  if (t === 0) {
    r1 = 0;
    r2 = 0;
  } else {
    r1 = t / a;
    r2 = c / t;
  }
  const lo = Math.min(r1, r2);
  const hi = Math.max(r1, r2);
  if (a > 0) return { kind: 'interval', intervals: [[lo, hi]] };
  return { kind: 'two-rays', intervals: [[null, lo], [hi, null]] };
}

// ---- Together ----------------------------------------------------------------------------------

export interface WeakInstrumentReport {
  /** The 2SLS fit (one endogenous column, one instrument). */
  tsls: TslsResult;
  /** Robust first-stage F = squared robust t of the instrument (same variance type as 2SLS). */
  firstStageF: number;
  /** True when F < 10 (Staiger & Stock 1997). */
  weak: boolean;
  tF: TfResult;
  ar: ArSet;
  warnings: EstimateWarning[];
}

/** 2SLS with the first-stage F, the tF interval and the robust Anderson–Rubin set. */
export function weakInstrumentChecks(input: SingleInstrumentInput, options: RegressionOptions = {}): WeakInstrumentReport {
  const fit = tsls(
    { outcome: input.outcome, endogenous: [input.endogenous], instruments: [input.instrument], controls: input.controls ?? [] },
    options,
  );
  const first = fit.firstStages[0]!;
  const F = first.F;
  const effect = fit.coefficients.find((c) => c.name === input.endogenous.name)!;
  const tF = tfInterval(effect.estimate, effect.se, F);
  const ar = andersonRubinSet(input, { ...options, variance: fit.variance });
  const warnings: EstimateWarning[] = [...fit.warnings];
  const weak = !(F >= WEAK_F_THRESHOLD);
  if (weak) {
    warnings.push({
      code: 'weak-instrument',
      message: `The first-stage F statistic is ${formatF(F)}, below ${WEAK_F_THRESHOLD} (Staiger and Stock 1997): the offer moves take-up too little for the usual 95% interval to be trusted. Rely on the Anderson–Rubin set and the tF interval instead.`,
    });
  }
  for (const w of ar.warnings) if (!warnings.some((x) => x.code === w.code && x.message === w.message)) warnings.push(w);
  return { tsls: fit, firstStageF: F, weak, tF, ar, warnings };
}

function formatF(F: number): string {
  return Number.isFinite(F) ? F.toFixed(F < 100 ? 1 : 0) : String(F);
}

