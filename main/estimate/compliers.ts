// Who the compliers are (docs/method.md §6): their share among the units near the formula's edge
// and their average characteristics, beside the averages over all units and over the boundary
// sample, so the memo can say whom the estimate does and does not speak for.
//
// Default method, "2SLS" — the same regression as the headline estimate (aps-iv.ts), in the
// boundary sample 0 < APS < 1, controlling linearly for the APS and the study's controls, HC1 or
// CR1 standard errors:
//   - complier share: the first-stage coefficient of D on Z (Imbens & Angrist 1994, Econometrica
//     62:467–475: under monotonicity the first stage is the share of compliers);
//   - complier mean of a covariate W: the 2SLS coefficient of W·D on D, D instrumented by Z
//     (Angrist & Pischke 2009, "Mostly Harmless Econometrics", §4.4.4, from the identity of
//     Abadie 2003, J. Econometrics 113:231–263: E[W·D | Z = 1] − E[W·D | Z = 0] equals
//     E[W | complier]·P(complier)). With the APS as a linear control the coefficient is the
//     compliers' mean under the estimator's own weighting (more weight where Z varies more given
//     the APS), which is the population the headline effect speaks for.
//   With one instrument and the same controls in both stages the 2SLS coefficient is the ratio of
//   two offer coefficients on one design, and its robust variance is
//   (V_YY − 2β·V_YD + β²·V_DD)/π_D² (offer-design.ts).
//
// Why not Abadie's κ everywhere: κ = 1 − D(1 − Z)/(1 − π(X)) − (1 − D)Z/π(X) needs π(X), the true
// probability of the offer given the inputs, strictly inside (0, 1). Near a deterministic cut-off
// the offer given the inputs is 0 or 1; the APS is a smoothed version of it, not that
// probability (a one-dimensional unit's offer is a deterministic function of its APS), so κ's
// identity fails there, and its 1/APS and 1/(1 − APS) weights explode as the APS nears 0 or 1.
// κ is kept only where the offer probability is known and interior: a lottery whose boundary
// units are all near no deterministic criterion (the caller says so per delta; then the APS is
// the stated lottery probability). Its share is mean κ and the complier mean E[κ·W]/E[κ]
// (Abadie 2003, Lemma 3.1 and Theorem 3.1), with ratio-estimator standard errors
// (Cochran 1977, "Sampling Techniques", 3rd ed., §6.3; clusters as primary units, §11.8 with the
// G/(G − 1) factor).

import type { PropensityColumns } from './aps-iv.ts';
import { APS_NAME } from './aps-iv.ts';
import { EstimateInputError } from './errors.ts';
import { factorOfferDesign, offerCovarianceMatrix, offerFit, withVariance, type OfferDesign, type OfferVariance } from './offer-design.ts';
import { gather, globalClusterCodes, indicesOf, sameIndices, subsetClusters } from './subset.ts';
import type { ClusterIds, EstimateWarning, NamedColumn } from './types.ts';
import type { ClusterCodes } from './variance.ts';

export interface ComplierInput {
  covariates: readonly NamedColumn[];
  /** Z, 0/1. */
  offer: Float64Array;
  /** D, 0/1; omitted when receipt equals the offer (then everyone near the edge complies). */
  treatment?: Float64Array;
  propensity: PropensityColumns;
  /** The study's linear controls, as in the headline specification. */
  controls?: readonly NamedColumn[];
  /** Cluster id per unit: CR1 standard errors, as in the headline. */
  clusters?: ClusterIds;
  /**
   * Per delta: true when every boundary unit's offer probability is a stated lottery probability
   * (no deterministic criterion near it), so the APS is P(Z = 1 | inputs) and κ is valid.
   */
  assignmentKnown?: readonly boolean[];
}

/** A coefficient with its robust standard error. */
export interface CoefSe {
  coef: number;
  se: number;
}

export interface ComplierRow {
  covariate: string;
  /** Mean over every unit with the covariate observed. */
  all: number | null;
  /** Mean over the boundary sample (0 < APS < 1) with the covariate observed. */
  boundary: number | null;
  /** The compliers' mean in the boundary sample (see `method`), with its standard error. */
  compliers: CoefSe | null;
  /** Boundary units used for this covariate. */
  n: number;
}

export interface ComplierProfile {
  delta: number;
  /** Boundary units used (D, Z, controls and cluster observed). */
  n: number;
  /** `2SLS`: first stage and 2SLS of W·D (default); `kappa`: Abadie's κ (a known lottery). */
  method: '2SLS' | 'kappa';
  /** Estimated share of compliers: the first stage of the headline specification (2SLS) or mean κ. */
  complierShare: CoefSe | null;
  variance: OfferVariance;
  /** Clusters in the boundary sample when CR1 is used, else null. */
  clusters: number | null;
  rows: ComplierRow[];
  warnings: EstimateWarning[];
}

/** Abadie's κ for one unit. */
export function abadieKappa(d: number, z: number, pi: number): number {
  return 1 - (d * (1 - z)) / (1 - pi) - ((1 - d) * z) / pi;
}

export function complierProfiles(input: ComplierInput): ComplierProfile[] {
  const n = input.offer.length;
  const d = input.treatment ?? input.offer;
  for (let i = 0; i < n; i++) {
    const di = d[i]!;
    if (Number.isFinite(di) && di !== 0 && di !== 1) {
      throw new EstimateInputError(
        'bad-option',
        `The complier profile needs take-up recorded as 1 (received) or 0 (not received); unit ${i + 1} has ${di}. For an amount, describe compliers with a 0/1 column of receipt instead.`,
      );
    }
  }
  const controls = input.controls ?? [];
  const global = input.clusters ? globalClusterCodes(input.clusters) : undefined;
  const allMeans = input.covariates.map((c) => meanOver(c.values, null));
  return input.propensity.deltas.map((delta, k): ComplierProfile => {
    const aps = input.propensity.aps[k]!;
    const warnings: EstimateWarning[] = [];
    const mask = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      const p = aps[i]!;
      if (!(p > 0 && p < 1) || !Number.isFinite(d[i]!) || !Number.isFinite(input.offer[i]!)) continue;
      if (global && global.codes[i]! < 0) continue;
      if (controls.some((c) => !Number.isFinite(c.values[i]!))) continue;
      mask[i] = 1;
    }
    const idx = indicesOf(mask);
    const method = input.assignmentKnown?.[k] ? 'kappa' : '2SLS';
    const empty: ComplierProfile = {
      delta,
      n: idx.length,
      method,
      complierShare: null,
      variance: global ? 'CR1' : 'HC1',
      clusters: null,
      rows: input.covariates.map((c, j) => ({ covariate: c.name, all: allMeans[j]!, boundary: meanOver(c.values, idx), compliers: null, n: 0 })),
      warnings,
    };
    if (idx.length === 0) {
      warnings.push({ code: 'no-boundary-units', message: `No units sit near the formula's edge at delta ${delta}: try a larger delta or check the scales.` });
      return empty;
    }
    const profile = method === 'kappa' ? kappaProfile(input, d, aps, idx, global, empty) : tslsProfile(input, d, aps, idx, global, empty);
    const share = profile.complierShare;
    if (share && !(share.coef > 0)) {
      warnings.push({
        code: 'no-compliers',
        message: `At delta ${delta}, the estimated share of compliers near the formula's edge is ${share.coef.toFixed(3)} (not positive), so their profile cannot be described.`,
      });
      return { ...profile, rows: profile.rows.map((r) => ({ ...r, compliers: null })) };
    }
    return profile;
  });
}

/** Units of idx with the covariate observed (idx itself when none is missing). */
function observedIn(values: Float64Array, idx: Int32Array): Int32Array {
  let missing = 0;
  for (let j = 0; j < idx.length; j++) if (!Number.isFinite(values[idx[j]!]!)) missing++;
  if (missing === 0) return idx;
  const out = new Int32Array(idx.length - missing);
  let m = 0;
  for (let j = 0; j < idx.length; j++) if (Number.isFinite(values[idx[j]!]!)) out[m++] = idx[j]!;
  return out;
}

function clustersOf(global: { codes: Int32Array; count: number } | undefined, idx: Int32Array): ClusterCodes | undefined {
  if (!global) return undefined;
  const c = subsetClusters(global, idx);
  return c.count >= 2 ? c : undefined;
}

function tslsProfile(
  input: ComplierInput,
  d: Float64Array,
  aps: Float64Array,
  idx: Int32Array,
  global: { codes: Int32Array; count: number } | undefined,
  empty: ComplierProfile,
): ComplierProfile {
  const controls = input.controls ?? [];
  const designs: Array<{ idx: Int32Array; design: OfferDesign }> = [];
  const designFor = (rows: Int32Array): OfferDesign => {
    const hit = designs.find((x) => x.idx === rows || sameIndices(x.idx, rows));
    if (hit) return hit.design;
    const design = withVariance(
      factorOfferDesign({ name: 'offer', values: gather(input.offer, rows) }, [
        { name: APS_NAME, values: gather(aps, rows) },
        ...controls.map((c) => ({ name: c.name, values: gather(c.values, rows) })),
      ]),
      clustersOf(global, rows),
    );
    designs.push({ idx: rows, design });
    return design;
  };
  const kMax = controls.length + 3;
  if (idx.length <= kMax) {
    empty.warnings.push({ code: 'too-few-units', message: `At delta ${empty.delta}, ${idx.length} units near the formula's edge are too few to describe the compliers.` });
    return empty;
  }
  const design = designFor(idx);
  if (!design.identified) {
    empty.warnings.push({ code: 'no-offer-variation', message: `At delta ${empty.delta}, the offer does not vary among the units near the formula's edge once the APS and controls are held fixed, so the compliers cannot be described.` });
    return empty;
  }
  const fitD = offerFit(design, gather(d, idx));
  const vDD = offerCovarianceMatrix(design, [fitD.residuals])[0]!;
  const complierShare = { coef: fitD.coef, se: Math.sqrt(vDD) };
  const rows = input.covariates.map((c, j): ComplierRow => {
    const row = empty.rows[j]!;
    const rows = observedIn(c.values, idx);
    if (rows.length <= kMax) return row;
    const des = designFor(rows);
    if (!des.identified) return { ...row, n: rows.length };
    const dr = gather(d, rows);
    const w = gather(c.values, rows);
    const wd = new Float64Array(rows.length);
    for (let i = 0; i < rows.length; i++) wd[i] = w[i]! * dr[i]!;
    const fY = offerFit(des, wd);
    const fD = rows === idx ? fitD : offerFit(des, dr);
    if (!(fD.coef !== 0)) return { ...row, n: rows.length };
    const beta = fY.coef / fD.coef;
    const v = offerCovarianceMatrix(des, [fY.residuals, fD.residuals]);
    const se = Math.sqrt(Math.max(0, v[0]! - 2 * beta * v[1]! + beta * beta * v[3]!)) / Math.abs(fD.coef);
    return { ...row, compliers: { coef: beta, se }, n: rows.length };
  });
  return { ...empty, complierShare, variance: design.variance, clusters: design.clusters?.count ?? null, rows };
}

/**
 * κ-weighted share and means with ratio-estimator standard errors: for m = Σκ_i·w_i / Σκ_i the
 * linearized terms ψ_i = κ_i(w_i − m), Var(m) ≈ n/(n − 1)·Σψ_i² / (Σκ_i)² (Cochran 1977, §6.3), or
 * G/(G − 1)·Σ_g(Σ_{i∈g} ψ_i)² / (Σκ_i)² with clusters; the share is the mean of κ (ψ_i = κ_i − κ̄).
 */
function kappaProfile(
  input: ComplierInput,
  d: Float64Array,
  aps: Float64Array,
  idx: Int32Array,
  global: { codes: Int32Array; count: number } | undefined,
  empty: ComplierProfile,
): ComplierProfile {
  const kappaAt = (i: number) => abadieKappa(d[i]!, input.offer[i]!, aps[i]!);
  const clusters = clustersOf(global, idx);
  const ratio = (rows: Int32Array, w: ((i: number) => number) | null): CoefSe => {
    let sk = 0;
    let skw = 0;
    for (const i of rows) {
      const kv = kappaAt(i);
      sk += kv;
      skw += kv * (w ? w(i) : 1);
    }
    // share: mean κ = Σκ/n with ψ_i = κ_i − κ̄ over n; mean: Σκw/Σκ with ψ_i = κ_i(w_i − m)
    const m = w ? skw / sk : sk / rows.length;
    const denom = w ? sk : rows.length;
    const psi = (i: number) => (w ? kappaAt(i) * (w(i) - m) : kappaAt(i) - m);
    const cl = clustersOf(global, rows);
    let v = 0;
    if (cl) {
      const sums = new Float64Array(cl.count);
      rows.forEach((i, j) => (sums[cl.codes[j]!] = sums[cl.codes[j]!]! + psi(i)));
      for (const s of sums) v += s * s;
      v *= cl.count / (cl.count - 1);
    } else {
      for (const i of rows) v += psi(i) ** 2;
      v *= rows.length / Math.max(1, rows.length - 1);
    }
    return { coef: m, se: Math.sqrt(v) / Math.abs(denom) };
  };
  const complierShare = ratio(idx, null);
  const rows = input.covariates.map((c, j): ComplierRow => {
    const rowsIdx = observedIn(c.values, idx);
    const row = empty.rows[j]!;
    if (rowsIdx.length < 2) return { ...row, n: rowsIdx.length };
    return { ...row, compliers: ratio(rowsIdx, (i) => c.values[i]!), n: rowsIdx.length };
  });
  return { ...empty, complierShare, variance: clusters ? 'CR1' : 'HC1', clusters: clusters?.count ?? null, rows };
}

function meanOver(x: Float64Array, idx: Int32Array | null): number | null {
  let s = 0;
  let c = 0;
  const len = idx ? idx.length : x.length;
  for (let j = 0; j < len; j++) {
    const v = x[idx ? idx[j]! : j]!;
    if (Number.isFinite(v)) {
      s += v;
      c++;
    }
  }
  return c > 0 ? s / c : null;
}
