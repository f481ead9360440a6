// Balance checks (main/estimate/balance.ts) and the χ² upper tail they use (chi-square.ts).
// Sources: per-covariate rows against ols.ts (HC1 and CR1, itself checked against the reference
// results in tests/reference); the joint Wald statistic against the explicit stacked
// ("seemingly unrelated", Zellner 1962) sandwich built with ml-matrix; one covariate: W = t²;
// the χ² tail against Abramowitz & Stegun (1964) Table 26.8 percentage points and scipy.stats.chi2
// (scipy 1.17.1, values computed for this test); the size of the joint test under balance.
import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { balanceChecks, jointWald } from '../../main/estimate/balance.ts';
import { chiSquareSurvival } from '../../main/estimate/chi-square.ts';
import { ols } from '../../main/estimate/ols.ts';
import { tCritical, twoSidedTP } from '../../main/estimate/student-t.ts';
import type { NamedColumn } from '../../main/estimate/types.ts';
import { column, rng } from './random.ts';

const col = (name: string, values: Float64Array): NamedColumn => ({ name, values });

describe('χ² upper tail (Abramowitz & Stegun 1964, 26.4.4–26.4.5)', () => {
  it('5% points of A&S Table 26.8: χ²(1) 3.84146, χ²(2) 5.99146, χ²(5) 11.0705, χ²(10) 18.3070, χ²(30) 43.7730', () => {
    expect(chiSquareSurvival(3.84146, 1)).toBeCloseTo(0.05, 6);
    expect(chiSquareSurvival(5.99146, 2)).toBeCloseTo(0.05, 6);
    expect(chiSquareSurvival(11.0705, 5)).toBeCloseTo(0.05, 5);
    expect(chiSquareSurvival(18.307, 10)).toBeCloseTo(0.05, 5);
    expect(chiSquareSurvival(43.773, 30)).toBeCloseTo(0.05, 5);
  });

  it('matches scipy.stats.chi2.sf (scipy 1.17.1) to 1e-12 relative, including extreme tails', () => {
    const cases: Array<[number, number, number]> = [
      [5, 3, 0.1717971442967335],
      [12.5, 7, 0.08526927515826925],
      [1e-3, 2, 0.9995001249791693],
      [40, 20, 0.0049954123083075785],
      [2500, 2400, 0.07587291154280836],
      [30, 1, 4.3204630578274955e-8],
      [100, 5, 5.285148360943219e-20],
      [0.5, 15, 0.9999999982553599],
    ];
    for (const [x, df, p] of cases) expect(chiSquareSurvival(x, df) / p).toBeCloseTo(1, 11);
  });

  it('χ²(2) tail is e^(−x/2) exactly; edge cases', () => {
    for (const x of [0.1, 1, 7.3, 50]) expect(chiSquareSurvival(x, 2)).toBeCloseTo(Math.exp(-x / 2), 14);
    expect(chiSquareSurvival(0, 3)).toBe(1);
    expect(chiSquareSurvival(Infinity, 3)).toBe(0);
    expect(chiSquareSurvival(1, 0)).toBeNaN();
  });
});

function balanceData(seed: number, n: number, imbalance = 0) {
  const r = rng(seed);
  const aps = column(n, () => (r.uniform() < 0.2 ? 0 : 0.1 + 0.8 * r.uniform()));
  const z = column(n, (i) => (r.uniform() < aps[i]! ? 1 : 0));
  const g = column(n, (i) => i % 19);
  const common = column(n, () => r.normal());
  const covariates = [
    col('AGE', column(n, (i) => 40 + 10 * aps[i]! + 5 * r.normal() + imbalance * z[i]!)),
    col('INCOME', column(n, (i) => 2 * common[i]! + aps[i]! * r.normal())),
    col('RENTER', column(n, () => (r.uniform() < 0.3 ? 1 : 0))),
    col('ARREARS', column(n, (i) => common[i]! + r.normal() * (1 + z[i]!))),
  ];
  return { n, aps, z, g, covariates };
}

describe('balance rows', () => {
  const x = balanceData(3, 800);
  const rows = [...Array(x.n).keys()].filter((i) => x.aps[i]! > 0 && x.aps[i]! < 1);
  const pick = (v: Float64Array) => Float64Array.from(rows, (i) => v[i]!);

  for (const clustered of [false, true]) {
    it(`${clustered ? 'CR1' : 'HC1'}: difference and SE are the coefficient on Z of X on [1, APS, Z] (ols.ts); p and interval are normal (HC1) or t(G − 1) (CR1)`, () => {
      const result = balanceChecks({ covariates: x.covariates, offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] }, ...(clustered ? { clusters: x.g } : {}) });
      expect(result.rows.length).toBe(4);
      for (const row of result.rows) {
        const cov = x.covariates.find((c) => c.name === row.covariate)!;
        const ref = ols(col('x', pick(cov.values)), [col('APS', pick(x.aps)), col('Z', pick(x.z))], clustered ? { clusters: rows.map((i) => x.g[i]!) } : {}).coefficients.find(
          (c) => c.name === 'Z',
        )!;
        expect(row.n).toBe(rows.length);
        expect(row.diff!).toBeCloseTo(ref.estimate, 10);
        expect(row.se! / ref.se).toBeCloseTo(1, 10);
        if (clustered) {
          // t(G − 1) reference with G = 19 clusters (student-t.ts; Cameron, Gelbach & Miller 2008)
          expect(row.clusters).toBe(19);
          expect(row.p!).toBeCloseTo(twoSidedTP(ref.estimate / ref.se, 18), 10);
          expect(row.ci![0]).toBeCloseTo(ref.estimate - tCritical(0.95, 18) * ref.se, 10);
          expect(row.p!).toBeGreaterThan(ref.p);
        } else {
          expect(row.clusters).toBeNull();
          expect(row.p!).toBeCloseTo(ref.p, 10);
          expect(row.ci![0]).toBeCloseTo(ref.ci[0], 10);
        }
      }
      expect(result.joint[0]!.variance).toBe(clustered ? 'CR1' : 'HC1');
      expect(result.joint[0]!.clusters).toBe(clustered ? 19 : null);
    });
  }

  it('standardized difference = diff / √((s₁² + s₀²)/2) (Rosenbaum & Rubin 1985; Austin 2009)', () => {
    const result = balanceChecks({ covariates: x.covariates.slice(0, 1), offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] } });
    const row = result.rows[0]!;
    const v = pick(x.covariates[0]!.values);
    const z = pick(x.z);
    const group = (g: number) => Array.from(v).filter((_, i) => z[i] === g);
    const variance = (a: number[]) => {
      const m = a.reduce((s, t) => s + t, 0) / a.length;
      return a.reduce((s, t) => s + (t - m) ** 2, 0) / (a.length - 1);
    };
    const g1 = group(1);
    const g0 = group(0);
    expect(row.meanOffered!).toBeCloseTo(g1.reduce((s, t) => s + t, 0) / g1.length, 10);
    expect(row.standardizedDiff!).toBeCloseTo(row.diff! / Math.sqrt((variance(g1) + variance(g0)) / 2), 10);
  });
});

describe('joint robust Wald test', () => {
  const x = balanceData(4, 700);
  const rows = [...Array(x.n).keys()].filter((i) => x.aps[i]! > 0 && x.aps[i]! < 1);
  const m = rows.length;

  it('equals b′V⁻¹b with V the stacked HC1 sandwich computed explicitly with ml-matrix', () => {
    const result = balanceChecks({ covariates: x.covariates, offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] } });
    const X = new Matrix(rows.map((i) => [1, x.aps[i]!, x.z[i]!]));
    const xtxInv = inverse(X.transpose().mmul(X));
    const A = xtxInv.mmul(X.transpose()); // 3 × m; row 2 is the Z coefficient map
    const b: number[] = [];
    const e: number[][] = [];
    for (const c of x.covariates) {
      const yv = Matrix.columnVector(rows.map((i) => c.values[i]!));
      const beta = A.mmul(yv);
      b.push(beta.get(2, 0));
      const res = yv.sub(X.mmul(beta));
      e.push(res.to1DArray());
    }
    const k = x.covariates.length;
    const V = new Matrix(k, k);
    for (let j = 0; j < k; j++)
      for (let l = 0; l < k; l++) {
        let s = 0;
        for (let i = 0; i < m; i++) s += A.get(2, i) ** 2 * e[j]![i]! * e[l]![i]!;
        V.set(j, l, (s * m) / (m - 3));
      }
    const W = Matrix.rowVector(b).mmul(inverse(V)).mmul(Matrix.columnVector(b)).get(0, 0);
    const joint = result.joint[0]!;
    expect(joint.df).toBe(4);
    expect(joint.statistic! / W).toBeCloseTo(1, 9);
    expect(joint.p!).toBeCloseTo(chiSquareSurvival(W, 4), 10);
  });

  it('one covariate: W is the squared robust t', () => {
    const result = balanceChecks({ covariates: x.covariates.slice(1, 2), offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] } });
    const row = result.rows[0]!;
    expect(result.joint[0]!.statistic!).toBeCloseTo((row.diff! / row.se!) ** 2, 10);
    expect(result.joint[0]!.p!).toBeCloseTo(row.p!, 10);
  });

  it('a covariate that repeats another (up to scale and shift) is left out of the joint test with a warning', () => {
    const copy = col('AGE_MONTHS', x.covariates[0]!.values.map((v) => 12 * v + 3));
    const result = balanceChecks({ covariates: [...x.covariates, copy], offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] } });
    expect(result.joint[0]!.leftOut).toEqual(['AGE_MONTHS']);
    expect(result.joint[0]!.df).toBe(4);
    expect(result.warnings.find((w) => w.code === 'balance-collinear')!.message).toMatch(/leaves out "AGE_MONTHS"/);
    const without = balanceChecks({ covariates: x.covariates, offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] } });
    expect(result.joint[0]!.statistic!).toBeCloseTo(without.joint[0]!.statistic!, 6);
  });

  it('detects a real imbalance, and rejects at about the nominal 5% rate when there is none', () => {
    const unbalanced = balanceData(5, 1500, 2);
    const r = balanceChecks({ covariates: unbalanced.covariates, offer: col('Z', unbalanced.z), propensity: { deltas: [0.2], aps: [unbalanced.aps] } });
    expect(r.joint[0]!.p!).toBeLessThan(1e-6);
    let rejections = 0;
    const reps = 300;
    for (let s = 0; s < reps; s++) {
      const d = balanceData(1000 + s, 400);
      const j = balanceChecks({ covariates: d.covariates, offer: col('Z', d.z), propensity: { deltas: [0.2], aps: [d.aps] } }).joint[0]!;
      if (j.p! < 0.05) rejections++;
    }
    // Binomial(300, 0.05): mean 15, sd 3.8; [5, 30] holds with probability > 99.5% at the nominal rate.
    expect(rejections).toBeGreaterThanOrEqual(5);
    expect(rejections).toBeLessThanOrEqual(30);
  });

  it('missing covariate values: excluded from that row and counted; the joint test uses complete units', () => {
    const withGap = col('AGE', x.covariates[0]!.values.map((v, i) => (i % 5 === 0 ? NaN : v)));
    const result = balanceChecks({ covariates: [withGap, x.covariates[1]!], offer: col('Z', x.z), propensity: { deltas: [0.2], aps: [x.aps] } });
    const inBand = rows.filter((i) => i % 5 === 0).length;
    expect(result.rows[0]!.n).toBe(m - inBand);
    expect(result.rows[1]!.n).toBe(m);
    expect(result.joint[0]!.n).toBe(m - inBand);
    expect(result.warnings.find((w) => w.code === 'missing-covariate')!.message).toMatch(new RegExp(`missing for ${inBand} unit`));
  });

  it('jointWald on a diagonal covariance is the sum of squared t statistics', () => {
    const v = new Float64Array([4, 0, 0, 0, 9, 0, 0, 0, 0]);
    const w = jointWald([2, 3, 5], v);
    expect(w.kept).toEqual([0, 1]);
    expect(w.statistic).toBeCloseTo(1 + 1, 14);
  });

  it('no boundary units: a warning with the standard words', () => {
    const result = balanceChecks({ covariates: x.covariates, offer: col('Z', x.z), propensity: { deltas: [0.01], aps: [x.aps.map((p) => (p > 0.5 ? 1 : 0))] } });
    expect(result.rows.every((r) => r.diff === null)).toBe(true);
    expect(result.warnings[0]).toEqual({ code: 'no-boundary-units', message: "No units sit near the formula's edge at delta 0.01: try a larger delta or check the scales." });
  });
});
