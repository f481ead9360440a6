import { describe, expect, it } from 'vitest';
import { ballMarginalCdf } from '../../main/design/ball-geometry.ts';
import { ballPointSet, cubeDimension, cubeToBall } from '../../main/design/ball-points.ts';
import { createRng } from '../../main/design/random.ts';

/** One-sample Kolmogorov–Smirnov statistic D_n = sup |F_n − F|. */
function ksStatistic(sample: number[], cdf: (x: number) => number): number {
  const xs = sample.slice().sort((a, b) => a - b);
  const n = xs.length;
  let d = 0;
  xs.forEach((x, i) => {
    const f = cdf(x);
    d = Math.max(d, Math.abs((i + 1) / n - f), Math.abs(f - i / n));
  });
  return d;
}
// Asymptotic critical value of √n·D_n at the 0.1% level: 1.95 (F. J. Massey, "The
// Kolmogorov–Smirnov test for goodness of fit", JASA 46:68–78, 1951, Table 1, large n).
const ksCritical = (n: number) => 1.95 / Math.sqrt(n);

function pseudoRandomBall(d: number, n: number, seed: number): Float64Array {
  const rng = createRng(seed, 7);
  const v = new Float64Array(cubeDimension(d));
  const out = new Float64Array(n * d);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < v.length; j++) v[j] = rng.next();
    cubeToBall(v, d, out, i * d);
  }
  return out;
}

const radii = (pts: Float64Array, d: number) => {
  const r: number[] = [];
  for (let i = 0; i < pts.length / d; i++) {
    let s = 0;
    for (let j = 0; j < d; j++) s += pts[i * d + j]! ** 2;
    r.push(Math.sqrt(s));
  }
  return r;
};

describe('uniform points in the ball', () => {
  for (const d of [1, 2, 3, 5, 8]) {
    it(`d = ${d}: the radius has P(R ≤ t) = t^d (Kolmogorov–Smirnov at 0.1%)`, () => {
      const n = 4000;
      const pts = pseudoRandomBall(d, n, 11 + d);
      expect(ksStatistic(radii(pts, d), (t) => Math.min(1, Math.max(0, t)) ** d)).toBeLessThan(ksCritical(n));
    });
    it(`d = ${d}: a coordinate follows the ball's marginal law (cap fractions; KS at 0.1%)`, () => {
      const n = 4000;
      const pts = pseudoRandomBall(d, n, 99 + d);
      const first = Array.from({ length: n }, (_, i) => pts[i * d]!);
      expect(ksStatistic(first, (t) => ballMarginalCdf(t, d))).toBeLessThan(ksCritical(n));
      // and the last coordinate: the map must not favour any axis
      const last = Array.from({ length: n }, (_, i) => pts[i * d + d - 1]!);
      expect(ksStatistic(last, (t) => ballMarginalCdf(t, d))).toBeLessThan(ksCritical(n));
    });
  }

  it('the randomized quasi-random set is uniform too, and lies inside the ball', () => {
    for (const d of [1, 2, 3, 6]) {
      const set = ballPointSet(d, 4000, 5);
      const r = radii(set.points, d);
      expect(Math.max(...r)).toBeLessThanOrEqual(1);
      expect(ksStatistic(r, (t) => t ** d)).toBeLessThan(ksCritical(r.length));
    }
  });

  it('depends only on (d, draws, seed): same seed, same points; another seed, other points', () => {
    const a = ballPointSet(3, 1000, 42);
    const b = ballPointSet(3, 1000, 42);
    const c = ballPointSet(3, 1000, 43);
    expect(Array.from(a.points)).toEqual(Array.from(b.points));
    expect(Array.from(a.points)).not.toEqual(Array.from(c.points));
    expect(a.replicates * a.perReplicate).toBeGreaterThanOrEqual(1000);
  });
});

describe('seeded generator (xorshift128, Marsaglia 2003)', () => {
  it('gives uniform numbers on [0, 1) (KS at 0.1%) and repeats for the same seed', () => {
    const rng = createRng(2024);
    const xs = Array.from({ length: 5000 }, () => rng.next());
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
    expect(ksStatistic(xs, (x) => Math.min(1, Math.max(0, x)))).toBeLessThan(ksCritical(xs.length));
    const again = createRng(2024);
    expect(again.next()).toBe(xs[0]);
    expect(createRng(2025).next()).not.toBe(xs[0]);
  });
});
