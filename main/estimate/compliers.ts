// Who the compliers are: Abadie (2003), "Semiparametric instrumental variable estimation of
// treatment response models", J. Econometrics 113:231–263 (docs METHOD.md §6). With a binary
// offer Z, binary take-up D and the offer probability π(X) = P(Z = 1 | X),
//   κ = 1 − D(1 − Z)/(1 − π(X)) − (1 − D)Z/π(X),   E[g(X) | complier] = E[κ·g(X)] / E[κ],
// and E[κ] is the share of compliers (Abadie 2003, Lemma 3.1 and its corollary; also Angrist &
// Pischke 2009, "Mostly Harmless Econometrics", §4.5.2). In the boundary sample π is the APS.
// Beside the complier means: the means over all units and over the boundary sample, so the memo
// can say whom the estimate does and does not speak for.

import type { PropensityColumns } from './aps-iv.ts';
import { EstimateInputError } from './errors.ts';
import type { EstimateWarning, NamedColumn } from './types.ts';

export interface ComplierInput {
  covariates: readonly NamedColumn[];
  /** Z, 0/1. */
  offer: Float64Array;
  /** D, 0/1; omitted when receipt equals the offer (then everyone near the edge complies). */
  treatment?: Float64Array;
  propensity: PropensityColumns;
}

export interface ComplierRow {
  covariate: string;
  /** Mean over every unit with the covariate observed. */
  all: number | null;
  /** Mean over the boundary sample (0 < APS < 1). */
  boundary: number | null;
  /** κ-weighted mean: the compliers' mean in the boundary sample. */
  compliers: number | null;
}

export interface ComplierProfile {
  delta: number;
  /** Boundary units used (D, Z observed). */
  n: number;
  /** Mean of κ over the boundary sample: the estimated share of compliers. */
  complierShare: number | null;
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
  const allMeans = input.covariates.map((c) => meanWhere(c.values, () => true));
  return input.propensity.deltas.map((delta, k): ComplierProfile => {
    const aps = input.propensity.aps[k]!;
    const warnings: EstimateWarning[] = [];
    const kappa = new Float64Array(n).fill(NaN);
    let count = 0;
    let sumKappa = 0;
    for (let i = 0; i < n; i++) {
      const p = aps[i]!;
      if (!(p > 0 && p < 1) || !Number.isFinite(d[i]!) || !Number.isFinite(input.offer[i]!)) continue;
      kappa[i] = abadieKappa(d[i]!, input.offer[i]!, p);
      count++;
      sumKappa += kappa[i]!;
    }
    const share = count > 0 ? sumKappa / count : null;
    if (count === 0) {
      warnings.push({ code: 'no-boundary-units', message: `No units sit near the formula's edge at delta ${delta}: try a larger delta or check the scales.` });
    } else if (!(share! > 0)) {
      warnings.push({
        code: 'no-compliers',
        message: `At delta ${delta}, the estimated share of compliers near the formula's edge is ${share!.toFixed(3)} (not positive), so their profile cannot be described.`,
      });
    }
    const rows = input.covariates.map((c, j): ComplierRow => {
      let sk = 0;
      let skg = 0;
      for (let i = 0; i < n; i++) {
        const kv = kappa[i]!;
        const g = c.values[i]!;
        if (Number.isNaN(kv) || !Number.isFinite(g)) continue;
        sk += kv;
        skg += kv * g;
      }
      return {
        covariate: c.name,
        all: allMeans[j]!,
        boundary: meanWhere(c.values, (i) => !Number.isNaN(kappa[i]!)),
        compliers: share !== null && share > 0 && sk > 0 ? skg / sk : null,
      };
    });
    return { delta, n: count, complierShare: share, rows, warnings };
  });
}

function meanWhere(x: Float64Array, keep: (i: number) => boolean): number | null {
  let s = 0;
  let c = 0;
  for (let i = 0; i < x.length; i++)
    if (Number.isFinite(x[i]!) && keep(i)) {
      s += x[i]!;
      c++;
    }
  return c > 0 ? s / c : null;
}
