// 2SLS: closed forms (Wald estimator, indirect least squares), an explicit matrix formula computed
// with ml-matrix (several endogenous regressors), collinearity handling and identification errors.
import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { ols } from '../../main/estimate/ols.ts';
import { tsls } from '../../main/estimate/tsls.ts';
import type { NamedColumn } from '../../main/estimate/types.ts';
import { inputErrorOf } from './errors-helper.ts';
import { column, rng } from './random.ts';

const col = (name: string, values: Float64Array): NamedColumn => ({ name, values });

describe('2SLS closed forms', () => {
  const r = rng(21);
  const n = 400;
  const z = column(n, () => (r.uniform() < 0.4 ? 1 : 0));
  const v = column(n, () => r.normal());
  const d = column(n, (i) => (0.2 + 0.5 * z[i]! + 0.3 * v[i]! > r.uniform() ? 1 : 0));
  const w = column(n, () => r.normal());
  const y = column(n, (i) => 1 + 2 * d[i]! + 0.5 * w[i]! + v[i]! + r.normal());

  it('binary instrument, no controls: 2SLS = Wald estimator (ȳ₁ − ȳ₀)/(d̄₁ − d̄₀) (Wald 1940; Angrist & Pischke 2009, §4.1)', () => {
    const mean = (x: Float64Array, g: number) => {
      let s = 0;
      let c = 0;
      for (let i = 0; i < n; i++) if (z[i] === g) (s += x[i]!), c++;
      return s / c;
    };
    const wald = (mean(y, 1) - mean(y, 0)) / (mean(d, 1) - mean(d, 0));
    const fit = tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('z', z)] });
    expect(fit.coefficients[1]!.name).toBe('d');
    expect(fit.coefficients[1]!.estimate).toBeCloseTo(wald, 12);
  });

  it('just identified with controls: 2SLS = reduced form / first stage (indirect least squares)', () => {
    const fit = tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('z', z)], controls: [col('w', w)] });
    const rf = ols(col('y', y), [col('w', w), col('z', z)]).coefficients.find((c) => c.name === 'z')!;
    const fs = ols(col('d', d), [col('w', w), col('z', z)]).coefficients.find((c) => c.name === 'z')!;
    expect(fit.coefficients.find((c) => c.name === 'd')!.estimate).toBeCloseTo(rf.estimate / fs.estimate, 12);
    expect(fit.reducedForm.coefficients.find((c) => c.name === 'z')!.estimate).toBeCloseTo(rf.estimate, 13);
    expect(fit.reducedForm.coefficients.find((c) => c.name === 'z')!.se).toBeCloseTo(rf.se, 13);
    const first = fit.firstStages[0]!;
    expect(first.endogenous).toBe('d');
    expect(first.F).toBeCloseTo((fs.estimate / fs.se) ** 2, 9); // one instrument: F = t²
    expect(first.df).toBe(1);
  });
});

describe('2SLS with two endogenous regressors against the explicit matrix formula (ml-matrix)', () => {
  const r = rng(33);
  const n = 300;
  const z1 = column(n, () => r.normal());
  const z2 = column(n, () => r.normal());
  const z3 = column(n, () => r.uniform());
  const w = column(n, () => r.normal());
  const u = column(n, () => r.normal());
  const d1 = column(n, (i) => z1[i]! + 0.5 * z3[i]! + 0.4 * u[i]! + r.normal());
  const d2 = column(n, (i) => z2[i]! - 0.3 * z1[i]! + 0.2 * w[i]! - 0.5 * u[i]! + r.normal());
  const y = column(n, (i) => 0.5 + d1[i]! - 2 * d2[i]! + 0.7 * w[i]! + u[i]! * (1 + Math.abs(z1[i]!)));
  const ones = new Float64Array(n).fill(1);
  const mat = (cols: Float64Array[]) => new Matrix(Array.from({ length: n }, (_, i) => cols.map((c) => c[i]!)));
  const X = mat([ones, d1, d2, w]);
  const Z = mat([ones, w, z1, z2, z3]);
  const Pz = Z.mmul(inverse(Z.transpose().mmul(Z))).mmul(Z.transpose());
  const Xhat = Pz.mmul(X);
  const A = inverse(Xhat.transpose().mmul(Xhat));
  const b = A.mmul(Xhat.transpose()).mmul(Matrix.columnVector(Array.from(y)));
  const uhat = Matrix.columnVector(Array.from(y)).sub(X.mmul(b));
  const meat = Xhat.transpose().mmul(Matrix.diag(uhat.getColumn(0).map((e) => e * e))).mmul(Xhat);
  const hc1 = A.mmul(meat).mmul(A).mul(n / (n - 4));

  it('coefficients b = (X̂\'X̂)⁻¹X̂\'y and HC1 SEs from (X̂\'X̂)⁻¹X̂\'diag(u²)X̂(X̂\'X̂)⁻¹·N/(N−K)', () => {
    const fit = tsls(
      { outcome: col('y', y), endogenous: [col('d1', d1), col('d2', d2)], instruments: [col('z1', z1), col('z2', z2), col('z3', z3)], controls: [col('w', w)] },
      { variance: 'HC1' },
    );
    expect(fit.coefficients.map((c) => c.name)).toEqual(['(intercept)', 'd1', 'd2', 'w']);
    fit.coefficients.forEach((c, j) => {
      expect(c.estimate).toBeCloseTo(b.get(j, 0), 10);
      expect(c.se / Math.sqrt(hc1.get(j, j))).toBeCloseTo(1, 10);
    });
    expect(fit.firstStages.map((f) => f.endogenous)).toEqual(['d1', 'd2']);
    expect(fit.firstStages.every((f) => f.df === 3)).toBe(true);
  });
});

describe('2SLS collinearity and identification', () => {
  const r = rng(44);
  const n = 120;
  const z = column(n, () => (r.uniform() < 0.5 ? 1 : 0));
  const d = column(n, (i) => (z[i]! * 0.7 > r.uniform() ? 1 : 0));
  const w = column(n, () => r.normal());
  const y = column(n, (i) => 1 + d[i]! + w[i]! + r.normal());
  const aps = new Float64Array(n).fill(0.5);

  it('a constant APS is dropped from both stages with a warning; the fit equals the one without it', () => {
    const withAps = tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('z', z)], controls: [col('APS', aps), col('w', w)] });
    const without = tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('z', z)], controls: [col('w', w)] });
    expect(withAps.dropped).toEqual(['APS']);
    expect(withAps.controls).toEqual(['w']);
    expect(withAps.warnings.map((x) => x.code)).toEqual(['collinear-dropped']);
    expect(withAps.warnings[0]!.message).toContain('"APS" was dropped: it is a linear combination of the intercept');
    expect(withAps.dfResidual).toBe(n - 3);
    withAps.coefficients.forEach((c, j) => expect(c.se).toBeCloseTo(without.coefficients[j]!.se, 12));
  });

  it('an instrument that is a combination of the controls is dropped; with none left the model is refused', () => {
    const zCopy = column(n, (i) => 2 * w[i]! + 1);
    const e = inputErrorOf(() => tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('offer', zCopy)], controls: [col('w', w)] }));
    expect(e.code).toBe('not-identified');
    expect(e.message).toContain('0 instrument(s) remain for 1 treatment column(s)');
  });

  it('a treatment the instruments do not move is refused, not silently replaced', () => {
    const constantD = new Float64Array(n).fill(1);
    const e = inputErrorOf(() => tsls({ outcome: col('y', y), endogenous: [col('takeup', constantD)], instruments: [col('z', z)] }));
    expect(e.code).toBe('not-identified');
    expect(e.message).toContain('"takeup"');
  });

  it('HC2/HC3 are refused for 2SLS with a reason', () => {
    const e = inputErrorOf(() => tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('z', z)] }, { variance: 'HC3' }));
    expect(e.code).toBe('bad-option');
    expect(e.message).toMatch(/not offered for two-stage least squares/);
  });

  it('fewer instruments than treatments, and no treatment', () => {
    expect(inputErrorOf(() => tsls({ outcome: col('y', y), endogenous: [col('d', d), col('w', w)], instruments: [col('z', z)] })).code).toBe('not-identified');
    expect(inputErrorOf(() => tsls({ outcome: col('y', y), endogenous: [], instruments: [col('z', z)] })).code).toBe('bad-option');
  });

  it('the same column as treatment and instrument is refused', () => {
    expect(inputErrorOf(() => tsls({ outcome: col('y', y), endogenous: [col('d', d)], instruments: [col('d', d)] })).code).toBe('duplicate-name');
  });
});
