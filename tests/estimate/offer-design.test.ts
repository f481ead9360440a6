// The shared single-instrument core (main/estimate/offer-design.ts) against ols.ts (itself
// checked against NIST StRD in tests/reference): the offer coefficient, the residuals and the
// HC1/CR1 variance read off one factorization; the fused joint covariance against its pairwise
// definition; the cache returns the same factorization for the same design and rows.
import { describe, expect, it } from 'vitest';
import { cachedFactor, createDesignCache, factorOfferDesign, offerCovarianceMatrix, offerFit, withVariance } from '../../main/estimate/offer-design.ts';
import { ols } from '../../main/estimate/ols.ts';
import { clusterCodes } from '../../main/estimate/variance.ts';
import type { NamedColumn } from '../../main/estimate/types.ts';
import { column, rng } from './random.ts';

const col = (name: string, values: Float64Array): NamedColumn => ({ name, values });

describe('offer design', () => {
  const r = rng(77);
  const n = 500;
  const z = column(n, () => (r.uniform() < 0.4 ? 1 : 0));
  const w1 = column(n, () => r.normal());
  const w2 = column(n, () => r.uniform());
  const w3 = column(n, (i) => w1[i]! * w2[i]!);
  const g = column(n, (i) => i % 13);
  const ys = [column(n, (i) => 1e8 + 3 * z[i]! + w1[i]! + r.normal()), column(n, (i) => -2 * z[i]! + w3[i]! + r.normal() * (1 + z[i]!)), column(n, () => r.normal())];

  for (const controls of [[col('W1', w1)], [col('W1', w1), col('W2', w2), col('W3', w3)]]) {
    for (const clustered of [false, true]) {
      it(`K = ${controls.length + 2}, ${clustered ? 'CR1' : 'HC1'}: coefficient, residuals and SE equal ols.ts`, () => {
        const design = withVariance(factorOfferDesign(col('Z', z), controls), clustered ? clusterCodes(g, n) : undefined);
        const fits = ys.map((y) => offerFit(design, y));
        const cov = offerCovarianceMatrix(design, fits.map((f) => f.residuals));
        ys.forEach((y, j) => {
          const ref = ols(col('y', y), [...controls, col('Z', z)], clustered ? { clusters: g } : {});
          const c = ref.coefficients.find((x) => x.name === 'Z')!;
          expect(fits[j]!.coef).toBeCloseTo(c.estimate, 9);
          expect(Math.sqrt(cov[j * 3 + j]!) / c.se).toBeCloseTo(1, 10);
          let maxDiff = 0;
          for (let i = 0; i < n; i++) maxDiff = Math.max(maxDiff, Math.abs(fits[j]!.residuals[i]! - ref.residuals[i]!));
          expect(maxDiff).toBeLessThan(1e-8); // outcome 0 has mean 1e8: still ~1e-16 relative
        });
        // Fused joint covariance = pairwise definition Σ c² e_j e_l (HC1) / cluster sums (CR1).
        const pair = (a: Float64Array, b: Float64Array) => {
          if (!clustered) {
            let s = 0;
            for (let i = 0; i < n; i++) s += design.weights[i]! ** 2 * a[i]! * b[i]!;
            return design.factor * s;
          }
          const sa = new Float64Array(13);
          const sb = new Float64Array(13);
          for (let i = 0; i < n; i++) {
            sa[g[i]!] = sa[g[i]!]! + design.weights[i]! * a[i]!;
            sb[g[i]!] = sb[g[i]!]! + design.weights[i]! * b[i]!;
          }
          return design.factor * sa.reduce((s, v, k) => s + v * sb[k]!, 0);
        };
        for (let j = 0; j < 3; j++) for (let l = 0; l < 3; l++) expect(cov[j * 3 + l]! / pair(fits[j]!.residuals, fits[l]!.residuals)).toBeCloseTo(1, 10);
      });
    }
  }

  it('Σ c_i·Z_i = 1 and Σ c_i·x_i = 0 for every control (the offer row of (X′X)⁻¹X′)', () => {
    const f = factorOfferDesign(col('Z', z), [col('W1', w1), col('W2', w2)]);
    const dot = (a: Float64Array) => a.reduce((s, v, i) => s + v * f.weights[i]!, 0);
    expect(dot(z)).toBeCloseTo(1, 12);
    expect(dot(w1)).toBeCloseTo(0, 12);
    expect(dot(new Float64Array(n).fill(1))).toBeCloseTo(0, 12);
  });

  it('the cache returns the same factorization for the same columns and rows, a new one otherwise', () => {
    const cache = createDesignCache();
    let built = 0;
    const build = () => (built++, factorOfferDesign(col('Z', z), [col('W1', w1)]));
    const idx = Int32Array.from({ length: n }, (_, i) => i);
    const a = cachedFactor(cache, [z, w1], idx, build);
    const b = cachedFactor(cache, [z, w1], Int32Array.from(idx), build);
    const c = cachedFactor(cache, [z, w2], idx, build);
    expect(a).toBe(b);
    expect(c).not.toBe(a);
    expect(built).toBe(2);
  });
});
