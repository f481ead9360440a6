// Complier profile with Abadie's (2003) κ (main/estimate/compliers.ts). Sources:
//   - exact identity: with a constant offer probability π equal to the offered share, mean κ =
//     d̄₁ − d̄₀, the first-stage difference, which is the complier share under monotonicity
//     (Abadie 2003, Lemma 3.1; Angrist & Pischke 2009, "Mostly Harmless Econometrics", §4.5.2);
//   - a simulation with known types (always-takers, never-takers, compliers) and a varying
//     offer probability: the κ-weighted mean recovers the compliers' mean and mean κ their share;
//   - without a treatment column every unit near the edge complies: κ = 1 exactly.
import { describe, expect, it } from 'vitest';
import { abadieKappa, complierProfiles } from '../../main/estimate/compliers.ts';
import { EstimateInputError } from '../../main/estimate/errors.ts';
import { column, rng } from './random.ts';

describe('Abadie κ-weights', () => {
  it('mean κ equals the first-stage difference when π is the offered share (exact)', () => {
    const r = rng(1);
    const n = 1000;
    const z = column(n, () => (r.uniform() < 0.3 ? 1 : 0));
    const d = column(n, (i) => (r.uniform() < 0.15 + 0.6 * z[i]! ? 1 : 0));
    let n1 = 0;
    let d1 = 0;
    let d0 = 0;
    for (let i = 0; i < n; i++) z[i] ? (n1++, (d1 += d[i]!)) : (d0 += d[i]!);
    const pi = n1 / n;
    const aps = new Float64Array(n).fill(pi);
    const profile = complierProfiles({ covariates: [], offer: z, treatment: d, propensity: { deltas: [0.1], aps: [aps] } })[0]!;
    expect(profile.complierShare!).toBeCloseTo(d1 / n1 - d0 / (n - n1), 12);
  });

  it('known types: κ-weighted mean = compliers’ mean (30), mean κ = complier share (0.5)', () => {
    const r = rng(2);
    const n = 40000;
    const aps = column(n, () => 0.2 + 0.6 * r.uniform());
    const z = column(n, (i) => (r.uniform() < aps[i]! ? 1 : 0));
    const type = column(n, () => {
      const u = r.uniform();
      return u < 0.2 ? 0 : u < 0.5 ? 1 : 2; // 0 always-taker, 1 never-taker, 2 complier
    });
    const d = column(n, (i) => (type[i] === 0 ? 1 : type[i] === 1 ? 0 : z[i]!));
    const g = column(n, (i) => [10, 20, 30][type[i]!]! + r.normal());
    const profile = complierProfiles({ covariates: [{ name: 'G', values: g }], offer: z, treatment: d, propensity: { deltas: [0.1], aps: [aps] } })[0]!;
    expect(Math.abs(profile.complierShare! - 0.5)).toBeLessThan(0.03);
    expect(Math.abs(profile.rows[0]!.compliers! - 30)).toBeLessThan(0.8);
    expect(Math.abs(profile.rows[0]!.boundary! - (0.2 * 10 + 0.3 * 20 + 0.5 * 30))).toBeLessThan(0.3);
  });

  it('κ formula; without a treatment column κ = 1 and compliers = the boundary sample', () => {
    expect(abadieKappa(1, 0, 0.25)).toBeCloseTo(1 - 1 / 0.75, 15);
    expect(abadieKappa(0, 1, 0.25)).toBeCloseTo(1 - 1 / 0.25, 15);
    expect(abadieKappa(1, 1, 0.25)).toBe(1);
    const aps = Float64Array.from([0, 0.3, 0.6, 1, 0.5]);
    const z = Float64Array.from([0, 1, 0, 1, 1]);
    const g = Float64Array.from([1, 2, 3, 4, NaN]);
    const p = complierProfiles({ covariates: [{ name: 'G', values: g }], offer: z, propensity: { deltas: [0.1], aps: [aps] } })[0]!;
    expect(p.complierShare).toBe(1);
    expect(p.n).toBe(3);
    expect(p.rows[0]).toEqual({ covariate: 'G', all: 2.5, boundary: 2.5, compliers: 2.5 });
  });

  it('take-up recorded as an amount is refused with a message; no boundary units is a warning', () => {
    const z = Float64Array.from([0, 1, 1]);
    expect(() => complierProfiles({ covariates: [], offer: z, treatment: Float64Array.from([0, 250, 1]), propensity: { deltas: [0.1], aps: [Float64Array.from([0.5, 0.5, 0.5])] } })).toThrow(EstimateInputError);
    const none = complierProfiles({ covariates: [], offer: z, propensity: { deltas: [0.05], aps: [Float64Array.from([0, 1, 1])] } })[0]!;
    expect(none.warnings[0]!.message).toBe("No units sit near the formula's edge at delta 0.05: try a larger delta or check the scales.");
  });
});
