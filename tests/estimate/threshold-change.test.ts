// Small threshold changes (main/estimate/threshold-change.ts). Checked against closed-form counts
// on evenly spaced data (with x = 0, 1, …, 2000 and the limit 1000 moved to 1010, exactly the 10
// units 1001 … 1010 become eligible), the projection identities (take-up = γ₁·S; outcome total
// = β₁·γ₁·S = ρ₁·S by indirect least squares, with ρ₁'s interval), the boundary-band validity,
// lookup-table entries and arithmetic limits rewritten through the compiler, and a lottery.
import { describe, expect, it } from 'vitest';
import { computePropensity } from '../../main/design/propensity.ts';
import { thresholdChanges } from '../../main/estimate/threshold-change.ts';
import { compile, cont, disc } from '../design/helpers.ts';

const grid = (n: number) => Float64Array.from({ length: n }, (_, i) => i);

describe('threshold changes on a single income limit', () => {
  const program = compile([cont('income', 100)], { value: 'income', op: '<=', limit: 1000 });
  const income = grid(2001);
  const cols = { n: income.length, continuous: [income], discrete: [] };
  const ps = computePropensity(program, cols, { deltas: [0.2], draws: 64, seed: 1 });
  if (!ps.ok) throw new Error('propensity failed');
  const estimates = [{ column: 'ARREARS', firstStage: { coef: 0.6, se: 0.05 }, reducedForm: { coef: -30, se: 10 } }];
  const result = thresholdChanges({ program, columns: cols, delta: 0.2, aps: ps.value.aps[0]!, estimates });

  it('counts the switchers exactly and projects take-up and the outcome total', () => {
    expect(result.scenarios.map((s) => s.relativeChange)).toEqual([-0.05, -0.01, 0.01, 0.05]);
    const up1 = result.scenarios.find((s) => s.relativeChange === 0.01)!;
    expect(up1.path).toBe('program.rule.limit');
    expect(up1.original).toBe(1000);
    expect(up1.changed).toBeCloseTo(1010, 10);
    expect(up1.newlyEligible).toBe(10);
    expect(up1.newlyIneligible).toBe(0);
    expect(up1.offerChange).toBe(10);
    const o = up1.outcomes[0]!;
    expect(o.takeUpChange!.estimate).toBeCloseTo(6, 12);
    expect(o.takeUpChange!.ci[0]).toBeCloseTo((0.6 - 1.959963984540054 * 0.05) * 10, 10);
    expect(o.outcomeTotalChange!.estimate).toBeCloseTo(-300, 10);
    expect(o.outcomeTotalChange!.ci[1]).toBeCloseTo((-30 + 1.959963984540054 * 10) * 10, 9);
    // Outcome total = 2SLS estimate × take-up change (β₁ = ρ₁/γ₁).
    expect(o.outcomeTotalChange!.estimate).toBeCloseTo((-30 / 0.6) * o.takeUpChange!.estimate, 10);
    const down5 = result.scenarios.find((s) => s.relativeChange === -0.05)!;
    expect(down5.newlyIneligible).toBe(50); // 951 … 1000
    expect(down5.offerChange).toBe(-50);
    expect(down5.outcomes[0]!.outcomeTotalChange!.estimate).toBeCloseTo(1500, 10);
  });

  it('valid only while every switcher lies inside the boundary band (|income − 1000| < 0.2·100 = 20)', () => {
    const up1 = result.scenarios.find((s) => s.relativeChange === 0.01)!;
    expect(up1.valid).toBe(true);
    expect(up1.switchersOutsideBand).toBe(0);
    expect(up1.validity).toMatch(/All 10 units that change eligibility lie inside the boundary band at delta 0.2/);
    const up5 = result.scenarios.find((s) => s.relativeChange === 0.05)!;
    expect(up5.newlyEligible).toBe(50);
    expect(up5.valid).toBe(false);
    expect(up5.switchersOutsideBand).toBe(31); // 1020 … 1050 are 20 or more away (31 units)
    expect(up5.validity).toMatch(/31 of the 50 units .* outside the boundary band/);
  });

  it('without a treatment column take-up change is the offer change itself', () => {
    const r = thresholdChanges({
      program, columns: cols, delta: 0.2, aps: ps.value.aps[0]!,
      estimates: [{ column: 'Y', firstStage: null, takeUpIsOffer: true, reducedForm: { coef: 2, se: 1 } }], changes: [0.01],
    });
    expect(r.scenarios[0]!.outcomes[0]!.takeUpChange).toEqual({ estimate: 10, ci: [10, 10] });
  });
});

describe('lookup tables, arithmetic limits and lotteries', () => {
  it('each table entry and the arithmetic else-limit is moved on its own', () => {
    const program = compile([cont('income', 1000), disc('size')], {
      value: 'income', op: '<=', limit: { by: 'size', table: { '1': 20000, '2': 28000 }, else: '28000 + 7000 * (size - 2)' },
    });
    const n = 40000;
    const income = Float64Array.from({ length: n }, (_, i) => (i % 10000) * 4); // 0, 4, …, 39996
    const size = Float64Array.from({ length: n }, (_, i) => 1 + Math.floor(i / 10000)); // 1–4
    const cols = { n, continuous: [income], discrete: [size] };
    const aps = new Float64Array(n).fill(0.5);
    const r = thresholdChanges({ program, columns: cols, delta: 0.1, aps, estimates: [], changes: [0.01] });
    expect(r.scenarios.map((s) => s.path)).toEqual(['program.rule.limit.table.1', 'program.rule.limit.table.2', 'program.rule.limit.else']);
    // size 1: limit 20000 → 20200: incomes 20004 … 20200 (step 4) = 50 units.
    expect(r.scenarios[0]!.newlyEligible).toBe(50);
    // size 2: 28000 → 28280: 70 units.
    expect(r.scenarios[1]!.newlyEligible).toBe(70);
    // else: size 3 limit 35000 → 35350 (87 units: 35004 … 35348), size 4 limit 42000 → above every income (none).
    expect(r.scenarios[2]!.changed).toBe('(28000 + 7000 * (size - 2)) * 1.01');
    expect(r.scenarios[2]!.newlyEligible).toBe(87);
    expect(r.scenarios[2]!.description).toBe('limit on income for other values of size');
  });

  it('lottery: the offer change is (ifEligible − ifIneligible) × net switchers', () => {
    const program = compile([cont('x', 1)], { value: 'x', op: '<=', limit: 100 }, { ifEligible: 0.6, ifIneligible: 0.1 });
    const x = grid(300);
    const r = thresholdChanges({ program, columns: { n: 300, continuous: [x], discrete: [] }, delta: 0.5, aps: new Float64Array(300).fill(0.3), estimates: [], changes: [0.05] });
    expect(r.scenarios[0]!.newlyEligible).toBe(5);
    expect(r.scenarios[0]!.offerChange).toBeCloseTo(0.5 * 5, 12);
  });
});
