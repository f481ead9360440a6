// The headline estimate, the comparisons beside it and the balance rows, from accumulated
// cross-products (cross-products.ts) instead of per-unit columns: the same sample checks, the
// same warnings and the same numbers as aps-iv.ts and balance.ts (the streamed path, docs
// method.md "Files beyond one sheet"). Each regression is a `MomentSample`: pass 1 fills its
// moments and counts, `fitSample` solves it, pass 2 fills its meat, and the functions below word
// the result. Pure.

import { blankEstimate, estimateBase, estimateFromMoments, notIdentifiedWarning, sampleChecks, type ComparisonEstimate, type DeltaEstimate } from './aps-iv.ts';
import { balanceNotIdentifiedWarning, balanceSampleChecks, fillBalanceRow, fillJointEntry, type BalanceJoint, type BalanceRow } from './balance.ts';
import { addRows, clustersSeen, createCoMoments, createOfferMeat, meatCovariance, solveMoments, type CoMoments, type MomentFit, type OfferMeat } from './cross-products.ts';
import type { EstimateWarning } from './types.ts';

/** One regression of m responses on [1, design...] over one sample, filled chunk by chunk. */
export interface MomentSample {
  /** Names of the design columns (the last is the offer Z) and of the responses. */
  design: string[];
  responses: string[];
  moments: CoMoments;
  /** Units of the sample offered (Z = 1), and the first response's sum among those not offered. */
  offered: number;
  notOfferedSum: number;
  /** Whether the last response is the same for every unit (take-up without variation), and its first value. */
  lastConstant: boolean;
  lastFirst: number;
  /** Clusters present (1 per global code), when clustering. */
  clustersSeen: Uint8Array | null;
  fit: MomentFit | null;
  meat: OfferMeat | null;
}

export function createMomentSample(design: string[], responses: string[], clusterCount: number | null): MomentSample {
  return {
    design,
    responses,
    moments: createCoMoments(design.length + responses.length),
    offered: 0,
    notOfferedSum: 0,
    lastConstant: true,
    lastFirst: Number.NaN,
    clustersSeen: clusterCount === null ? null : new Uint8Array(clusterCount),
    fit: null,
    meat: null,
  };
}

/**
 * The counts pass 1 keeps beside the moments, for rows idx[0..count) with the offer in column
 * q − 1 and the responses after it.
 */
export function countSampleRows(s: MomentSample, columns: readonly Float64Array[], idx: Int32Array, count: number, clusters?: Int32Array): void {
  const q = s.design.length;
  const z = columns[q - 1]!;
  const first = columns[q]!;
  const last = columns[columns.length - 1]!;
  for (let t = 0; t < count; t++) {
    const i = idx[t]!;
    if (z[i] === 1) s.offered++;
    else if (z[i] === 0) s.notOfferedSum += first[i]!;
    const v = last[i]!;
    if (s.moments.n === 0 && t === 0) s.lastFirst = v;
    else if (v !== s.lastFirst) s.lastConstant = false;
    if (s.clustersSeen && clusters) s.clustersSeen[clusters[i]!] = 1;
  }
}

export function clusterCount(s: MomentSample): number | null {
  if (!s.clustersSeen) return null;
  let g = 0;
  for (let c = 0; c < s.clustersSeen.length; c++) g += s.clustersSeen[c]!;
  return g;
}

/** Solve the sample's regressions and open its meat for pass 2. */
export function fitSample(s: MomentSample): MomentFit {
  s.fit = solveMoments(s.moments, s.design.length);
  s.meat = createOfferMeat(s.responses.length, s.clustersSeen ? s.clustersSeen.length : null);
  return s.fit;
}

/** The `collinear-dropped` warnings of a fit (the wording of ols.ts's collinearityWarnings). */
function droppedWarnings(s: MomentSample, fit: MomentFit): EstimateWarning[] {
  return fit.dropped.map((d) => {
    const name = `"${s.design[d]!}"`;
    const earlier = ['the intercept', ...fit.kept.filter((k) => k < d).map((k) => `"${s.design[k]!}"`)];
    const list = earlier.length === 1 ? earlier[0]! : `${earlier.slice(0, -1).join(', ')} and ${earlier[earlier.length - 1]!}`;
    return { code: 'collinear-dropped', message: `${name} was dropped: it is a linear combination of ${list} (e.g. a constant APS in a pure lottery is collinear with the intercept).` };
  });
}

export interface HeadlineContext {
  delta: number;
  label: string;
  offerName: string;
  estimand: 'treatment' | 'offer';
  level: number;
  /** Units with 0 < APS < 1 at this delta, whatever the outcome. */
  boundaryCount: number;
  /** Further controls beside the APS (for the model's size). */
  controls: number;
  clustered: boolean;
}

/** Before pass 2: whether the sample is estimated (then it is fitted), else its final estimate. */
export function headlineAfterPass1(s: MomentSample, ctx: HeadlineContext): { done: DeltaEstimate | null; clustered: boolean } {
  const n = s.moments.n;
  const g = ctx.clustered ? clusterCount(s) : null;
  const checks = sampleChecks({ delta: ctx.delta, label: ctx.label, boundaryCount: ctx.boundaryCount, n, offered: s.offered, clusters: g, kMax: ctx.controls + 3 });
  const notOffered = n - s.offered;
  const baseline = notOffered > 0 ? { mean: s.notOfferedSum / notOffered, n: notOffered } : null;
  if (checks.stop) return { done: blankEstimate(ctx.delta, n, s.offered, checks.warnings, checks.variance, baseline), clustered: false };
  fitSample(s);
  return { done: null, clustered: checks.clustered };
}

/** After pass 2: the estimate of a fitted sample (aps-iv.ts estimateFromMoments). */
export function headlineAfterPass2(s: MomentSample, ctx: HeadlineContext, clustered: boolean): DeltaEstimate {
  const fit = s.fit!;
  const n = s.moments.n;
  const g = clustered ? clusterCount(s) : null;
  const checks = sampleChecks({ delta: ctx.delta, label: ctx.label, boundaryCount: ctx.boundaryCount, n, offered: s.offered, clusters: ctx.clustered ? clusterCount(s) : null, kMax: ctx.controls + 3 });
  const warnings = checks.warnings;
  for (const w of droppedWarnings(s, fit)) warnings.push({ code: w.code, message: `At delta ${ctx.delta}, outcome "${ctx.label}": ${w.message}` });
  const notOffered = n - s.offered;
  const baseline = notOffered > 0 ? { mean: s.notOfferedSum / notOffered, n: notOffered } : null;
  const controlNames = s.design.slice(0, -1);
  const keptControls = fit.kept.filter((k) => k < s.design.length - 1).map((k) => controlNames[k]!);
  const dropped = fit.dropped.map((d) => s.design[d]!);
  const base = estimateBase(blankEstimate(ctx.delta, n, s.offered, warnings, checks.variance, baseline), ctx.level, g, keptControls, dropped);
  if (!fit.identified) {
    warnings.push(notIdentifiedWarning(ctx.delta, ctx.label, ctx.offerName, keptControls));
    return base;
  }
  const { v } = meatCovariance(s.meat!, fit.k, clustered);
  const m = s.responses.length;
  return estimateFromMoments(base, { delta: ctx.delta, label: ctx.label, estimand: ctx.estimand, level: ctx.level, clusters: g }, () => ({
    piY: fit.coefZ[0]!,
    vYY: v[0]!,
    dConstant: m > 1 && s.lastConstant,
    dFirst: s.lastFirst,
    piD: m > 1 ? fit.coefZ[1]! : Number.NaN,
    vYD: m > 1 ? v[1]! : Number.NaN,
    vDD: m > 1 ? v[m + 1]! : Number.NaN,
  }));
}

/**
 * The comparisons beside the headline (aps-iv.ts `comparison`): the coefficient on the last
 * design column, or the IV ratio ρ/γ when the sample has two responses (outcome, take-up).
 * Call before pass 2 (returns a failure or null to go on) and after it.
 */
export function comparisonAfterPass1(s: MomentSample, label: string, what: string): ComparisonEstimate | null {
  const n = s.moments.n;
  if (n <= s.design.length + 1) return comparisonFailure(n, label, what, 'too few units with this outcome.', 'too-few-units', []);
  const fit = fitSample(s);
  const warnings = droppedWarnings(s, fit).map((w) => ({ code: w.code, message: `The ${what} for "${label}": ${w.message}` }));
  if (!fit.identified) return comparisonFailure(n, label, what, 'the column it compares does not vary among these units.', 'no-variation', warnings);
  if (s.responses.length > 1 && !(fit.coefZ[1] !== 0)) return comparisonFailure(n, label, what, 'the offer does not change take-up.', 'no-takeup-variation', warnings);
  return null;
}

export function comparisonAfterPass2(s: MomentSample, label: string, what: string, clusteredAsked: boolean): ComparisonEstimate {
  const fit = s.fit!;
  const n = s.moments.n;
  const warnings = droppedWarnings(s, fit).map((w) => ({ code: w.code, message: `The ${what} for "${label}": ${w.message}` }));
  const g = clusteredAsked ? clusterCount(s) : null;
  const { v } = meatCovariance(s.meat!, fit.k, g !== null && g >= 2);
  if (s.responses.length === 1) return { estimate: fit.coefZ[0]!, se: Math.sqrt(v[0]!), n, warnings };
  const beta = fit.coefZ[0]! / fit.coefZ[1]!;
  const se = Math.sqrt(Math.max(0, v[0]! - 2 * beta * v[1]! + beta * beta * v[3]!)) / Math.abs(fit.coefZ[1]!);
  return { estimate: beta, se, n, warnings };
}

function comparisonFailure(n: number, label: string, what: string, message: string, code: string, warnings: EstimateWarning[]): ComparisonEstimate {
  return { estimate: null, se: null, n, warnings: [...warnings, { code, message: `The ${what} for "${label}" could not be computed: ${message}` }] };
}

/** Clusters in the meat of a fitted sample (for CR1 with at least 2). */
export function meatClusters(s: MomentSample): number | null {
  return s.meat ? clustersSeen(s.meat) : null;
}

/** Balance at one delta (balance.ts): covariates on [1, APS, Z] over the boundary units, with group moments. */
export interface BalanceSample {
  delta: number;
  sample: MomentSample;
  /** Co-moments of the covariates among not-offered (0) and offered (1) boundary units. */
  groups: [CoMoments, CoMoments];
  /** Null when balance cannot be checked at this delta (warned); else whether CR1 applies. */
  clustered: boolean | null;
}

export function createBalanceSample(delta: number, design: string[], covariates: string[], clusterCount: number | null): BalanceSample {
  return { delta, sample: createMomentSample(design, covariates, clusterCount), groups: [createCoMoments(covariates.length), createCoMoments(covariates.length)], clustered: null };
}

/** Pass 1 for balance: the rows idx[0..count) of columns [APS, Z, covariates...]. */
export function addBalanceRows(b: BalanceSample, columns: readonly Float64Array[], idx: Int32Array, count: number, clusters?: Int32Array): void {
  addRows(b.sample.moments, columns, idx, count);
  countSampleRows(b.sample, columns, idx, count, clusters);
  const z = columns[1]!;
  const covariates = columns.slice(2);
  for (const g of [0, 1] as const) {
    const rows = new Int32Array(count);
    let m = 0;
    for (let t = 0; t < count; t++) if (z[idx[t]!] === g) rows[m++] = idx[t]!;
    addRows(b.groups[g], covariates, rows, m);
  }
}

/** Between the passes: the sample checks (warnings pushed) and the fit. */
export function balanceAfterPass1(b: BalanceSample, clusteredAsked: boolean, warnings: EstimateWarning[]): void {
  const at = `At delta ${b.delta}`;
  const checks = balanceSampleChecks(b.sample.moments.n, clusteredAsked ? clusterCount(b.sample) : null, at, warnings);
  if (!checks.ok) return;
  if (!fitSample(b.sample).identified) {
    warnings.push(balanceNotIdentifiedWarning(at));
    return;
  }
  b.clustered = checks.clustered;
}

/** After pass 2: the balance rows and the joint test at this delta (results.json `balance`, `balanceJoint`). */
export function balanceAfterPass2(b: BalanceSample, level: number, clusteredAsked: boolean, warnings: EstimateWarning[]): { rows: BalanceRow[]; joint: BalanceJoint } {
  const s = b.sample;
  const n = s.moments.n;
  const names = s.responses;
  const rows: BalanceRow[] = names.map((covariate) => ({ covariate, delta: b.delta, n, diff: null, se: null, p: null, ci: null, standardizedDiff: null, meanOffered: null, meanNotOffered: null, clusters: null }));
  const joint: BalanceJoint = { delta: b.delta, n, statistic: null, df: 0, p: null, tested: [], leftOut: [], variance: clusteredAsked ? 'CR1' : 'HC1', clusters: null };
  if (b.clustered === null || names.length === 0) return { rows, joint };
  const fit = s.fit!;
  const g = b.clustered ? clusterCount(s) : null;
  const { v } = meatCovariance(s.meat!, fit.k, b.clustered);
  const m = names.length;
  const [g0, g1] = b.groups;
  rows.forEach((row, j) => {
    fillBalanceRow(row, fit.coefZ[j]!, Math.sqrt(v[j * m + j]!), level, g, {
      mean1: g1.n > 0 ? g1.mean[j]! : null,
      mean0: g0.n > 0 ? g0.mean[j]! : null,
      var1: g1.n > 1 ? g1.c[j * m + j]! / (g1.n - 1) : 0,
      var0: g0.n > 1 ? g0.c[j * m + j]! / (g0.n - 1) : 0,
    });
  });
  joint.variance = b.clustered ? 'CR1' : 'HC1';
  joint.clusters = g;
  fillJointEntry(joint, fit.coefZ, v, names, `At delta ${b.delta}`, warnings);
  return { rows, joint };
}
