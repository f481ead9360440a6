// Checks of the QR core against an independent implementation (ml-matrix's LU inverse and
// products, a general-purpose library) and against closed forms.
import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { decompose, inverseGram, leverages, sandwich, sandwichFromDesignMeat, solve, weightedMeat } from '../../main/estimate/linalg.ts';
import { column, rng } from './random.ts';

function designMatrix(cols: Float64Array[], intercept: boolean): Matrix {
  const n = cols[0]!.length;
  const all = intercept ? [new Float64Array(n).fill(1), ...cols] : cols;
  return new Matrix(Array.from({ length: n }, (_, i) => all.map((c) => c[i]!)));
}

function maxRel(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!) / Math.max(1e-300, Math.abs(b[i]!)));
  return m;
}

describe('pivoted Householder QR', () => {
  const r = rng(7);
  const n = 60;
  const x1 = column(n, () => r.normal());
  const x2 = column(n, () => 3 + r.normal());
  const x3 = column(n, () => r.uniform() * 10);
  const y = column(n, (i) => 1 + 2 * x1[i]! - x2[i]! + 0.5 * x3[i]! + r.normal());
  const dec = decompose(n, [x1, x2, x3], { intercept: true });
  const X = designMatrix([x1, x2, x3], true);
  const xtxInv = inverse(X.transpose().mmul(X)); // independent: LU of the normal equations

  it('Q₁ has orthonormal columns', () => {
    for (let a = 0; a < dec.rank; a++)
      for (let b = 0; b < dec.rank; b++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += dec.q[a * n + i]! * dec.q[b * n + i]!;
        expect(Math.abs(s - (a === b ? 1 : 0))).toBeLessThan(1e-14);
      }
  });

  it('coefficients equal (X\'X)⁻¹X\'y from ml-matrix on a well-conditioned design', () => {
    const b = xtxInv.mmul(X.transpose()).mmul(Matrix.columnVector(Array.from(y)));
    expect(maxRel(solve(dec, y).coefficients, b.getColumn(0))).toBeLessThan(1e-12);
  });

  it('T·Tᵀ equals (X\'X)⁻¹ from ml-matrix', () => {
    expect(maxRel(inverseGram(dec), xtxInv.to1DArray())).toBeLessThan(1e-11);
  });

  it('leverages equal diag(X(X\'X)⁻¹X\') and sum to the rank (Hoaglin & Welsch 1978)', () => {
    const h = leverages(dec);
    const hat = X.mmul(xtxInv).mmul(X.transpose());
    expect(maxRel(h, hat.diag())).toBeLessThan(1e-12);
    expect(h.reduce((s, v) => s + v, 0)).toBeCloseTo(4, 12);
  });

  it('a sandwich over Q₁ equals (X\'X)⁻¹X\'ΩX(X\'X)⁻¹ formed explicitly with ml-matrix', () => {
    const w = column(n, () => r.uniform());
    const omega = Matrix.diag(Array.from(w));
    const explicit = xtxInv.mmul(X.transpose()).mmul(omega).mmul(X).mmul(xtxInv);
    expect(maxRel(sandwich(dec, weightedMeat(dec, w)), explicit.to1DArray())).toBeLessThan(1e-10);
  });

  it('a sandwich from an X-space meat A equals (X\'X)⁻¹A(X\'X)⁻¹ from ml-matrix', () => {
    const w = column(n, () => r.uniform());
    const a = X.transpose().mmul(Matrix.diag(Array.from(w))).mmul(X);
    const explicit = xtxInv.mmul(a).mmul(xtxInv);
    expect(maxRel(sandwichFromDesignMeat(dec, Float64Array.from(a.to1DArray())), explicit.to1DArray())).toBeLessThan(1e-10);
  });

  it('simple regression matches the textbook closed form slope = Sxy/Sxx, intercept = ȳ − slope·x̄', () => {
    const d1 = decompose(n, [x1], { intercept: true });
    const mx = x1.reduce((s, v) => s + v, 0) / n;
    const my = y.reduce((s, v) => s + v, 0) / n;
    let sxy = 0;
    let sxx = 0;
    for (let i = 0; i < n; i++) {
      sxy += (x1[i]! - mx) * (y[i]! - my);
      sxx += (x1[i]! - mx) ** 2;
    }
    const [b0, b1] = solve(d1, y).coefficients;
    expect(b1).toBeCloseTo(sxy / sxx, 13);
    expect(b0).toBeCloseTo(my - (sxy / sxx) * mx, 13);
  });

  it('residuals are orthogonal to every column and an exact fit is recovered exactly', () => {
    const { residuals } = solve(dec, y);
    for (const c of [x1, x2, x3]) {
      let s = 0;
      for (let i = 0; i < n; i++) s += c[i]! * residuals[i]!;
      expect(Math.abs(s)).toBeLessThan(1e-11);
    }
    const exact = column(n, (i) => 4 - 3 * x1[i]! + 0.25 * x3[i]!);
    const fit = solve(decompose(n, [x1, x3], { intercept: true }), exact);
    expect(Array.from(fit.coefficients).map((v) => Number(v.toFixed(12)))).toEqual([4, -3, 0.25]);
    expect(fit.rss).toBeLessThan(1e-25);
  });

  it('works without an intercept (regression through the origin: b = Σxy/Σx²)', () => {
    const d0 = decompose(n, [x3], { intercept: false });
    const sxy = x3.reduce((s, v, i) => s + v * y[i]!, 0);
    const sxx = x3.reduce((s, v) => s + v * v, 0);
    expect(solve(d0, y).coefficients[0]).toBeCloseTo(sxy / sxx, 13);
  });
});

describe('collinear columns', () => {
  const r = rng(11);
  const n = 40;
  const a = column(n, () => r.normal());
  const b = column(n, () => r.normal());
  const combo = column(n, (i) => 2 * a[i]! - b[i]!);

  it('drops the later column of a collinear set and says which columns it combines', () => {
    const dec = decompose(n, [a, b, combo], { intercept: true });
    expect(dec.kept).toEqual([0, 1, 2]);
    expect(dec.dropped).toEqual([{ index: 3, zero: false, combinationOf: [1, 2] }]);
    expect(dec.rank).toBe(3);
  });

  it('the given order decides: with the combination first, the last of the three is dropped', () => {
    const dec = decompose(n, [combo, a, b], { intercept: true });
    expect(dec.kept).toEqual([0, 1, 2]);
    expect(dec.dropped.map((d) => d.index)).toEqual([3]);
  });

  it('a constant column is a combination of the intercept', () => {
    const constant = new Float64Array(n).fill(0.37);
    const dec = decompose(n, [a, constant], { intercept: true });
    expect(dec.dropped).toEqual([{ index: 2, zero: false, combinationOf: [0] }]);
  });

  it('a zero column is dropped as zero', () => {
    const dec = decompose(n, [new Float64Array(n), a], { intercept: true });
    expect(dec.dropped).toEqual([{ index: 1, zero: true, combinationOf: [] }]);
    expect(dec.kept).toEqual([0, 2]);
  });

  it('a nearly collinear but genuine column (relative variation 1e-6) is kept', () => {
    const c = column(n, (i) => a[i]! + 1e-6 * b[i]!);
    const dec = decompose(n, [a, c], { intercept: true });
    expect(dec.rank).toBe(3);
    const y = column(n, (i) => 1 + a[i]! + 2 * c[i]!);
    const fit = solve(dec, y);
    expect(fit.coefficients[2]).toBeCloseTo(2, 6);
  });
});
