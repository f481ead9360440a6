import { describe, expect, it } from 'vitest';
import { computePropensity } from '../../main/design/propensity.ts';
import { gridStep, resolutionWarnings } from '../../main/design/resolution.ts';
import { verdicts } from '../../main/rules/atoms.ts';
import { columns, compile, cont } from './helpers.ts';

describe('coarsely recorded continuous inputs', () => {
  const p = compile([{ ...cont('age', 10), label: 'Age', unit: 'years' }], { value: 'age', op: '>=', limit: 65 });
  const ages = Array.from({ length: 41 }, (_, i) => 45 + i); // whole years 45..85
  const cols = columns(p, ages.map((age) => ({ age })));

  it('measures the grid step as the smallest gap between distinct values', () => {
    expect(gridStep(Float64Array.from([3, 1, 1, 2, 5]))).toBe(1);
    expect(gridStep(Float64Array.from([0.5, 0.25, 1]))).toBe(0.25);
    expect(gridStep(Float64Array.from([7, 7, NaN]))).toBe(Infinity);
  });

  it('whole-year ages with a ±0.5-year ball: units on the cut-off are "near the edge" but all offered (one-sided)', () => {
    const r = computePropensity(p, cols, { deltas: [0.05, 0.2], draws: 200, seed: 1 });
    if (!r.ok) throw new Error('setup');
    const z = verdicts(p, cols).eligible;
    const boundary = (k: number) => ages.map((_, i) => i).filter((i) => r.value.aps[k]![i]! > 0 && r.value.aps[k]![i]! < 1);
    // delta 0.05: only age 65 straddles, and every such unit is offered — no comparison across the cut-off
    expect(boundary(0).map((i) => ages[i])).toEqual([65]);
    expect(new Set(boundary(0).map((i) => z[i]))).toEqual(new Set([1]));
    // delta 0.2 (±2 years): both sides enter
    expect(new Set(boundary(1).map((i) => z[i]))).toEqual(new Set([0, 1]));

    const w = resolutionWarnings(p, cols, r.value.scales, [0.05, 0.1, 0.2]);
    expect(w).toHaveLength(1);
    expect(w[0]!.deltas).toEqual([0.05, 0.1]); // radius 0.5 and 1 year ≤ the 1-year step
    expect(w[0]!.message).toMatch(/recorded in steps of 1 years/);
    expect(w[0]!.message).toMatch(/Use deltas above 0\.1/);
  });

  it('finely recorded ages raise no warning', () => {
    const fine = columns(p, Array.from({ length: 400 }, (_, i) => ({ age: 45 + i * 0.1 })));
    const r = computePropensity(p, fine, { deltas: [0.05], draws: 200, seed: 1 });
    if (!r.ok) throw new Error('setup');
    expect(resolutionWarnings(p, fine, r.value.scales, [0.05])).toEqual([]);
  });
});
