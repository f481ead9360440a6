// Boundary composition (main/estimate/composition.ts) from the propensity stage's straddle masks,
// checked against closed-form geometry: a linear criterion's cut-off crosses the ball of radius δ
// (scaled units) around a unit exactly when the unit's distance to it, |value − limit|/scale, is
// below δ; and for a lottery, units deep inside the eligible region have 0 < APS < 1 with no
// criterion crossing their ball.
import { describe, expect, it } from 'vitest';
import { computePropensity } from '../../main/design/propensity.ts';
import { boundaryComposition } from '../../main/estimate/composition.ts';
import { compile, cont, disc } from '../design/helpers.ts';
import { rng } from './random.ts';

describe('boundary composition', () => {
  it('"income ≤ limit(size) AND age ≥ 60": counts per criterion equal the distance rule', () => {
    const program = compile([cont('income', 10), cont('age', 10), disc('size')], {
      all: [
        { value: 'income', op: '<=', limit: { by: 'size', table: { '1': 20, '2': 30 } }, label: 'Income under the limit' },
        { value: 'age', op: '>=', limit: 60 },
      ],
    });
    const r = rng(3);
    const n = 3000;
    const income = Float64Array.from({ length: n }, () => 50 * r.uniform());
    const age = Float64Array.from({ length: n }, () => 30 + 60 * r.uniform());
    const size = Float64Array.from({ length: n }, () => (r.uniform() < 0.5 ? 1 : 2));
    const delta = 0.5;
    const ps = computePropensity(program, { n, continuous: [income, age], discrete: [size] }, { deltas: [delta], draws: 128, seed: 2 });
    if (!ps.ok) throw new Error('propensity failed');
    const result = boundaryComposition(program, ps.value);
    const c = result.byDelta[0]!;

    let boundary = 0;
    let nearIncome = 0;
    let nearAge = 0;
    let both = 0;
    for (let i = 0; i < n; i++) {
      const p = ps.value.aps[0]![i]!;
      if (!(p > 0 && p < 1)) continue;
      boundary++;
      const a = Math.abs(income[i]! - (size[i] === 1 ? 20 : 30)) / 10 < delta;
      const b = Math.abs(age[i]! - 60) / 10 < delta;
      if (a) nearIncome++;
      if (b) nearAge++;
      if (a && b) both++;
    }
    expect(c.boundary).toBe(boundary);
    expect(c.boundary).toBe(ps.value.summary[0]!.boundary);
    expect(c.atoms.map((a) => a.straddling)).toEqual([nearIncome, nearAge]);
    expect(c.atoms[0]!.only).toBe(nearIncome - both);
    expect(c.atoms[1]!.only).toBe(nearAge - both);
    expect(c.several).toBe(both);
    expect(both).toBeGreaterThan(0);
    expect(c.lotteryOnly).toBe(0);
    expect(c.atoms[0]!.description).toBe('Income under the limit');
    expect(c.atoms[1]!.description).toBe('age ≥ 60');
    expect(c.atoms[0]!.path).toBe('program.rule.all[0]');
    expect(c.atoms[0]!.share).toBeCloseTo(nearIncome / boundary, 14);
  });

  it('lottery among the eligible: interior eligible units are identified by the lottery alone', () => {
    const program = compile([cont('x', 1)], { value: 'x', op: '<=', limit: 5 }, { ifEligible: 0.5, ifIneligible: 0 });
    const x = Float64Array.from({ length: 101 }, (_, i) => i / 10); // 0, 0.1, …, 10
    const ps = computePropensity(program, { n: 101, continuous: [x], discrete: [] }, { deltas: [0.25], draws: 64, seed: 1 });
    if (!ps.ok) throw new Error('propensity failed');
    const c = boundaryComposition(program, ps.value).byDelta[0]!;
    // Straddling: |x − 5| < 0.25 → x = 4.8 … 5.2 (5 units), of which 5.0 and below also have APS > 0.
    // APS > 0 and < 1: every x ≤ 5.2 (x ≤ 5 eligible with 0.5; 5.1, 5.2 partly in the eligible region).
    expect(c.boundary).toBe(53);
    expect(c.atoms[0]!.straddling).toBe(5);
    expect(c.lotteryOnly).toBe(48);
  });

  it('restricting to included units', () => {
    const program = compile([cont('x', 1)], { value: 'x', op: '<=', limit: 5 });
    const x = Float64Array.from({ length: 101 }, (_, i) => i / 10);
    const ps = computePropensity(program, { n: 101, continuous: [x], discrete: [] }, { deltas: [0.25], draws: 64, seed: 1 });
    if (!ps.ok) throw new Error('propensity failed');
    const include = Uint8Array.from(x, (v) => (v < 5 ? 1 : 0));
    expect(boundaryComposition(program, ps.value).byDelta[0]!.boundary).toBe(5);
    expect(boundaryComposition(program, ps.value, include).byDelta[0]!.boundary).toBe(2);
  });
});
