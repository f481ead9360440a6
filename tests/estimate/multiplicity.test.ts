// Holm (1979) adjusted p-values (main/estimate/multiplicity.ts). Sources: a worked example done by
// hand from the definition in Holm (1979), Scand. J. Statist. 6:65–70 (shown step by step below);
// the equivalence "adjusted p ≤ α ⇔ rejected by Holm's sequentially rejective procedure at α"
// (Wright 1992, Biometrics 48:1005–1013) on random inputs; and the ordering Holm ≤ Bonferroni.
import { describe, expect, it } from 'vitest';
import { holmAdjust, holmByDelta, holmRejects } from '../../main/estimate/multiplicity.ts';
import { rng } from './random.ts';

describe('Holm-adjusted p-values', () => {
  it('worked example, m = 4: p = (0.010, 0.040, 0.030, 0.005)', () => {
    // Sorted: 0.005, 0.010, 0.030, 0.040 → ×4, ×3, ×2, ×1 = 0.020, 0.030, 0.060, 0.040;
    // running maximum 0.020, 0.030, 0.060, 0.060; back in the input order:
    const adjusted = holmAdjust([0.01, 0.04, 0.03, 0.005]);
    [0.03, 0.06, 0.06, 0.02].forEach((v, i) => expect(adjusted[i]!).toBeCloseTo(v, 15));
    // Holm's procedure at α = 0.05: 0.005 ≤ 0.05/4 reject; 0.010 ≤ 0.05/3 reject; 0.030 > 0.05/2 stop.
    expect(holmRejects([0.01, 0.04, 0.03, 0.005], 0.05)).toEqual([true, false, false, true]);
  });

  it('adjusted p ≤ α exactly when Holm’s procedure rejects, for random p-values and several α', () => {
    const r = rng(99);
    for (let t = 0; t < 300; t++) {
      const m = 1 + Math.floor(r.uniform() * 8);
      const p = Array.from({ length: m }, () => r.uniform() ** 3);
      const adjusted = holmAdjust(p);
      for (const alpha of [0.01, 0.05, 0.1]) {
        const rejected = holmRejects(p, alpha);
        adjusted.forEach((a, i) => expect(a <= alpha).toBe(rejected[i]));
      }
      adjusted.forEach((a, i) => {
        expect(a).toBeGreaterThanOrEqual(p[i]!);
        expect(a).toBeLessThanOrEqual(Math.min(1, m * p[i]!) + 1e-15); // never above Bonferroni
      });
    }
  });

  it('caps at 1, keeps ties, and leaves missing p-values out of m', () => {
    expect(holmAdjust([0.6, 0.6])).toEqual([1, 1]);
    const a = holmAdjust([0.02, null, 0.02, NaN]);
    expect(a[0]).toBeCloseTo(0.04, 15);
    expect(a[2]).toBeCloseTo(0.04, 15);
    expect(a[1]).toBeNaN();
    expect(a[3]).toBeNaN();
  });

  it('per delta across outcomes', () => {
    const rows = holmByDelta([
      { column: 'A', byDelta: [{ delta: 0.1, p: 0.01 }, { delta: 0.2, p: 0.2 }] },
      { column: 'B', byDelta: [{ delta: 0.1, p: 0.04 }, { delta: 0.2, p: null }] },
    ]);
    expect(rows).toEqual([
      { column: 'A', delta: 0.1, p: 0.01, adjustedP: 0.02 },
      { column: 'B', delta: 0.1, p: 0.04, adjustedP: 0.04 },
      { column: 'A', delta: 0.2, p: 0.2, adjustedP: 0.2 },
      { column: 'B', delta: 0.2, p: null, adjustedP: null },
    ]);
  });
});
