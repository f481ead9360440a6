// The accumulated normal equations and the second-pass meat (main/estimate/cross-products.ts)
// against reference results computed outside the project: tests/fixtures/robust-se (ds3: binary
// take-up d, binary instrument z, controls w1 and w2, 12 clusters; 50-digit mpmath values,
// cross-checked with R AER::ivreg + sandwich and statsmodels — see its README). The rows arrive
// in chunks of 37 (not a divisor of 240), so the pairwise merge of Chan, Golub & LeVeque (1983)
// is exercised.

import { describe, expect, it } from 'vitest';
import { addMeatRows, addRows, clustersSeen, createCoMoments, createOfferMeat, meatCovariance, solveMoments } from '../../main/estimate/cross-products.ts';
import { readJson, readNumericCsv, relDiff } from '../reference/fixtures.ts';

const data = readNumericCsv('robust-se/ds3_binary_g12.csv');
const expected = readJson('robust-se/expected.json').datasets.ds3_binary_g12;
const n = data.y!.length;
const columns = [data.w1!, data.w2!, data.z!, data.y!, data.d!];
const clusters = Int32Array.from(data.cluster!, (c) => c - 1);

function fitInChunks(chunk: number) {
  const acc = createCoMoments(5);
  const idx = new Int32Array(chunk);
  const slice = (from: number, to: number) => columns.map((c) => c.subarray(from, to));
  for (let from = 0; from < n; from += chunk) {
    const to = Math.min(n, from + chunk);
    for (let t = 0; t < to - from; t++) idx[t] = t;
    addRows(acc, slice(from, to), idx, to - from);
  }
  const fit = solveMoments(acc, 3);
  const meat = createOfferMeat(2, 12);
  for (let from = 0; from < n; from += chunk) {
    const to = Math.min(n, from + chunk);
    for (let t = 0; t < to - from; t++) idx[t] = t;
    addMeatRows(meat, fit, slice(from, to), idx, to - from, clusters.subarray(from, to));
  }
  return { fit, meat };
}

describe('2SLS from accumulated cross-products (robust-se ds3, mpmath reference)', () => {
  const { fit, meat } = fitInChunks(37);
  it('first stage: the coefficient of z and its HC1 and CR1 standard errors', () => {
    expect(fit.identified).toBe(true);
    expect(relDiff(fit.coefZ[1]!, expected.first_stage.d.coef.z)).toBeLessThan(1e-12);
    const hc1 = meatCovariance(meat, fit.k, false).v;
    const cr1 = meatCovariance(meat, fit.k, true).v;
    expect(relDiff(Math.sqrt(hc1[3]!), expected.first_stage.d.se.HC1.z)).toBeLessThan(1e-10);
    expect(relDiff(Math.sqrt(cr1[3]!), expected.first_stage.d.se.CR1.z)).toBeLessThan(1e-10);
    expect(clustersSeen(meat)).toBe(12);
  });
  it('2SLS: β = ρ/γ and its HC1 and CR1 standard errors (u = e_Y − β e_D)', () => {
    const beta = fit.coefZ[0]! / fit.coefZ[1]!;
    expect(relDiff(beta, expected.tsls.coef.d)).toBeLessThan(1e-12);
    for (const [type, clustered] of [['HC1', false], ['CR1', true]] as const) {
      const v = meatCovariance(meat, fit.k, clustered).v;
      const se = Math.sqrt(v[0]! - 2 * beta * v[1]! + beta * beta * v[3]!) / Math.abs(fit.coefZ[1]!);
      expect(relDiff(se, expected.tsls.se[type].d)).toBeLessThan(1e-10);
    }
  });
  it('gives the same numbers whatever the chunk size', () => {
    const whole = fitInChunks(n);
    for (const chunk of [1, 7, 100]) {
      const other = fitInChunks(chunk);
      expect(relDiff(other.fit.coefZ[0]!, whole.fit.coefZ[0]!)).toBeLessThan(1e-13);
      expect(relDiff(meatCovariance(other.meat, other.fit.k, true).v[0]!, meatCovariance(whole.meat, whole.fit.k, true).v[0]!)).toBeLessThan(1e-12);
    }
  });
  it('drops a column that is a combination of earlier ones, and says Z is not identified when it is', () => {
    const acc = createCoMoments(4);
    const idx = Int32Array.from({ length: n }, (_, i) => i);
    const twice = Float64Array.from(data.w1!, (v) => 2 * v + 1);
    addRows(acc, [data.w1!, twice, data.z!, data.y!], idx, n);
    const f = solveMoments(acc, 3);
    expect(f.dropped).toEqual([1]);
    expect(f.identified).toBe(true);
    const acc2 = createCoMoments(3);
    addRows(acc2, [data.z!, data.z!, data.y!], idx, n);
    expect(solveMoments(acc2, 2).identified).toBe(false);
  });
});
