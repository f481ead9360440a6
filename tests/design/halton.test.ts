import { describe, expect, it } from 'vitest';
import { haltonPoints, radicalInverse } from '../../main/design/halton.ts';

describe('Halton sequence (J. H. Halton, Numer. Math. 2:84–90, 1960)', () => {
  it('base 2 is the van der Corput sequence: 1/2, 1/4, 3/4, 1/8, 5/8, 3/8, 7/8', () => {
    expect([1, 2, 3, 4, 5, 6, 7].map((i) => radicalInverse(i, 2))).toEqual([1 / 2, 1 / 4, 3 / 4, 1 / 8, 5 / 8, 3 / 8, 7 / 8]);
  });
  it('base 3: 1/3, 2/3, 1/9, 4/9, 7/9, 2/9, 5/9, 8/9', () => {
    const got = [1, 2, 3, 4, 5, 6, 7, 8].map((i) => radicalInverse(i, 3));
    [1 / 3, 2 / 3, 1 / 9, 4 / 9, 7 / 9, 2 / 9, 5 / 9, 8 / 9].forEach((v, i) => expect(got[i]).toBeCloseTo(v, 15));
  });
  it('base 5, point 7 = 12 in base 5 → 0.21 in base 5 = 2/5 + 1/25', () => {
    expect(radicalInverse(7, 5)).toBeCloseTo(2 / 5 + 1 / 25, 15);
  });
  it('points are laid out row-major, one prime base per coordinate', () => {
    const p = haltonPoints(3, 3, 1);
    expect(Array.from(p.slice(0, 3))).toEqual([radicalInverse(1, 2), radicalInverse(1, 3), radicalInverse(1, 5)]);
    expect(p[2 * 3 + 1]).toBeCloseTo(radicalInverse(3, 3), 15);
  });
  it('is evenly spread: each of the 2^k dyadic intervals holds exactly one of the first 2^k points (base 2)', () => {
    const k = 8;
    const seen = new Set<number>();
    for (let i = 0; i < 2 ** k; i++) seen.add(Math.floor(radicalInverse(i, 2) * 2 ** k));
    expect(seen.size).toBe(2 ** k);
  });
});
