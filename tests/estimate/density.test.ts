// McCrary (2008) density test (main/estimate/density.ts) on data with a known density, closed
// form: the uniform density on [0, 1] (f = 1, no jump), the triangular density f(x) = 2x on
// [0, 1] (f(0.5) = 1 on both sides, a slope but no jump), and a step density 2/3 on [0, 0.5),
// 4/3 on [0.5, 1] (a jump with θ = ln f⁺ − ln f⁻ = ln 2). Size under no jump and power under the
// jump over seeded replications; the margin test for a limit that varies by a discrete variable.
import { describe, expect, it } from 'vitest';
import { densityChecksForProgram, mccraryTest } from '../../main/estimate/density.ts';
import { compile, columns, cont, disc } from '../design/helpers.ts';
import { column, rng } from './random.ts';

/** Inverse-CDF draws: uniform, triangular f(x) = 2x, and the step density. */
const uniform = (r: ReturnType<typeof rng>) => r.uniform();
const triangular = (r: ReturnType<typeof rng>) => Math.sqrt(r.uniform());
const step = (r: ReturnType<typeof rng>) => {
  const u = r.uniform(); // F(x) = 2x/3 below 0.5, 1/3 + 4(x − 0.5)/3 above
  return u < 1 / 3 ? 1.5 * u : 0.5 + 0.75 * (u - 1 / 3);
};

function sample(seed: number, n: number, draw: (r: ReturnType<typeof rng>) => number): Float64Array {
  const r = rng(seed);
  return column(n, () => draw(r));
}

describe('McCrary density test on known densities', () => {
  it('uniform on [0, 1] at 0.5: both one-sided densities ≈ 1 and no jump', () => {
    const t = mccraryTest(sample(1, 20000, uniform), 0.5);
    expect(t.densityBelow!).toBeGreaterThan(0.93);
    expect(t.densityBelow!).toBeLessThan(1.07);
    expect(t.densityAbove!).toBeGreaterThan(0.93);
    expect(t.densityAbove!).toBeLessThan(1.07);
    expect(Math.abs(t.logDifference!)).toBeLessThan(3 * t.se!);
    expect(t.binWidth).toBeCloseTo((2 * Math.sqrt(1 / 12)) / Math.sqrt(20000), 3);
  });

  it('triangular f(x) = 2x at 0.5: f = 1 on both sides (the local-linear fit follows the slope)', () => {
    const t = mccraryTest(sample(2, 20000, triangular), 0.5);
    expect(Math.abs(t.densityBelow! - 1)).toBeLessThan(0.08);
    expect(Math.abs(t.densityAbove! - 1)).toBeLessThan(0.08);
    expect(Math.abs(t.logDifference!)).toBeLessThan(3 * t.se!);
  });

  it('step density 2/3 → 4/3 at 0.5: θ ≈ ln 2 and the test rejects', () => {
    const t = mccraryTest(sample(3, 20000, step), 0.5);
    // Tolerances ≈ 3 standard deviations of f̂ at this n and bandwidth.
    expect(Math.abs(t.densityBelow! - 2 / 3)).toBeLessThan(0.1);
    expect(Math.abs(t.densityAbove! - 4 / 3)).toBeLessThan(0.15);
    expect(Math.abs(t.logDifference! - Math.LN2)).toBeLessThan(3 * t.se!);
    expect(t.p!).toBeLessThan(1e-6);
  });

  it('step density over 40 replications: θ̂ unbiased for ln 2 and its 95% interval covers it', () => {
    const reps = 40;
    let sum = 0;
    let seSum = 0;
    let covered = 0;
    for (let s = 0; s < reps; s++) {
      const t = mccraryTest(sample(5000 + s, 20000, step), 0.5);
      sum += t.logDifference!;
      seSum += t.se!;
      if (t.ci![0] <= Math.LN2 && Math.LN2 <= t.ci![1]) covered++;
    }
    expect(Math.abs(sum / reps - Math.LN2)).toBeLessThan((3 * seSum) / reps / Math.sqrt(reps));
    // Binomial(40, 0.95): 34 or more with probability ≈ 99%.
    expect(covered).toBeGreaterThanOrEqual(34);
  });

  it('size near 5% with no jump, power near 1 with the jump (200 seeded replications of n = 2000)', () => {
    let rejectUniform = 0;
    let rejectStep = 0;
    const reps = 200;
    for (let s = 0; s < reps; s++) {
      if (mccraryTest(sample(100 + s, 2000, uniform), 0.5).p! < 0.05) rejectUniform++;
      if (mccraryTest(sample(900 + s, 2000, step), 0.5).p! < 0.05) rejectStep++;
    }
    // Binomial(200, 0.05): mean 10, sd 3.1; at most 22 with probability > 99.9% at the nominal rate.
    expect(rejectUniform).toBeLessThanOrEqual(22);
    expect(rejectStep).toBeGreaterThanOrEqual(180);
  });

  it('a given bandwidth is used as given; the SE follows √((1/(n h))·(24/5)·(1/f⁺ + 1/f⁻))', () => {
    const x = sample(4, 5000, uniform);
    const t = mccraryTest(x, 0.5, { bandwidth: 0.2 });
    expect(t.bandwidth).toBe(0.2);
    expect(t.bandwidthSource).toBe('given');
    expect(t.se!).toBeCloseTo(Math.sqrt((1 / (5000 * 0.2)) * 4.8 * (1 / t.densityAbove! + 1 / t.densityBelow!)), 12);
  });

  it('too few units on a side, and missing values, are reported in words', () => {
    const t = mccraryTest(Float64Array.from([0.1, 0.2, 0.3, NaN, 0.9]), 0.5);
    expect(t.logDifference).toBeNull();
    expect(t.excluded).toBe(1);
    expect(t.warnings.map((w) => w.code)).toEqual(['density-missing', 'density-too-few-units']);
    expect(t.warnings[1]!.message).toMatch(/needs units on both sides of the cut-off; there are 3 below and 1 at or above it/);
  });
});

describe('density checks for a program', () => {
  it('limit by household size: tested on value − limit, which lines up the cells’ cut-offs', () => {
    const program = compile([cont('income', 1000), disc('size')], {
      all: [
        { value: 'income', op: '<=', limit: { by: 'size', table: { '1': 20000, '2': 30000 } } },
        { value: 'size', in: [1, 2] },
      ],
    });
    const r = rng(7);
    const rows = Array.from({ length: 20000 }, () => {
      const size = r.uniform() < 0.5 ? 1 : 2;
      const limit = size === 1 ? 20000 : 30000;
      // Income uniform on limit ± 10,000, except that a quarter of those just above the limit
      // report an income just below it (manipulation).
      let income = limit - 10000 + 20000 * r.uniform();
      if (income > limit && income < limit + 2000 && r.uniform() < 0.5) income = limit - (income - limit);
      return { income, size };
    });
    const checks = densityChecksForProgram(program, columns(program, rows));
    expect(checks.length).toBe(1); // the membership criterion has no cut-off
    const c = checks[0]!;
    expect(c.onMargin).toBe(true);
    expect(c.path).toBe('program.rule.all[0]');
    expect(c.description).toMatch(/value − limit at 0 \(the limit varies by group\)/);
    expect(c.logDifference!).toBeLessThan(0);
    expect(c.p!).toBeLessThan(1e-6);

    const honest = rows.map((row, i) => ({ ...row, income: (row.size === 1 ? 10000 : 20000) + ((i * 0.61803398875) % 1) * 20000 }));
    const ok = densityChecksForProgram(program, columns(program, honest))[0]!;
    expect(Math.abs(ok.logDifference!)).toBeLessThan(3 * ok.se!);
  });
});
