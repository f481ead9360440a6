// The headline estimate, per outcome and per delta (docs METHOD.md §1–2; Narita & Yata 2021,
// "Algorithm is Experiment"): in the sample of units with 0 < APS < 1 (strictly) and the outcome
// observed,
//   first stage   D = γ0 + γ1·Z + γ2·APS (+ controls) + ν
//   reduced form  Y = ρ0 + ρ1·Z + ρ2·APS (+ controls) + e
//   2SLS          Y = β0 + β1·D + β2·APS (+ controls) + ε, D instrumented by Z,
// with HC1 standard errors, or CR1 when clusters are given (CLI.md); with CR1 and G clusters the
// Wald interval, p-value and Anderson–Rubin set refer to t(G − 1) instead of the normal (the
// common small-G correction: Cameron, Gelbach & Miller 2008, REStat 90:414–427; Cameron & Miller
// 2015, §VI.C — student-t.ts). With one instrument and the
// same controls in both stages the 2SLS estimate is ρ1/γ1 (indirect least squares), so all three
// come from one factorization of [1, APS, controls, Z] (offer-design.ts); the tests check every
// number against tsls.ts and weak-iv.ts. Weak-instrument inference: the robust first-stage F (the
// squared robust t), the tF interval (Lee, McCrary, Moreira & Porter 2022) and the robust
// Anderson–Rubin set (weak-iv.ts).
//
// Beside it, for every outcome and over all units (whatever their APS): the naive OLS of Y on D,
// and the IV of Y on D instrumented by Z without the APS control (the study's controls kept), so a
// memo can show how much selection the design removes.
//
// Without a treatment column the estimate is the effect of the offer itself: the reduced form.

import { EstimateInputError } from './errors.ts';
import { normalCritical } from './inference.ts';
import {
  cachedFactor,
  createDesignCache,
  factorOfferDesign,
  offerCovarianceMatrix,
  offerFit,
  withVariance,
  type DesignCache,
  type OfferVariance,
} from './offer-design.ts';
import { referenceFor } from './student-t.ts';
import { formatNumber, gather, globalClusterCodes, indicesOf, subsetClusters } from './subset.ts';
import type { ClusterIds, EstimateWarning, NamedColumn } from './types.ts';
import type { ClusterCodes } from './variance.ts';
import { solveQuadraticSet, tfInterval, WEAK_F_THRESHOLD, type ArShape } from './weak-iv.ts';
import { WILD_BOOTSTRAP_MAX_CLUSTERS, wildClusterBootstrap, type WildBootstrapResult } from './wild-bootstrap.ts';

/** Fewer boundary units than this earns a warning (issue 3, §6; common practice, no source). */
export const FEW_BOUNDARY_UNITS = 50;
/** Fewer offered (or not offered) boundary units than this earns a warning (common practice). */
export const FEW_PER_SIDE = 10;

export interface OutcomeInput {
  /** Column name as in the data (results.json `outcomes[].column`). */
  column: string;
  label?: string;
  /** One value per unit; NaN = missing (excluded and counted). */
  values: Float64Array;
}

/** The APS per delta, one value per unit (a PropensityResult from main/design fits). */
export interface PropensityColumns {
  deltas: readonly number[];
  aps: readonly Float64Array[];
}

export interface ApsIvInput {
  outcomes: readonly OutcomeInput[];
  /** Z: 1 if offered, 0 if not, for every unit. */
  offer: NamedColumn;
  /** D: what the unit received (0/1 or an amount). Omitted: the estimate is the offer's effect. */
  treatment?: NamedColumn;
  /** Report the effect per this many units of D (STUDY-FORMAT.md `treatmentPer`). Default 1. */
  treatmentPer?: number;
  propensity: PropensityColumns;
  /** Further pre-determined linear controls beside the APS (STUDY-FORMAT.md `columns.controls`). */
  controls?: readonly NamedColumn[];
  /** Cluster id per unit: CR1 standard errors instead of HC1. */
  clusters?: ClusterIds;
  /** Confidence level of the Wald and Anderson–Rubin sets (default 0.95). tF is always 95%. */
  level?: number;
  /** Factorizations to share with other calls on the same data (balance checks, the other
   * variance convention); see offer-design.ts. */
  cache?: DesignCache;
  /** With clusters: run the wild cluster bootstrap (wild-bootstrap.ts) at this delta (the
   * headline, headline.ts) when the estimation sample has fewer than 50 clusters. */
  wildBootstrap?: { deltaIndex: number; seed: number; reps?: number };
}

/** One outcome at one delta: maps one-to-one onto results.json `outcomes[].byDelta[]`. */
export interface DeltaEstimate {
  delta: number;
  /** Units with 0 < APS < 1 and the outcome observed (the estimation sample). */
  n: number;
  /** Of those, offered (Z = 1) and not offered. */
  offered: number;
  notOffered: number;
  /** False when the effect cannot be estimated at this delta (see warnings); numbers are null. */
  estimable: boolean;
  estimate: number | null;
  se: number | null;
  ci: [number, number] | null;
  p: number | null;
  /** Effect of the offer on take-up; null without a treatment column. */
  firstStage: { coef: number; se: number; F: number } | null;
  reducedForm: { coef: number; se: number } | null;
  /** Anderson–Rubin set as intervals, null for ±infinity (CLI.md `arCi`). */
  arCi: Array<[number | null, number | null]> | null;
  arShape: ArShape | null;
  /** 95% tF interval (Lee et al. 2022); [null, null] is the whole line. */
  tfCi: [number | null, number | null] | null;
  /** First-stage F below 10 (Staiger & Stock 1997). */
  weakInstrument: boolean | null;
  variance: OfferVariance;
  /** Clusters G in the estimation sample when the SE is cluster-robust (CR1), else null. */
  clusters: number | null;
  /** Degrees of freedom of the t reference of `ci`, `p` and `arCi` (G − 1 with CR1); null = normal. */
  referenceDf: number | null;
  /** Wild cluster bootstrap p-value of β = 0 and interval (CR1 with fewer than 50 clusters, at
   * the headline delta only); null otherwise. */
  wildBootstrap: WildBootstrapResult | null;
  /** Mean outcome of the not-offered units in the sample (their count is notOffered): the level
   * the effect is read against. Null when none is not offered. */
  baseline: { mean: number; n: number } | null;
  /** Controls kept in the model, the APS included when it was not dropped. */
  controls: string[];
  /** Columns dropped as collinear (e.g. a constant APS in a pure lottery). */
  dropped: string[];
  warnings: EstimateWarning[];
}

/** The comparisons beside the headline (results.json `naiveOls`, `ivNoControl`). */
export interface ComparisonEstimate {
  estimate: number | null;
  se: number | null;
  n: number;
  warnings: EstimateWarning[];
}

export interface OutcomeEstimates {
  column: string;
  label: string;
  /** Units with no value for this outcome (excluded from all its estimates). */
  missing: number;
  byDelta: DeltaEstimate[];
  naiveOls: ComparisonEstimate;
  ivNoControl: ComparisonEstimate;
}

export interface ApsIvResult {
  /** `treatment`: effect of receiving D; `offer`: effect of being offered (no D given). */
  estimand: 'treatment' | 'offer';
  /** One sentence on what the estimate is, for the memo. */
  estimandNote: string;
  treatmentPer: number;
  outcomes: OutcomeEstimates[];
  /** Every warning above (with its context in the message), in order, without repeats. */
  warnings: EstimateWarning[];
}

export const APS_NAME = 'APS';

export function apsUndefinedWarning(delta: number, count: number): EstimateWarning {
  return {
    code: 'aps-undefined',
    message: `At delta ${delta}, ${count} unit(s) have no propensity score (the formula could not be evaluated around them); they are left out at that delta.`,
  };
}

export function missingOutcomeWarning(label: string, missing: number): EstimateWarning {
  return { code: 'missing-outcome', message: `Outcome "${label}": ${missing} unit(s) have no value; they are left out of its estimates.` };
}

/** The sentence on what the estimate is (results.json estimand.note). */
export function estimandNoteFor(estimand: 'treatment' | 'offer', dName: string, per: number): string {
  return estimand === 'treatment'
    ? `The estimate is the effect of receiving ${dName}${per === 1 ? '' : ` per ${formatNumber(per)} of it`} for units near the formula's edge whose receipt follows the offer (compliers).`
    : `No treatment column was given, so the estimate is the effect of the offer itself on units near the formula's edge (the reduced form); there is no first stage.`;
}

export function estimateApsIv(input: ApsIvInput): ApsIvResult {
  const n = input.offer.values.length;
  const level = input.level ?? 0.95;
  normalCritical(level); // validates the level before any work
  const per = input.treatmentPer ?? 1;
  if (!(per > 0) || !Number.isFinite(per)) {
    throw new EstimateInputError('bad-option', `treatmentPer must be a positive number (for example 1000 to report the effect per 1,000 of the treatment); got ${String(input.treatmentPer)}.`);
  }
  checkInputs(input, n);
  const controls = input.controls ?? [];
  const warnings: EstimateWarning[] = [];
  const cache = input.cache ?? createDesignCache();

  // Units every estimate can use: treatment, controls and cluster id present.
  const usable = new Uint8Array(n).fill(1);
  excludeMissing(usable, input.treatment ? [input.treatment] : [], 'treatment', warnings);
  excludeMissing(usable, controls, 'control', warnings);
  const globalClusters = input.clusters ? globalClusterCodes(input.clusters) : undefined;
  if (globalClusters) {
    let missing = 0;
    for (let i = 0; i < n; i++)
      if (globalClusters.codes[i]! < 0) {
        if (usable[i]) missing++;
        usable[i] = 0;
      }
    if (missing > 0) {
      warnings.push({ code: 'missing-cluster', message: `${missing} unit(s) have no cluster id; they are left out of every estimate.` });
    }
  }

  const estimand = input.treatment ? 'treatment' : 'offer';
  const d = input.treatment ? scaled(input.treatment.values, per) : input.offer.values;
  const dName = input.treatment?.name ?? input.offer.name;
  const estimandNote = estimandNoteFor(estimand, dName, per);

  // APS per delta: NaN (undefined for the unit) is counted and never in the boundary sample.
  input.propensity.deltas.forEach((delta, k) => {
    const aps = input.propensity.aps[k]!;
    let undefinedCount = 0;
    for (let i = 0; i < n; i++) if (Number.isNaN(aps[i]!) && usable[i]) undefinedCount++;
    if (undefinedCount > 0) warnings.push(apsUndefinedWarning(delta, undefinedCount));
  });

  const outcomes = input.outcomes.map((outcome): OutcomeEstimates => {
    const label = outcome.label ?? outcome.column;
    let missing = 0;
    const observed = usable.slice();
    for (let i = 0; i < n; i++)
      if (!Number.isFinite(outcome.values[i]!)) {
        if (observed[i]) missing++;
        observed[i] = 0;
      }
    if (missing > 0) warnings.push(missingOutcomeWarning(label, missing));
    return {
      column: outcome.column,
      label,
      missing,
      byDelta: [],
      naiveOls: naiveComparison(outcome, label, d, dName, observed, globalClusters, cache),
      ivNoControl: noApsComparison(outcome, label, input.offer, d, estimand, controls, observed, globalClusters, cache),
    };
  });

  // Per delta: one factorization per distinct estimation sample, shared by the outcomes.
  input.propensity.deltas.forEach((delta, k) => {
    const aps = input.propensity.aps[k]!;
    const boundary = new Uint8Array(n);
    let boundaryCount = 0;
    for (let i = 0; i < n; i++)
      if (usable[i] && aps[i]! > 0 && aps[i]! < 1) {
        boundary[i] = 1;
        boundaryCount++;
      }
    input.outcomes.forEach((outcome, j) => {
      const label = outcomes[j]!.label;
      const mask = boundary.slice();
      for (let i = 0; i < n; i++) if (mask[i] && !Number.isFinite(outcome.values[i]!)) mask[i] = 0;
      const idx = indicesOf(mask);
      const entry = estimateAtDelta({
        delta,
        label,
        idx,
        boundaryCount,
        y: outcome.values,
        d,
        estimand,
        offer: input.offer,
        aps,
        controls,
        globalClusters,
        level,
        cache,
        bootstrap: input.wildBootstrap && input.wildBootstrap.deltaIndex === k ? input.wildBootstrap : undefined,
      });
      outcomes[j]!.byDelta.push(entry);
    });
  });

  for (const o of outcomes) {
    for (const w of [...o.naiveOls.warnings, ...o.ivNoControl.warnings, ...o.byDelta.flatMap((b) => b.warnings)]) warnings.push(w);
  }
  return { estimand, estimandNote, treatmentPer: per, outcomes, warnings: dedupe(warnings) };
}

interface DeltaJob {
  delta: number;
  label: string;
  idx: Int32Array;
  boundaryCount: number;
  y: Float64Array;
  d: Float64Array;
  estimand: 'treatment' | 'offer';
  offer: NamedColumn;
  aps: Float64Array;
  controls: readonly NamedColumn[];
  globalClusters: { codes: Int32Array; count: number } | undefined;
  level: number;
  cache: DesignCache;
  bootstrap: { seed: number; reps?: number } | undefined;
}

function emptyEstimate(job: DeltaJob, offered: number, warnings: EstimateWarning[], variance: OfferVariance): DeltaEstimate {
  return blankEstimate(job.delta, job.idx.length, offered, warnings, variance, baselineOf(job));
}

/** An estimate with its counts and no numbers (not estimable, or before the regressions). */
export function blankEstimate(delta: number, n: number, offered: number, warnings: EstimateWarning[], variance: OfferVariance, baseline: { mean: number; n: number } | null): DeltaEstimate {
  return {
    delta,
    n,
    offered,
    notOffered: n - offered,
    estimable: false,
    estimate: null,
    se: null,
    ci: null,
    p: null,
    firstStage: null,
    reducedForm: null,
    arCi: null,
    arShape: null,
    tfCi: null,
    weakInstrument: null,
    variance,
    clusters: null,
    referenceDf: null,
    wildBootstrap: null,
    baseline,
    controls: [],
    dropped: [],
    warnings,
  };
}

/** Mean outcome of the not-offered units of the sample (unweighted). */
function baselineOf(job: DeltaJob): { mean: number; n: number } | null {
  let sum = 0;
  let n = 0;
  for (let j = 0; j < job.idx.length; j++) {
    const i = job.idx[j]!;
    if (job.offer.values[i] === 0) { sum += job.y[i]!; n++; }
  }
  return n > 0 ? { mean: sum / n, n } : null;
}

/** What the sample checks of one outcome at one delta need: counts only (shared with the streamed path). */
export interface SampleCounts {
  delta: number;
  label: string;
  /** Units with 0 < APS < 1 (usable), whatever the outcome. */
  boundaryCount: number;
  /** Of those, units with the outcome observed (the estimation sample), and how many were offered. */
  n: number;
  offered: number;
  /** Clusters in the estimation sample when clustering was asked for, else null. */
  clusters: number | null;
  /** Coefficients of the largest model: 1, APS, controls, Z. */
  kMax: number;
}

/**
 * The checks made on an estimation sample before any regression, with their warnings: whether
 * the effect can be estimated at all, whether the clusters allow CR1 (else HC1), and the
 * warnings for small samples. `stop` means no regression is run.
 */
export function sampleChecks(s: SampleCounts): { warnings: EstimateWarning[]; stop: boolean; variance: OfferVariance; clustered: boolean } {
  const { delta, label, n: nb, offered } = s;
  const at = `At delta ${delta}`;
  const warnings: EstimateWarning[] = [];
  const notOffered = nb - offered;
  let variance: OfferVariance = s.clusters !== null ? 'CR1' : 'HC1';
  const stop = (): { warnings: EstimateWarning[]; stop: boolean; variance: OfferVariance; clustered: boolean } => ({ warnings, stop: true, variance, clustered: false });
  if (s.boundaryCount === 0) {
    warnings.push({
      code: 'no-boundary-units',
      message: `No units sit near the formula's edge at delta ${delta}: try a larger delta or check the scales.`,
    });
    return stop();
  }
  if (nb === 0) {
    warnings.push({
      code: 'no-outcome-near-edge',
      message: `${at}, none of the ${s.boundaryCount} units near the formula's edge has a value for outcome "${label}", so its effect cannot be estimated there.`,
    });
    return stop();
  }
  if (offered === 0 || notOffered === 0) {
    warnings.push({
      code: 'no-offer-variation',
      message: `${at}, all ${nb} units near the formula's edge with outcome "${label}" were ${offered === 0 ? 'not offered' : 'offered'} the benefit, so the offer's effect cannot be estimated there. Try a larger delta.`,
    });
    return stop();
  }
  if (nb < FEW_BOUNDARY_UNITS) {
    warnings.push({
      code: 'few-boundary-units',
      message: `${at}, only ${nb} units near the formula's edge have outcome "${label}" (fewer than ${FEW_BOUNDARY_UNITS}): the estimate and its interval are fragile. Try a larger delta.`,
    });
  }
  if (offered < FEW_PER_SIDE || notOffered < FEW_PER_SIDE) {
    warnings.push({
      code: 'few-per-side',
      message: `${at}, outcome "${label}": only ${offered} offered and ${notOffered} not-offered units near the formula's edge (fewer than ${FEW_PER_SIDE} on a side): the estimate rests on very few units.`,
    });
  }
  let clustered = s.clusters !== null;
  if (s.clusters !== null && s.clusters < 2) {
    warnings.push({
      code: 'few-clusters',
      message: `${at}, the units near the formula's edge with outcome "${label}" all belong to one cluster, so cluster-robust standard errors are impossible; heteroskedasticity-robust (HC1) standard errors are used instead.`,
    });
    clustered = false;
    variance = 'HC1';
  }
  if (nb <= s.kMax) {
    warnings.push({
      code: 'too-few-units',
      message: `${at}, ${nb} units near the formula's edge have outcome "${label}", too few for a model with ${s.kMax} coefficients. Try a larger delta or fewer controls.`,
    });
    return stop();
  }
  return { warnings, stop: false, variance, clustered };
}

/** The offer's coefficients and their robust (co)variances, from one design (offer-design.ts, or accumulated cross-products). */
export interface OfferMoments {
  /** Reduced form: coefficient of Z for the outcome, and its robust variance. */
  piY: number;
  vYY: number;
  /** Take-up: whether it is the same for every unit of the sample (and that value). */
  dConstant: boolean;
  dFirst: number;
  /** First stage (when take-up varies): coefficient of Z for D, covariances with the outcome's. */
  piD: number;
  vYD: number;
  vDD: number;
}

/**
 * The estimate of one outcome at one delta from the offer's coefficients and robust covariances:
 * the reduced form, the first stage, 2SLS as ρ/γ with its delta-method variance (exact for the
 * just-identified model, offer-design.ts), the Wald interval, the Anderson–Rubin set and the tF
 * interval. `base` holds the counts and model description; `moments` is read lazily so a caller
 * computes D's fit only when take-up varies.
 */
export function estimateFromMoments(
  base: DeltaEstimate,
  ctx: { delta: number; label: string; estimand: 'treatment' | 'offer'; level: number; clusters: number | null },
  moments: () => OfferMoments,
  bootstrap: (stage: 'offer' | 'treatment') => WildBootstrapResult | null = () => null,
): DeltaEstimate {
  const { delta, label } = ctx;
  const at = `At delta ${delta}`;
  const warnings = base.warnings;
  // Reference distribution of every Wald statistic below: t(G − 1) with CR1, else the normal.
  const ref = referenceFor(ctx.level, ctx.clusters ?? undefined);
  const critical = ref.critical;
  const m = moments();
  const reducedForm = { coef: m.piY, se: Math.sqrt(m.vYY) };
  if (ctx.estimand === 'offer') {
    // D = Z: β = ρ1 and, with V_DD = 0, the Anderson–Rubin set {β : (ρ1 − β)² ≤ q·V_YY} is the
    // Wald interval itself.
    const ci: [number, number] = [m.piY - critical * reducedForm.se, m.piY + critical * reducedForm.se];
    return {
      ...base,
      wildBootstrap: bootstrap('offer'),
      estimable: true,
      estimate: m.piY,
      se: reducedForm.se,
      ci,
      p: ref.p(m.piY / reducedForm.se),
      reducedForm,
      arCi: [ci],
      arShape: 'interval',
    };
  }
  if (m.dConstant) {
    warnings.push({
      code: 'no-takeup-variation',
      message: `${at}, outcome "${label}": every unit near the formula's edge has the same take-up (${formatNumber(m.dFirst)}), so the offer does not move take-up and the effect of receiving the benefit cannot be estimated; the effect of the offer (reduced form) is still reported.`,
    });
    return { ...base, reducedForm };
  }
  const { piD, piY, vYD, vDD, vYY } = m;
  const F = (piD * piD) / vDD;
  const firstStage = { coef: piD, se: Math.sqrt(vDD), F };
  if (!(piD !== 0) || !(vDD > 0)) {
    warnings.push({
      code: 'no-takeup-variation',
      message: `${at}, outcome "${label}": the offer does not change take-up among the units near the formula's edge, so the effect of receiving the benefit cannot be estimated; the effect of the offer (reduced form) is still reported.`,
    });
    return { ...base, reducedForm, firstStage: { coef: piD, se: Math.sqrt(vDD), F: NaN } };
  }

  const beta = piY / piD;
  const se = Math.sqrt(Math.max(0, vYY - 2 * beta * vYD + beta * beta * vDD)) / Math.abs(piD);
  const q = critical * critical;
  const ar = solveQuadraticSet(piD * piD - q * vDD, -2 * (piY * piD - q * vYD), piY * piY - q * vYY);
  const tf = tfInterval(beta, se, F);
  const weak = !(F >= WEAK_F_THRESHOLD);
  if (weak) {
    warnings.push({
      code: 'weak-instrument',
      message: `${at}, outcome "${label}": the first-stage F statistic is ${formatNumber(F)}, below ${WEAK_F_THRESHOLD} (Staiger and Stock 1997): the offer moves take-up too little for the usual 95% interval to be trusted. Rely on the Anderson–Rubin set and the tF interval instead.`,
    });
  }
  if (ar.kind !== 'interval') {
    warnings.push({
      code: 'ar-unbounded',
      message: `${at}, outcome "${label}": the Anderson–Rubin confidence set is unbounded, so the data cannot rule out very large effects because the offer moves take-up too little. Treat the point estimate as uninformative.`,
    });
  }
  return {
    ...base,
    wildBootstrap: bootstrap('treatment'),
    estimable: true,
    estimate: beta,
    se,
    ci: [beta - critical * se, beta + critical * se],
    p: ref.p(beta / se),
    firstStage,
    reducedForm,
    arCi: ar.intervals,
    arShape: ar.kind,
    tfCi: tf.interval,
    weakInstrument: weak,
  };
}

/** The base of an estimate that could be run: counts, clusters and reference, the model's columns. */
export function estimateBase(empty: DeltaEstimate, level: number, clusters: number | null, keptControls: string[], dropped: string[]): DeltaEstimate {
  const ref = referenceFor(level, clusters ?? undefined);
  return { ...empty, clusters, referenceDf: Number.isFinite(ref.df) ? ref.df : null, controls: keptControls, dropped };
}

/** The warning when the offer is a combination of the controls in the sample. */
export function notIdentifiedWarning(delta: number, label: string, offerName: string, keptControls: readonly string[]): EstimateWarning {
  return {
    code: 'not-identified',
    message: `At delta ${delta}, outcome "${label}": the offer "${offerName}" is a linear combination of ${keptControls.map((c) => `"${c}"`).join(', ') || 'the intercept'} among the units near the formula's edge, so its effect cannot be separated from theirs.`,
  };
}

function estimateAtDelta(job: DeltaJob): DeltaEstimate {
  const { delta, label, idx } = job;
  const nb = idx.length;
  let offered = 0;
  for (let j = 0; j < nb; j++) offered += job.offer.values[idx[j]!]! === 1 ? 1 : 0;
  let clusters: ClusterCodes | undefined = job.globalClusters ? subsetClusters(job.globalClusters, idx) : undefined;
  const checks = sampleChecks({ delta, label, boundaryCount: job.boundaryCount, n: nb, offered, clusters: clusters ? clusters.count : null, kMax: job.controls.length + 3 });
  const warnings = checks.warnings;
  if (checks.stop) return emptyEstimate(job, offered, warnings, checks.variance);
  if (!checks.clustered) clusters = undefined;

  // Design [1, APS, controls, Z] on the sample (shared with the other outcomes of the same sample).
  const design = withVariance(
    cachedFactor(job.cache, [job.offer.values, job.aps, ...job.controls.map((c) => c.values)], idx, () =>
      factorOfferDesign({ name: job.offer.name, values: gather(job.offer.values, idx) }, [
        { name: APS_NAME, values: gather(job.aps, idx) },
        ...job.controls.map((c) => ({ name: c.name, values: gather(c.values, idx) })),
      ]),
    ),
    clusters,
  );
  for (const w of design.warnings) warnings.push({ code: w.code, message: `At delta ${delta}, outcome "${label}": ${w.message}` });
  const base = estimateBase(emptyEstimate(job, offered, warnings, checks.variance), job.level, clusters?.count ?? null, design.keptControls, design.dropped);
  if (!design.identified) {
    warnings.push(notIdentifiedWarning(delta, label, job.offer.name, design.keptControls));
    return base;
  }
  const fitY = offerFit(design, gather(job.y, idx));
  let dSample: Float64Array | null = null;
  const moments = (): OfferMoments => {
    const vYY = offerCovarianceMatrix(design, [fitY.residuals])[0]!;
    const none = { piY: fitY.coef, vYY, dConstant: false, dFirst: NaN, piD: NaN, vYD: NaN, vDD: NaN };
    if (job.estimand === 'offer') return none;
    dSample = gather(job.d, idx);
    let constant = true;
    for (let j = 1; j < nb && constant; j++) if (dSample[j] !== dSample[0]) constant = false;
    if (constant) return { ...none, dConstant: true, dFirst: dSample[0]! };
    const fitD = offerFit(design, dSample);
    const v = offerCovarianceMatrix(design, [fitY.residuals, fitD.residuals]);
    return { ...none, piD: fitD.coef, vYD: v[1]!, vDD: v[3]! };
  };
  return estimateFromMoments(base, { delta, label, estimand: job.estimand, level: job.level, clusters: clusters?.count ?? null }, moments,
    (stage) => bootstrapFor(job, design, stage === 'offer' ? gather(job.offer.values, idx) : dSample!));
}

/** The wild cluster bootstrap when asked for at this delta and the clusters are fewer than 50. */
function bootstrapFor(job: DeltaJob, design: ReturnType<typeof withVariance>, d: Float64Array): WildBootstrapResult | null {
  if (!job.bootstrap || !design.clusters || design.clusters.count >= WILD_BOOTSTRAP_MAX_CLUSTERS) return null;
  return wildClusterBootstrap({
    design,
    y: gather(job.y, job.idx),
    d,
    seed: job.bootstrap.seed,
    level: job.level,
    ...(job.bootstrap.reps !== undefined ? { reps: job.bootstrap.reps } : {}),
  });
}

/**
 * Naive OLS of Y on D (no controls) over every unit with the outcome observed: the coefficient
 * on the last column of [1, D], read off the shared machinery of offer-design.ts (the same
 * HC1/CR1 sandwich as ols.ts; the tests compare the two).
 */
function naiveComparison(
  outcome: OutcomeInput,
  label: string,
  d: Float64Array,
  dName: string,
  observed: Uint8Array,
  globalClusters: { codes: Int32Array; count: number } | undefined,
  cache: DesignCache,
): ComparisonEstimate {
  const idx = indicesOf(observed);
  return comparison(idx, label, 'naive comparison', [d], () => factorOfferDesign({ name: dName, values: gather(d, idx) }, []), outcome.values, null, globalClusters, cache);
}

/** IV of Y on D instrumented by Z over every unit with the outcome observed, without the APS. */
function noApsComparison(
  outcome: OutcomeInput,
  label: string,
  offer: NamedColumn,
  d: Float64Array,
  estimand: 'treatment' | 'offer',
  controls: readonly NamedColumn[],
  observed: Uint8Array,
  globalClusters: { codes: Int32Array; count: number } | undefined,
  cache: DesignCache,
): ComparisonEstimate {
  const idx = indicesOf(observed);
  return comparison(
    idx,
    label,
    'comparison without the APS',
    [offer.values, ...controls.map((c) => c.values)],
    () =>
      factorOfferDesign(
        { name: offer.name, values: gather(offer.values, idx) },
        controls.map((c) => ({ name: c.name, values: gather(c.values, idx) })),
      ),
    outcome.values,
    estimand === 'offer' ? null : d,
    globalClusters,
    cache,
  );
}

/** Coefficient on the last design column (OLS), or the IV ratio ρ/γ when d is given. */
function comparison(
  idx: Int32Array,
  label: string,
  what: string,
  sources: readonly unknown[],
  build: () => ReturnType<typeof factorOfferDesign>,
  y: Float64Array,
  d: Float64Array | null,
  globalClusters: { codes: Int32Array; count: number } | undefined,
  cache: DesignCache,
): ComparisonEstimate {
  const warnings: EstimateWarning[] = [];
  const fail = (message: string, code: string): ComparisonEstimate => {
    warnings.push({ code, message: `The ${what} for "${label}" could not be computed: ${message}` });
    return { estimate: null, se: null, n: idx.length, warnings };
  };
  if (idx.length <= sources.length + 1) return fail('too few units with this outcome.', 'too-few-units');
  let clusters = globalClusters ? subsetClusters(globalClusters, idx) : undefined;
  if (clusters && clusters.count < 2) clusters = undefined;
  const design = withVariance(cachedFactor(cache, sources, idx, build), clusters);
  for (const w of design.warnings) warnings.push({ code: w.code, message: `The ${what} for "${label}": ${w.message}` });
  if (!design.identified) return fail('the column it compares does not vary among these units.', 'no-variation');
  const fitY = offerFit(design, gather(y, idx));
  if (!d) {
    const vYY = offerCovarianceMatrix(design, [fitY.residuals])[0]!;
    return { estimate: fitY.coef, se: Math.sqrt(vYY), n: idx.length, warnings };
  }
  const fitD = offerFit(design, gather(d, idx));
  if (!(fitD.coef !== 0)) return fail('the offer does not change take-up.', 'no-takeup-variation');
  const beta = fitY.coef / fitD.coef;
  const v = offerCovarianceMatrix(design, [fitY.residuals, fitD.residuals]);
  const se = Math.sqrt(Math.max(0, v[0]! - 2 * beta * v[1]! + beta * beta * v[3]!)) / Math.abs(fitD.coef);
  return { estimate: beta, se, n: idx.length, warnings };
}

function scaled(values: Float64Array, per: number): Float64Array {
  if (per === 1) return values;
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i]! / per;
  return out;
}

/** Units with a missing value in any of these columns are excluded and counted per column. */
function excludeMissing(usable: Uint8Array, columns: readonly NamedColumn[], role: string, warnings: EstimateWarning[]): void {
  for (const c of columns) {
    let missing = 0;
    for (let i = 0; i < usable.length; i++)
      if (!Number.isFinite(c.values[i]!)) {
        if (usable[i]) missing++;
        usable[i] = 0;
      }
    if (missing > 0) {
      warnings.push({
        code: `missing-${role}`,
        message: `The ${role} column "${c.name}" has no value for ${missing} unit(s); they are left out of every estimate.`,
      });
    }
  }
}

function checkInputs(input: ApsIvInput, n: number): void {
  const z = input.offer.values;
  for (let i = 0; i < n; i++) {
    if (z[i] !== 0 && z[i] !== 1) {
      throw new EstimateInputError(
        'bad-option',
        `The offer column "${input.offer.name}" must be 1 (offered) or 0 (not offered) for every unit; unit ${i + 1} has ${String(z[i])}. Fix the decision column or let Fenceline compute the offer from the formula.`,
      );
    }
  }
  const lengths: Array<[string, number]> = [
    ...input.outcomes.map((o): [string, number] => [`outcome "${o.column}"`, o.values.length]),
    ...(input.treatment ? [[`treatment "${input.treatment.name}"`, input.treatment.values.length] as [string, number]] : []),
    ...(input.controls ?? []).map((c): [string, number] => [`control "${c.name}"`, c.values.length]),
    ...input.propensity.aps.map((a, k): [string, number] => [`propensity score at delta ${input.propensity.deltas[k]}`, a.length]),
    ...(input.clusters ? [['cluster column', input.clusters.length] as [string, number]] : []),
  ];
  for (const [what, length] of lengths) {
    if (length !== n) {
      throw new EstimateInputError('length-mismatch', `The ${what} has ${length} values but the offer column has ${n}; every column needs one value per unit.`);
    }
  }
  if (input.propensity.aps.length !== input.propensity.deltas.length) {
    throw new EstimateInputError('length-mismatch', `There are ${input.propensity.deltas.length} deltas but ${input.propensity.aps.length} propensity-score columns; give one column per delta.`);
  }
  if (input.outcomes.length === 0) {
    throw new EstimateInputError('bad-option', 'No outcome was given; name at least one outcome column to estimate effects on.');
  }
  const names = new Set<string>([input.offer.name, APS_NAME]);
  for (const c of [...(input.treatment ? [input.treatment] : []), ...(input.controls ?? [])]) {
    if (names.has(c.name)) {
      throw new EstimateInputError('duplicate-name', `The column "${c.name}" is used twice (as offer, treatment, control or the APS); each column may play one role.`);
    }
    names.add(c.name);
  }
}

function dedupe(warnings: readonly EstimateWarning[]): EstimateWarning[] {
  const seen = new Set<string>();
  const out: EstimateWarning[] = [];
  for (const w of warnings) {
    const key = `${w.code}\u0000${w.message}`;
    if (!seen.has(key)) {
      seen.add(key);
      out.push(w);
    }
  }
  return out;
}
