// OLS on named columns: warnings, degrees of freedom, closed-form variance identities, inference
// and input errors.
import { describe, expect, it } from 'vitest';
import { twoSidedNormalP } from '../../main/estimate/inference.ts';
import { ols } from '../../main/estimate/ols.ts';
import type { NamedColumn } from '../../main/estimate/types.ts';
import { inputErrorOf } from './errors-helper.ts';
import { column, rng } from './random.ts';

const col = (name: string, values: Float64Array): NamedColumn => ({ name, values });

describe('OLS with a collinear control', () => {
  const r = rng(3);
  const n = 50;
  const z = column(n, () => (r.uniform() < 0.5 ? 1 : 0));
  const w = column(n, () => r.normal());
  const y = column(n, (i) => 1 + 2 * z[i]! + w[i]! + r.normal());
  const aps = new Float64Array(n).fill(0.5); // a pure lottery: the APS is the same for everyone

  it('drops the constant APS with a warning naming it and the intercept', () => {
    const fit = ols(col('y', y), [col('z', z), col('APS', aps), col('w', w)], { variance: 'HC1' });
    expect(fit.dropped).toEqual(['APS']);
    expect(fit.coefficients.map((c) => c.name)).toEqual(['(intercept)', 'z', 'w']);
    expect(fit.warnings).toEqual([
      {
        code: 'collinear-dropped',
        message:
          '"APS" was dropped: it is a linear combination of the intercept (e.g. a constant APS in a pure lottery is collinear with the intercept).',
      },
    ]);
  });

  it('counts only kept columns in the degrees of freedom: the result equals the model without it', () => {
    const withAps = ols(col('y', y), [col('z', z), col('APS', aps), col('w', w)], { variance: 'HC1' });
    const without = ols(col('y', y), [col('z', z), col('w', w)], { variance: 'HC1' });
    expect(withAps.k).toBe(3);
    expect(withAps.dfResidual).toBe(n - 3);
    withAps.coefficients.forEach((c, j) => {
      expect(c.estimate).toBeCloseTo(without.coefficients[j]!.estimate, 12);
      expect(c.se).toBeCloseTo(without.coefficients[j]!.se, 12);
    });
    // HC1 = HC0·N/(N−K) with K the kept count (MacKinnon & White 1985).
    const hc0 = ols(col('y', y), [col('z', z), col('APS', aps), col('w', w)], { variance: 'HC0' });
    expect(withAps.coefficients[1]!.se ** 2 / hc0.coefficients[1]!.se ** 2).toBeCloseTo(n / (n - 3), 12);
  });

  it('names every column of a linear combination', () => {
    const combo = column(n, (i) => 3 + z[i]! - 2 * w[i]!);
    const fit = ols(col('y', y), [col('z', z), col('w', w), col('score', combo)]);
    expect(fit.warnings[0]!.message).toMatch(/^"score" was dropped: it is a linear combination of the intercept, "z" and "w" /);
  });
});

describe('variance identities with closed forms', () => {
  const r = rng(5);
  const n1 = 23;
  const n0 = 31;
  const n = n1 + n0;
  const z = column(n, (i) => (i < n1 ? 1 : 0));
  const y = column(n, (i) => (i < n1 ? 2 + 3 * r.normal() : 1 + r.normal()));
  const groupStats = (from: number, to: number) => {
    let m = 0;
    for (let i = from; i < to; i++) m += y[i]!;
    m /= to - from;
    let ss = 0;
    for (let i = from; i < to; i++) ss += (y[i]! - m) ** 2;
    return { m, ss, s2: ss / (to - from - 1) };
  };
  const g1 = groupStats(0, n1);
  const g0 = groupStats(n1, n);

  it('the coefficient on a 0/1 regressor is the difference in means', () => {
    const fit = ols(col('y', y), [col('z', z)], { variance: 'classical' });
    expect(fit.coefficients[1]!.estimate).toBeCloseTo(g1.m - g0.m, 13);
  });

  it('HC2 SE of a difference in means is the Welch SE √(s₁²/N₁ + s₀²/N₀) (Imbens & Kolesár 2016, REStat 98:701–712)', () => {
    const fit = ols(col('y', y), [col('z', z)], { variance: 'HC2' });
    expect(fit.coefficients[1]!.se).toBeCloseTo(Math.sqrt(g1.s2 / n1 + g0.s2 / n0), 13);
  });

  it('classical SE of a difference in means is the pooled two-sample t formula (Student 1908; any statistics text)', () => {
    const fit = ols(col('y', y), [col('z', z)], { variance: 'classical' });
    const sp2 = (g1.ss + g0.ss) / (n - 2);
    expect(fit.coefficients[1]!.se).toBeCloseTo(Math.sqrt(sp2 * (1 / n1 + 1 / n0)), 13);
  });

  it('HC0 of a difference in means uses the group variances with divisor N_g (White 1980)', () => {
    const fit = ols(col('y', y), [col('z', z)], { variance: 'HC0' });
    expect(fit.coefficients[1]!.se).toBeCloseTo(Math.sqrt(g1.ss / n1 ** 2 + g0.ss / n0 ** 2), 13);
  });

  it('HC3 variance of a difference in means is Σ_g ss_g/(N_g−1)² (MacKinnon & White 1985 weights e²/(1−h)², h = 1/N_g)', () => {
    // In a one-dummy model the leverage is 1/N_g, so e²/(1−h)² sums to ss·N_g²/(N_g−1)².
    const fit = ols(col('y', y), [col('z', z)], { variance: 'HC3' });
    expect(fit.coefficients[1]!.se).toBeCloseTo(Math.sqrt(g1.ss / (n1 - 1) ** 2 + g0.ss / (n0 - 1) ** 2), 13);
  });

  it('CR1 with one unit per cluster equals HC1 (Cameron & Miller 2015, §II: G = N)', () => {
    const ids = column(n, (i) => i);
    const cr = ols(col('y', y), [col('z', z)], { variance: 'CR1', clusters: ids });
    const hc = ols(col('y', y), [col('z', z)], { variance: 'HC1' });
    expect(cr.clusters).toBe(n);
    cr.coefficients.forEach((c, j) => expect(c.se).toBeCloseTo(hc.coefficients[j]!.se, 13));
  });

  it('CR1 accepts string cluster ids', () => {
    const ids = Array.from({ length: n }, (_, i) => `office-${i % 6}`);
    const byString = ols(col('y', y), [col('z', z)], { clusters: ids });
    const byNumber = ols(col('y', y), [col('z', z)], { clusters: column(n, (i) => i % 6) });
    expect(byString.variance).toBe('CR1');
    expect(byString.clusters).toBe(6);
    expect(byString.coefficients[1]!.se).toBe(byNumber.coefficients[1]!.se);
  });
});

describe('Wald inference', () => {
  it('p-value and 95% interval use the standard normal (z₀.₉₇₅ = 1.959963985; Abramowitz & Stegun 1964, Table 26.5)', () => {
    const r = rng(9);
    const n = 80;
    const x = column(n, () => r.normal());
    const y = column(n, (i) => 0.3 * x[i]! + r.normal());
    const c = ols(col('y', y), [col('x', x)]).coefficients[1]!;
    expect(c.z).toBeCloseTo(c.estimate / c.se, 14);
    expect((c.ci[1] - c.ci[0]) / (2 * c.se)).toBeCloseTo(1.959963985, 9);
    expect(c.p).toBeCloseTo(twoSidedNormalP(c.z), 15);
    // z₀.₉₅ = 1.644853627 for a 90% interval (same table).
    const at90 = ols(col('y', y), [col('x', x)], { level: 0.9 }).coefficients[1]!;
    expect((at90.ci[1] - at90.ci[0]) / (2 * c.se)).toBeCloseTo(1.644853627, 9);
  });

  it('p-values: 2·Φ(−1.959963985) = 0.05 and 2·Φ(−2.575829304) = 0.01 (normal tables)', () => {
    expect(twoSidedNormalP(1.959963985)).toBeCloseTo(0.05, 9);
    expect(twoSidedNormalP(-2.575829304)).toBeCloseTo(0.01, 9);
    expect(twoSidedNormalP(0)).toBe(1);
  });
});

describe('bad input gets one clear message', () => {
  const n = 10;
  const y = column(n, (i) => i);
  const x = column(n, (i) => (i * 7) % 5);

  it('a column of the wrong length', () => {
    const e = inputErrorOf(() => ols(col('y', y), [col('age', new Float64Array(9))]));
    expect(e.code).toBe('length-mismatch');
    expect(e.message).toBe('The explanatory column "age" has 9 values but the outcome has 10; every column needs one value per unit.');
  });

  it('a missing value names the column and the unit', () => {
    const bad = x.slice();
    bad[3] = NaN;
    const e = inputErrorOf(() => ols(col('y', y), [col('income', bad)]));
    expect(e.code).toBe('not-finite');
    expect(e.message).toContain('"income" has no usable number for unit 4');
  });

  it('a duplicated column name', () => {
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x), col('x', x)])).code).toBe('duplicate-name');
  });

  it('CR1 without clusters, and clusters without CR1', () => {
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x)], { variance: 'CR1' })).message).toMatch(/need a cluster id/);
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x)], { variance: 'HC1', clusters: column(n, (i) => i % 2) })).message).toMatch(
      /choose CR1 to use the clusters/,
    );
  });

  it('a single cluster, and a missing cluster id', () => {
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x)], { clusters: new Float64Array(n) })).code).toBe('bad-clusters');
    const ids = column(n, (i) => i % 3);
    ids[5] = NaN;
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x)], { clusters: ids })).message).toContain('missing for unit 6');
  });

  it('too few units', () => {
    expect(inputErrorOf(() => ols(col('y', y.subarray(0, 2)), [col('x', x.subarray(0, 2))])).code).toBe('too-few-units');
  });

  it('HC2/HC3 with a unit of leverage 1 (a dummy for that unit alone)', () => {
    const only = column(n, (i) => (i === 4 ? 1 : 0));
    const e = inputErrorOf(() => ols(col('y', y), [col('x', x), col('unit5', only)], { variance: 'HC3' }));
    expect(e.code).toBe('leverage-one');
    expect(e.message).toContain('unit 5');
  });

  it('an unknown variance type and a bad level', () => {
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x)], { variance: 'HC9' as never })).code).toBe('bad-option');
    expect(inputErrorOf(() => ols(col('y', y), [col('x', x)], { level: 95 })).message).toMatch(/between 0 and 1/);
  });
});
