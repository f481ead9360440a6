// Balance of pre-determined covariates in the boundary sample (docs METHOD.md §1; Narita & Yata
// 2021): each covariate X is regressed on the offer Z and the APS among units with 0 < APS < 1;
// conditional on the APS the offer is as good as random there, so the coefficient on Z should be
// near zero. Reported per covariate: the difference (coefficient on Z), its robust SE (HC1, or
// CR1 with clusters), the two-sided p-value (normal with HC1; t(G − 1) with CR1 and G clusters,
// the common small-G correction of Cameron, Gelbach & Miller 2008 — student-t.ts) and the
// standardized difference.
//
// Standardized difference: the APS-adjusted difference divided by √((s₁² + s₀²)/2), s₁² and s₀²
// the covariate's sample variances among offered and not-offered boundary units (Rosenbaum &
// Rubin 1985, Am. Statistician 39:33–38; Austin 2009, Stat. Med. 28:3083–3107). The study's
// controls are not in these regressions (STUDY-FORMAT.md "Controls").
//
// Joint test: the m covariate regressions share their regressors, so they are "seemingly
// unrelated" with identical design and equation-by-equation OLS is efficient (Zellner 1962,
// JASA 57:348–368). The joint robust covariance of the m offer coefficients is
// V_jl = f·Σ_i c_i² e_j,i e_l,i (HC1) or f·Σ_g (Σ_{i∈g} c_i e_j,i)(Σ_{i∈g} c_i e_l,i) (CR1), c the
// offer's row of (X'X)⁻¹X' (offer-design.ts), and W = b'V⁻¹b is referred to χ²(m) (Wooldridge
// 2010, "Econometric Analysis of Cross Section and Panel Data", 2nd ed., §7.3 and §4.2.3).
// Covariates whose coefficient is (numerically) a combination of others' are left out of W with
// a warning, and the degrees of freedom count only those tested.

import { chiSquareSurvival } from './chi-square.ts';
import {
  cachedFactor,
  createDesignCache,
  factorOfferDesign,
  offerCovarianceMatrix,
  offerFit,
  withVariance,
  type DesignCache,
  type OfferDesign,
  type OfferFit,
  type OfferVariance,
} from './offer-design.ts';
import { APS_NAME, type PropensityColumns } from './aps-iv.ts';
import { EstimateInputError } from './errors.ts';
import { referenceFor } from './student-t.ts';
import { gather, globalClusterCodes, indicesOf, sameIndices, subsetClusters } from './subset.ts';
import type { ClusterIds, EstimateWarning, NamedColumn } from './types.ts';
import type { ClusterCodes } from './variance.ts';

export interface BalanceInput {
  /** Pre-determined covariates; NaN = missing (excluded from that covariate's row and counted). */
  covariates: readonly NamedColumn[];
  offer: NamedColumn;
  propensity: PropensityColumns;
  clusters?: ClusterIds;
  level?: number;
  /** Factorizations shared with the headline estimator (offer-design.ts). */
  cache?: DesignCache;
}

/** One covariate at one delta (results.json `balance[]`). */
export interface BalanceRow {
  covariate: string;
  delta: number;
  n: number;
  diff: number | null;
  se: number | null;
  p: number | null;
  ci: [number, number] | null;
  standardizedDiff: number | null;
  meanOffered: number | null;
  meanNotOffered: number | null;
  /** Clusters in the row's sample when its SE is cluster-robust (CR1), else null. */
  clusters: number | null;
}

export interface BalanceJoint {
  delta: number;
  /** Units with every covariate observed (the joint test's sample). */
  n: number;
  /** Robust Wald statistic b'V⁻¹b. */
  statistic: number | null;
  df: number;
  p: number | null;
  tested: string[];
  /** Left out of the joint test: collinear with the other covariates' coefficients. */
  leftOut: string[];
  variance: OfferVariance;
  clusters: number | null;
}

export interface BalanceResult {
  rows: BalanceRow[];
  joint: BalanceJoint[];
  warnings: EstimateWarning[];
}

/** Relative tolerance below which a covariate's coefficient adds nothing to the joint test
 * (common practice for a Cholesky pivot on a covariance matrix, no source). */
const JOINT_TOLERANCE = 1e-10;

export function balanceChecks(input: BalanceInput): BalanceResult {
  const n = input.offer.values.length;
  const level = input.level ?? 0.95;
  for (const c of input.covariates) {
    if (c.values.length !== n) {
      throw new EstimateInputError('length-mismatch', `The covariate "${c.name}" has ${c.values.length} values but the offer column has ${n}; every column needs one value per unit.`);
    }
  }
  const global = input.clusters ? globalClusterCodes(input.clusters) : undefined;
  const cache = input.cache ?? createDesignCache();
  const rows: BalanceRow[] = [];
  const joint: BalanceJoint[] = [];
  const warnings: EstimateWarning[] = [];
  input.propensity.deltas.forEach((delta, k) => {
    const aps = input.propensity.aps[k]!;
    const at = `At delta ${delta}`;
    const boundary = new Uint8Array(n);
    for (let i = 0; i < n; i++) if (aps[i]! > 0 && aps[i]! < 1 && (!global || global.codes[i]! >= 0)) boundary[i] = 1;
    const complete = boundary.slice();
    const boundaryIdx = indicesOf(boundary);
    let anyMissing = false;
    const perCovariate = input.covariates.map((c) => {
      let missing = 0;
      for (let j = 0; j < boundaryIdx.length; j++) if (!Number.isFinite(c.values[boundaryIdx[j]!]!)) missing++;
      if (missing === 0) return boundaryIdx;
      anyMissing = true;
      const mask = boundary.slice();
      for (let i = 0; i < n; i++)
        if (mask[i] && !Number.isFinite(c.values[i]!)) {
          mask[i] = 0;
          complete[i] = 0;
        }
      warnings.push({ code: 'missing-covariate', message: `${at}, the covariate "${c.name}" is missing for ${missing} unit(s) near the formula's edge; they are left out of its balance check.` });
      return indicesOf(mask);
    });
    const completeIdx = anyMissing ? indicesOf(complete) : boundaryIdx;
    const designs: Array<{ idx: Int32Array; design: OfferDesign | null }> = [];
    const designFor = (idx: Int32Array): OfferDesign | null => {
      const hit = designs.find((x) => x.idx === idx || sameIndices(x.idx, idx));
      if (hit) return hit.design;
      const design = offerDesignFor(input.offer, aps, idx, global, at, warnings, cache);
      designs.push({ idx, design });
      return design;
    };

    const rowFits: Array<OfferFit | null> = [];
    const zFor: { idx: Int32Array | null; z: Float64Array } = { idx: null, z: new Float64Array(0) };
    input.covariates.forEach((c, j) => {
      const idx = perCovariate[j]!;
      const design = designFor(idx);
      rowFits.push(null);
      const row: BalanceRow = {
        covariate: c.name,
        delta,
        n: idx.length,
        diff: null,
        se: null,
        p: null,
        ci: null,
        standardizedDiff: null,
        meanOffered: null,
        meanNotOffered: null,
        clusters: null,
      };
      rows.push(row);
      if (!design) return;
      const x = gather(c.values, idx);
      const z = idx === zFor.idx ? zFor.z : ((zFor.idx = idx), (zFor.z = gather(input.offer.values, idx)));
      const fit = offerFit(design, x);
      rowFits[j] = fit;
      const se = Math.sqrt(offerCovarianceMatrix(design, [fit.residuals])[0]!);
      fillBalanceRow(row, fit.coef, se, level, design.clusters?.count ?? null, groupMoments(x, z));
    });

    // Joint test on the units with every covariate observed.
    const design = input.covariates.length > 0 ? designFor(completeIdx) : null;
    const entry: BalanceJoint = {
      delta,
      n: completeIdx.length,
      statistic: null,
      df: 0,
      p: null,
      tested: [],
      leftOut: [],
      variance: design?.variance ?? (global ? 'CR1' : 'HC1'),
      clusters: design?.clusters?.count ?? null,
    };
    joint.push(entry);
    if (!design) return;
    // Reuse a row's fit when its sample is the complete-case sample.
    const fits = input.covariates.map((c, j) =>
      rowFits[j] && sameIndices(perCovariate[j]!, completeIdx) ? rowFits[j]! : offerFit(design, gather(c.values, completeIdx)),
    );
    const cov = offerCovarianceMatrix(
      design,
      fits.map((f) => f.residuals),
    );
    fillJointEntry(entry, fits.map((f) => f.coef), cov, input.covariates.map((c) => c.name), at, warnings);
  });
  return { rows, joint, warnings };
}

/** Group means and sample variances of a covariate among offered and not-offered units. */
export interface GroupMoments { mean1: number | null; mean0: number | null; var1: number; var0: number }

/** A balance row's numbers from the offer's coefficient, its robust SE and the group moments. */
export function fillBalanceRow(row: BalanceRow, coef: number, se: number, level: number, clusters: number | null, g: GroupMoments): void {
  const ref = referenceFor(level, clusters ?? undefined);
  row.diff = coef;
  row.se = se;
  row.p = ref.p(coef / se);
  row.ci = [coef - ref.critical * se, coef + ref.critical * se];
  row.clusters = clusters;
  row.meanOffered = g.mean1;
  row.meanNotOffered = g.mean0;
  const pooled = Math.sqrt((g.var1 + g.var0) / 2);
  row.standardizedDiff = pooled > 0 ? coef / pooled : null;
}

/** The joint test's numbers from the offer's coefficients and their robust covariance (m×m). */
export function fillJointEntry(entry: BalanceJoint, coefs: readonly number[], cov: Float64Array, names: readonly string[], at: string, warnings: EstimateWarning[]): void {
  const wald = jointWald(coefs, cov);
  entry.tested = wald.kept.map((j) => names[j]!);
  entry.leftOut = names.filter((name) => !entry.tested.includes(name));
  entry.df = wald.kept.length;
  if (wald.kept.length > 0) {
    entry.statistic = wald.statistic;
    entry.p = chiSquareSurvival(wald.statistic, wald.kept.length);
  }
  if (entry.leftOut.length > 0) {
    warnings.push({
      code: 'balance-collinear',
      message: `${at}, the joint balance test leaves out ${entry.leftOut.map((s) => `"${s}"`).join(', ')}: near the formula's edge ${entry.leftOut.length === 1 ? 'its difference is' : 'their differences are'} a combination of the other covariates' (or has no variation), so ${entry.leftOut.length === 1 ? 'it adds' : 'they add'} nothing to the test.`,
    });
  }
}

/** The sample checks of a balance design (units, clusters), with their warnings; false when balance cannot be checked. */
export function balanceSampleChecks(n: number, clusters: number | null, at: string, warnings: EstimateWarning[]): { ok: boolean; clustered: boolean } {
  if (n === 0) {
    warnings.push({ code: 'no-boundary-units', message: `No units sit near the formula's edge at ${at.replace('At ', '')}: try a larger delta or check the scales.` });
    return { ok: false, clustered: false };
  }
  if (n <= 3) {
    warnings.push({ code: 'too-few-units', message: `${at}, only ${n} units near the formula's edge: too few to check balance.` });
    return { ok: false, clustered: false };
  }
  if (clusters !== null && clusters < 2) {
    warnings.push({ code: 'few-clusters', message: `${at}, the units near the formula's edge all belong to one cluster; the balance checks use HC1 standard errors instead of CR1.` });
    return { ok: true, clustered: false };
  }
  return { ok: true, clustered: clusters !== null };
}

/** The warning when the offer does not vary once the APS is held fixed. */
export function balanceNotIdentifiedWarning(at: string): EstimateWarning {
  return { code: 'no-offer-variation', message: `${at}, the offer does not vary among the units near the formula's edge once the APS is held fixed, so balance cannot be checked.` };
}

/** Design [1, APS, Z] for the rows idx, or null (with a warning) when the offer cannot be assessed. */
function offerDesignFor(
  offer: NamedColumn,
  aps: Float64Array,
  idx: Int32Array,
  global: { codes: Int32Array; count: number } | undefined,
  at: string,
  warnings: EstimateWarning[],
  cache: DesignCache,
): OfferDesign | null {
  let clusters: ClusterCodes | undefined = global && idx.length > 0 ? subsetClusters(global, idx) : undefined;
  const checks = balanceSampleChecks(idx.length, clusters ? clusters.count : null, at, warnings);
  if (!checks.ok) return null;
  if (!checks.clustered) clusters = undefined;
  const design = withVariance(
    cachedFactor(cache, [offer.values, aps], idx, () =>
      factorOfferDesign({ name: offer.name, values: gather(offer.values, idx) }, [{ name: APS_NAME, values: gather(aps, idx) }]),
    ),
    clusters,
  );
  if (!design.identified) {
    warnings.push(balanceNotIdentifiedWarning(at));
    return null;
  }
  return design;
}

/** Means and sample variances of x among offered (z = 1) and not-offered units; branch-free
 * sums (z is 0/1), two passes (the second about the group means, for accuracy). */
function groupMoments(x: Float64Array, z: Float64Array): { mean1: number | null; mean0: number | null; var1: number; var0: number } {
  let n1 = 0;
  let s1 = 0;
  let s = 0;
  const n = x.length;
  for (let i = 0; i < n; i++) {
    const zi = z[i]!;
    const xi = x[i]!;
    n1 += zi;
    s1 += zi * xi;
    s += xi;
  }
  const n0 = n - n1;
  const m1 = n1 > 0 ? s1 / n1 : 0;
  const m0 = n0 > 0 ? (s - s1) / n0 : 0;
  let q1 = 0;
  let q0 = 0;
  for (let i = 0; i < n; i++) {
    const zi = z[i]!;
    const d = x[i]! - (zi * m1 + (1 - zi) * m0);
    const d2 = d * d;
    q1 += zi * d2;
    q0 += (1 - zi) * d2;
  }
  return { mean1: n1 > 0 ? m1 : null, mean0: n0 > 0 ? m0 : null, var1: n1 > 1 ? q1 / (n1 - 1) : 0, var0: n0 > 1 ? q0 / (n0 - 1) : 0 };
}

/**
 * b'V⁻¹b by a Cholesky factorization of V in the given order, skipping a coefficient whose
 * pivot is at most JOINT_TOLERANCE × its variance (it is a combination of the earlier ones, or
 * has zero variance): the test is then on the kept coefficients, df = their number.
 */
export function jointWald(b: readonly number[], v: Float64Array): { statistic: number; kept: number[] } {
  const m = b.length;
  const kept: number[] = [];
  const l: number[][] = []; // rows of the Cholesky factor over kept indices
  for (let j = 0; j < m; j++) {
    const row: number[] = [];
    for (let a = 0; a < kept.length; a++) {
      let s = v[j * m + kept[a]!]!;
      for (let c = 0; c < a; c++) s -= row[c]! * l[a]![c]!;
      row.push(s / l[a]![a]!);
    }
    let d = v[j * m + j]!;
    for (const r of row) d -= r * r;
    if (!(d > JOINT_TOLERANCE * v[j * m + j]!) || !(v[j * m + j]! > 0)) continue;
    row.push(Math.sqrt(d));
    l.push(row);
    kept.push(j);
  }
  // Solve L w = b_kept; statistic = wᵀw.
  let statistic = 0;
  const w: number[] = [];
  for (let a = 0; a < kept.length; a++) {
    let s = b[kept[a]!]!;
    for (let c = 0; c < a; c++) s -= l[a]![c]! * w[c]!;
    w.push(s / l[a]![a]!);
    statistic += w[a]! * w[a]!;
  }
  return { statistic, kept };
}
