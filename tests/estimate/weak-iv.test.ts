// Weak-instrument diagnostics: the tF critical-value function (Lee, McCrary, Moreira & Porter
// 2022), the robust Anderson–Rubin set (checked against its equivalent definition, a robust Wald
// test of Z in the regression of Y − β0·D on (Z, W), on a grid of β0), and the first-stage F
// against the fixtures/robust-se reference values.
import { describe, expect, it } from 'vitest';
import { ols } from '../../main/estimate/ols.ts';
import type { NamedColumn, VarianceType } from '../../main/estimate/types.ts';
import {
  andersonRubinSet,
  solveQuadraticSet,
  TF_CRITICAL_VALUES_5PCT,
  tfCriticalValue,
  tfInterval,
  weakInstrumentChecks,
  type ArSet,
} from '../../main/estimate/weak-iv.ts';
import { readJson, readNumericCsv } from '../reference/fixtures.ts';
import { column, rng } from './random.ts';

const col = (name: string, values: Float64Array): NamedColumn => ({ name, values });

describe('tF critical values (Lee, McCrary, Moreira & Porter 2022, AER 112(10):3260–3290)', () => {
  it('anchor values stated in the paper: c(10) = 3.43, c(104.7) = 1.96, and 1.96 beyond', () => {
    expect(tfCriticalValue(10)).toBeCloseTo(3.43, 12);
    expect(tfCriticalValue(104.7)).toBeCloseTo(1.96, 12);
    expect(tfCriticalValue(500)).toBe(1.96);
  });

  it('unbounded at or below F = 1.96² ≈ 3.84, finite just above', () => {
    expect(tfCriticalValue(3.84)).toBe(Infinity);
    expect(tfCriticalValue(2)).toBe(Infinity);
    expect(Number.isFinite(tfCriticalValue(3.85))).toBe(true);
    expect(tfCriticalValue(3.85)).toBeGreaterThan(18.66);
    expect(tfInterval(1, 0.5, 3)).toEqual({ critical: null, interval: [null, null] });
  });

  it('reproduces the table (transcribed from memory, METHOD.md §2) at its points and is non-increasing between them', () => {
    for (const [F, c] of TF_CRITICAL_VALUES_5PCT) expect(tfCriticalValue(F)).toBeCloseTo(c, 12);
    let previous = Infinity;
    for (let F = 3.85; F < 120; F += 0.01) {
      const c = tfCriticalValue(F);
      expect(c).toBeLessThanOrEqual(previous + 1e-12);
      previous = c;
    }
    // Linear between table points: halfway between F = 16 (2.80) and 25 (2.46).
    expect(tfCriticalValue(20.5)).toBeCloseTo((2.8 + 2.46) / 2, 12);
  });

  it('the adjusted interval is estimate ± c(F)·se', () => {
    const { critical, interval } = tfInterval(2, 0.5, 16);
    expect(critical).toBeCloseTo(2.8, 12);
    expect(interval[0]).toBeCloseTo(2 - 1.4, 12);
    expect(interval[1]).toBeCloseTo(2 + 1.4, 12);
  });
});

describe('quadratic sets {β : aβ² + bβ + c ≤ 0} (closed form)', () => {
  it('interval, two rays, whole line and the degenerate ray', () => {
    // (β − 1)(β − 3) ≤ 0  →  [1, 3]
    expect(solveQuadraticSet(1, -4, 3)).toEqual({ kind: 'interval', intervals: [[1, 3]] });
    // −(β − 1)(β − 3) ≤ 0  →  (−∞, 1] ∪ [3, ∞)
    expect(solveQuadraticSet(-1, 4, -3)).toEqual({ kind: 'two-rays', intervals: [[null, 1], [3, null]] });
    // −β² − 1 ≤ 0 always
    expect(solveQuadraticSet(-1, 0, -1)).toEqual({ kind: 'whole-line', intervals: [[null, null]] });
    // 2β − 4 ≤ 0  →  (−∞, 2]
    expect(solveQuadraticSet(0, 2, -4)).toEqual({ kind: 'half-line', intervals: [[null, 2]] });
  });
});

interface IvData {
  y: Float64Array;
  d: Float64Array;
  z: Float64Array;
  w: Float64Array;
  g: Float64Array;
}

/** Synthetic IV data: first-stage strength piD and reduced-form effect piY (on a binary offer). */
function ivData(seed: number, n: number, piD: number, piY: number): IvData {
  const r = rng(seed);
  const z = column(n, () => (r.uniform() < 0.5 ? 1 : 0));
  const w = column(n, () => r.normal());
  const g = column(n, (i) => i % 15);
  const v = column(n, () => r.normal());
  const d = column(n, (i) => piD * z[i]! + 0.3 * w[i]! + v[i]!);
  const y = column(n, (i) => piY * z[i]! + 0.5 * w[i]! + 0.8 * v[i]! + (0.5 + z[i]!) * r.normal());
  return { y, d, z, w, g };
}

function inSet(set: ArSet, beta: number): boolean {
  return set.intervals.some(([lo, hi]) => (lo === null || beta >= lo) && (hi === null || beta <= hi));
}

function boundaries(set: ArSet): number[] {
  return set.intervals.flat().filter((x): x is number => x !== null);
}

/** The equivalent definition: β0 is accepted iff the robust Wald test of Z in Y − β0·D on (Z, W) accepts. */
function acceptedByWald(data: IvData, beta0: number, variance: VarianceType, q: number): boolean {
  const yb = column(data.y.length, (i) => data.y[i]! - beta0 * data.d[i]!);
  const fit = ols(col('yb', yb), [col('w', data.w), col('z', data.z)], variance === 'CR1' ? { variance, clusters: data.g } : { variance });
  const t = fit.coefficients.find((c) => c.name === 'z')!.z;
  return t * t <= q;
}

describe('robust Anderson–Rubin set', () => {
  const cases: Array<{ label: string; data: IvData; kind: ArSet['kind'] }> = [
    { label: 'strong first stage', data: ivData(101, 300, 0.8, 0.6), kind: 'interval' },
    { label: 'weak first stage, clear reduced form', data: ivData(202, 300, 0.05, 1.2), kind: 'two-rays' },
    { label: 'no first stage, no reduced form', data: ivData(303, 300, 0.0, 0.0), kind: 'whole-line' },
  ];
  const types: VarianceType[] = ['classical', 'HC0', 'HC1', 'HC2', 'HC3', 'CR1'];

  for (const { label, data, kind } of cases) {
    const input = { outcome: col('y', data.y), endogenous: col('d', data.d), instrument: col('z', data.z), controls: [col('w', data.w)] };

    it(`${label}: the data give the intended shape (${kind}) with HC1`, () => {
      const set = andersonRubinSet(input, { variance: 'HC1' });
      expect(set.kind).toBe(kind);
      expect(set.warnings.some((w) => w.code === 'ar-unbounded')).toBe(kind !== 'interval');
    });

    for (const variance of types) {
      it(`${label}, ${variance}: membership equals the robust Wald test of Z in Y − β0·D on a grid of β0`, () => {
        const options = variance === 'CR1' ? { variance, clusters: data.g } : { variance };
        const set = andersonRubinSet(input, options);
        const edges = boundaries(set);
        const grid: number[] = [];
        for (let b = -40; b <= 40; b += 0.173) grid.push(b);
        for (const e of edges) grid.push(e - 1e-3, e + 1e-3, e - 0.1, e + 0.1);
        let compared = 0;
        for (const b of grid) {
          if (edges.some((e) => Math.abs(b - e) < 1e-7 * Math.max(1, Math.abs(e)))) continue;
          expect(inSet(set, b), `β0 = ${b}`).toBe(acceptedByWald(data, b, variance, set.critical));
          compared++;
        }
        expect(compared).toBeGreaterThan(400);
        // The boundary points themselves are where t² = q.
        for (const e of edges) {
          const yb = column(data.y.length, (i) => data.y[i]! - e * data.d[i]!);
          const fit = ols(col('yb', yb), [col('w', data.w), col('z', data.z)], options);
          expect(fit.coefficients.find((c) => c.name === 'z')!.z ** 2).toBeCloseTo(set.critical, 6);
        }
      });
    }

    it(`${label}: V_DD is the squared robust SE of the first-stage coefficient (Frisch–Waugh–Lovell)`, () => {
      const set = andersonRubinSet(input, { variance: 'HC1' });
      const fs = ols(col('d', data.d), [col('w', data.w), col('z', data.z)], { variance: 'HC1' }).coefficients.find((c) => c.name === 'z')!;
      expect(set.piD).toBeCloseTo(fs.estimate, 12);
      expect(set.vDD / fs.se ** 2).toBeCloseTo(1, 10);
      // Bounded exactly when the robust first-stage t² exceeds the χ²(1) critical value.
      expect(set.kind === 'interval').toBe((fs.estimate / fs.se) ** 2 > set.critical);
    });
  }

  it('the set always contains the 2SLS estimate π_Y/π_D (just identified: never empty)', () => {
    for (const { data } of cases) {
      const set = andersonRubinSet({ outcome: col('y', data.y), endogenous: col('d', data.d), instrument: col('z', data.z), controls: [col('w', data.w)] });
      expect(inSet(set, set.piY / set.piD)).toBe(true);
    }
  });

  it('an instrument collinear with the controls is refused', () => {
    const { data } = cases[0]!;
    const zCopy = column(data.w.length, (i) => 3 * data.w[i]!);
    expect(() => andersonRubinSet({ outcome: col('y', data.y), endogenous: col('d', data.d), instrument: col('z', zCopy), controls: [col('w', data.w)] })).toThrow(
      /adds nothing beyond the controls/,
    );
  });
});

describe('first-stage F and the combined report', () => {
  // Reference: fixtures/robust-se/expected.json, data set ds3 (binary treatment, binary offer,
  // 12 clusters): Wald F on the excluded instrument, 50-digit values.
  const ref = readJson<any>('robust-se/expected.json').datasets.ds3_binary_g12;
  const data = readNumericCsv('robust-se/ds3_binary_g12.csv');
  const input = {
    outcome: col('y', data.y!),
    endogenous: col('d', data.d!),
    instrument: col('z', data.z!),
    controls: [col('w1', data.w1!), col('w2', data.w2!)],
  };

  it('robust F = squared robust t of the instrument, HC1 and CR1, equal to the reference', () => {
    const hc1 = weakInstrumentChecks(input, { variance: 'HC1' });
    expect(hc1.firstStageF / ref.first_stage.d.F_excluded_instruments.HC1).toBeCloseTo(1, 12);
    expect(Math.sqrt(hc1.firstStageF) / ref.first_stage.d.t.HC1.z).toBeCloseTo(1, 12);
    const cr1 = weakInstrumentChecks(input, { clusters: data.cluster! });
    expect(cr1.firstStageF / ref.first_stage.d.F_excluded_instruments.CR1).toBeCloseTo(1, 12);
    expect(cr1.ar.clusters).toBe(12);
    expect(hc1.weak).toBe(false);
    // F ≈ 29.1: tF critical value between c(25) = 2.46 and c(36) = 2.27.
    expect(hc1.tF.critical!).toBeGreaterThan(2.27);
    expect(hc1.tF.critical!).toBeLessThan(2.46);
    const effect = hc1.tsls.coefficients.find((c) => c.name === 'd')!;
    expect(effect.estimate / ref.tsls.coef.d).toBeCloseTo(1, 12);
    expect(hc1.tF.interval[0]!).toBeCloseTo(effect.estimate - hc1.tF.critical! * effect.se, 12);
  });

  it('warns below F = 10 (Staiger & Stock 1997) and reports an unbounded tF interval below 3.84', () => {
    const weak = ivData(202, 300, 0.05, 1.2);
    const report = weakInstrumentChecks({ outcome: col('y', weak.y), endogenous: col('d', weak.d), instrument: col('z', weak.z), controls: [col('w', weak.w)] });
    expect(report.firstStageF).toBeLessThan(3.84);
    expect(report.weak).toBe(true);
    expect(report.warnings.map((w) => w.code)).toEqual(['weak-instrument', 'ar-unbounded']);
    expect(report.warnings[0]!.message).toMatch(/^The first-stage F statistic is \d+\.\d, below 10 \(Staiger and Stock 1997\)/);
    expect(report.tF).toEqual({ critical: null, interval: [null, null] });
    expect(report.ar.kind).toBe('two-rays');
  });
});
