import { describe, expect, it } from 'vitest';
import betainc from '@stdlib/math-base-special-betainc';
import { ballMarginalCdf, capFraction } from '../../main/design/ball-geometry.ts';

// General cap formula, always through the regularized incomplete beta (S. Li 2011), so the
// closed forms for d ≤ 3 can be checked against it.
const capByBeta = (t: number, d: number) => (t >= 0 ? 0.5 * betainc(1 - t * t, (d + 1) / 2, 0.5) : 1 - 0.5 * betainc(1 - t * t, (d + 1) / 2, 0.5));

// Independent check: the one-dimensional marginal density of the uniform d-ball is proportional
// to (1 − s²)^((d−1)/2) (volume of the (d−1)-ball slice of radius √(1 − s²)); integrate it by
// composite Simpson's rule on a fine grid.
function capBySlices(t: number, d: number): number {
  const f = (s: number) => Math.pow(Math.max(0, 1 - s * s), (d - 1) / 2);
  const simpson = (a: number, b: number, m = 20000) => {
    const h = (b - a) / m;
    let sum = f(a) + f(b);
    for (let i = 1; i < m; i++) sum += (i % 2 ? 4 : 2) * f(a + i * h);
    return (sum * h) / 3;
  };
  return simpson(t, 1) / simpson(-1, 1);
}

describe('hyperspherical cap fractions', () => {
  const ts = [-0.9, -0.5, -0.1, 0, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99];

  it('d = 1: the interval formula (1 − t)/2 (elementary geometry)', () => {
    for (const t of ts) expect(capFraction(t, 1)).toBeCloseTo((1 - t) / 2, 15);
  });

  it('d = 2: circular segment area r²·acos(t/r) − t·√(r² − t²) over πr² (standard handbook formula)', () => {
    const r = 1.7; // any radius: the fraction is scale free
    for (const t of ts) {
      const h = t * r;
      const segment = r * r * Math.acos(h / r) - h * Math.sqrt(r * r - h * h);
      expect(capFraction(t, 2)).toBeCloseTo(segment / (Math.PI * r * r), 14);
      expect(capFraction(t, 2)).toBeCloseTo(capByBeta(t, 2), 12);
    }
  });

  it('d = 3: spherical cap volume πh²(3r − h)/3 over 4πr³/3 (standard handbook formula)', () => {
    const r = 0.4;
    for (const t of ts.filter((x) => x >= 0)) {
      const h = r - t * r;
      const cap = (Math.PI * h * h * (3 * r - h)) / 3;
      expect(capFraction(t, 3)).toBeCloseTo(cap / ((4 / 3) * Math.PI * r ** 3), 14);
      expect(capFraction(t, 3)).toBeCloseTo(capByBeta(t, 3), 12);
    }
  });

  it('d = 5 and d = 10: the beta formula agrees with slice integration of the marginal density', () => {
    for (const d of [4, 5, 7, 10]) {
      for (const t of ts) expect(capFraction(t, d)).toBeCloseTo(capBySlices(t, d), 9);
    }
  });

  it('matches the check table of METHOD.md §1 to the digits printed there', () => {
    // printed values; the tolerance is half a unit in the last printed digit
    const table: Record<number, string[]> = {
      2: ['0.436444', '0.342519', '0.195501', '0.072147', '0.018693'],
      3: ['0.42525', '0.316406', '0.15625', '0.042969', '0.00725'],
      5: ['0.406873', '0.275208', '0.103516', '0.016052', '0.001158'],
      10: ['0.372575', '0.205036', '0.040932', '0.001575', '1.4e-05'],
    };
    const halfUlp = (printed: string) => {
      const [mant, exp] = printed.split('e');
      const decimals = (mant!.split('.')[1] ?? '').length;
      return 0.5 * 10 ** (-decimals + Number(exp ?? 0));
    };
    const t = [0.1, 0.25, 0.5, 0.75, 0.9];
    for (const [d, row] of Object.entries(table)) {
      row.forEach((printed, i) => {
        expect(Math.abs(capFraction(t[i]!, Number(d)) - Number(printed))).toBeLessThanOrEqual(halfUlp(printed) * (1 + 1e-9));
      });
    }
  });

  it('the marginal CDF is monotone, 0 at −1, ½ at 0 and 1 at 1', () => {
    for (const d of [1, 2, 3, 6]) {
      expect(ballMarginalCdf(-1, d)).toBe(0);
      expect(ballMarginalCdf(0, d)).toBeCloseTo(0.5, 15);
      expect(ballMarginalCdf(1, d)).toBe(1);
      let prev = 0;
      for (let t = -1; t <= 1; t += 0.01) {
        const v = ballMarginalCdf(t, d);
        expect(v).toBeGreaterThanOrEqual(prev - 1e-15);
        prev = v;
      }
    }
  });
});

describe('regularized incomplete beta (@stdlib) against an exact identity', () => {
  // I_p(k, n − k + 1) = P(Binomial(n, p) ≥ k) (e.g. M. Abramowitz and I. A. Stegun, Handbook of
  // Mathematical Functions, 1964, 26.5.24), the right side summed exactly term by term.
  const binomTail = (n: number, k: number, p: number) => {
    let sum = 0;
    for (let j = k; j <= n; j++) {
      let c = 1;
      for (let i = 1; i <= j; i++) c = (c * (n - j + i)) / i;
      sum += c * p ** j * (1 - p) ** (n - j);
    }
    return sum;
  };
  it('I_p(k, n−k+1) = P(Bin(n, p) ≥ k) for several n, k, p', () => {
    for (const n of [1, 3, 8, 20]) {
      for (let k = 1; k <= n; k++) {
        for (const p of [0.05, 0.3, 0.5, 0.77]) {
          expect(betainc(p, k, n - k + 1)).toBeCloseTo(binomTail(n, k, p), 12);
        }
      }
    }
  });
});
