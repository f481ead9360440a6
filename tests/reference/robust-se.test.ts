// Reference checks against fixtures/robust-se/expected.json: three synthetic IV data sets with
// OLS (nonrobust, HC0–HC3, CR1), first stage (coefficients, SEs, t, Wald F on the excluded
// instruments) and 2SLS (homoskedastic, HC0, HC1, CR1). Expected values: 50-digit mpmath
// computations rounded to double, agreeing with R (AER::ivreg + sandwich) and statsmodels within
// 3.2e-14 (fixtures/robust-se/README.md). Tolerance: 1e-13 relative (this engine reaches 9e-15).
import { describe, expect, it } from 'vitest';
import { readJson, relDiff } from './fixtures.ts';
import { fitAll, type ExpectedDataset } from './iv-reference.ts';

const expected = readJson<{ datasets: Record<string, ExpectedDataset> }>('robust-se/expected.json').datasets;
const TOL = 1e-13;

describe('robust-se reference results (50-digit, cross-checked with R and statsmodels)', () => {
  for (const [name, ds] of Object.entries(expected)) {
    const { checks, fitted } = fitAll('robust-se', ds);
    for (const block of ['ols', 'first_stage', 'tsls']) {
      it(`${name}: ${block} agrees to ${TOL} relative`, () => {
        const mine = checks.filter((c) => c.block === block);
        expect(mine.length).toBeGreaterThan(5);
        const bad = mine.filter((c) => !(relDiff(c.computed, c.expected) <= TOL));
        expect(bad.map((c) => `${c.label}: ${c.computed} vs ${c.expected}`)).toEqual([]);
      });
    }
    it(`${name}: reports N and the number of clusters`, () => {
      expect(fitted.tslsByType.CR1!.n).toBe(ds.n);
      expect(fitted.tslsByType.CR1!.clusters).toBe((ds as unknown as { n_clusters: number }).n_clusters);
      expect(fitted.olsByType.HC1!.clusters).toBeNull();
    });
  }
});
