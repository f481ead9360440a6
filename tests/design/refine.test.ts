import { describe, expect, it } from 'vitest';
import { MAX_REFINEMENT } from '../../main/design/ball-points.ts';
import { REFINED_AT_BOUND } from '../../main/design/aps.ts';
import { computePropensity, type PropensityResult } from '../../main/design/propensity.ts';
import type { CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';
import { columns, compile, cont, simpson } from './helpers.ts';

function run(p: CompiledProgram, cols: DesignColumns, seed = 1): PropensityResult {
  const r = computePropensity(p, cols, { deltas: [0.1], draws: 4000, seed });
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.value;
}

// Rule x·y ≥ 1 (non-linear, so simulated), unit at (c, c), δ = 0.1, scales 1: the offered part of
// the disk is a sliver near its edge at 45°; it is empty for c < 1/(1 + 0.1/√2)·… i.e. when
// (c + 0.1/√2)² < 1. Reference area by Simpson's rule over u of the chord {v : (c + 0.1u)(c + 0.1v) ≥ 1}
// (checked against 2·10^7 plain Monte Carlo points while writing this test: 5.77e-4 ± 5e-6 at c = 0.93).
function sliver(c: number): number {
  const f = (u: number) => {
    const R = Math.sqrt(Math.max(0, 1 - u * u));
    const lower = (1 / (c + 0.1 * u) - c) / 0.1;
    return Math.max(0, R - Math.max(lower, -R));
  };
  return simpson(f, 0.5, 0.9, 400000) / Math.PI;
}

describe('more draws where a simulated APS is exactly 0 or 1 although the ball crosses the edge', () => {
  const offer = compile([cont('x', 1), cont('y', 1)], { value: 'x * y', op: '>=', limit: 1 });
  const refuse = compile([cont('x', 1), cont('y', 1)], { value: 'x * y', op: '<', limit: 1 });

  it('a true APS of 1.7e-4 stays in the sample for every seed, and the estimates centre on it', () => {
    const c = 0.9296;
    const truth = sliver(c);
    expect(truth).toBeGreaterThan(1e-4);
    expect(truth).toBeLessThan(3e-4);
    let refinedSeeds = 0;
    let sum = 0;
    const seeds = 30;
    for (let seed = 1; seed <= seeds; seed++) {
      const r = run(offer, columns(offer, [{ x: c, y: c }]), seed);
      expect(r.aps[0]![0]).toBeGreaterThan(0);
      expect(r.summary[0]!.boundary).toBe(1);
      if (r.refined[0]![0]) {
        refinedSeeds++;
        expect(r.refined[0]![0]! & REFINED_AT_BOUND).toBe(0);
        expect(r.summary[0]!.refined).toBe(1);
        expect(r.summary[0]!.refinedAtBound).toBe(0);
        expect(r.se[0]![0]).toBeGreaterThan(0);
      }
      sum += r.aps[0]![0]!;
    }
    // 4,000 draws expect 0.7 points in the sliver: most seeds need more
    expect(refinedSeeds).toBeGreaterThan(seeds / 3);
    // stopping at the first level with a point inside biases upwards a little (common to such rules)
    expect(sum / seeds).toBeGreaterThan(0.5 * truth);
    expect(sum / seeds).toBeLessThan(2 * truth);
  });

  it('the complement (APS just below 1) is refined the same way', () => {
    const c = 0.9296;
    const a = run(offer, columns(offer, [{ x: c, y: c }]), 4);
    const b = run(refuse, columns(refuse, [{ x: c, y: c }]), 4);
    expect(a.refined[0]![0]).toBeGreaterThan(0);
    expect(b.refined[0]![0]).toBe(a.refined[0]![0]);
    expect(b.aps[0]![0]).toBeLessThan(1);
    expect(b.aps[0]![0]! + a.aps[0]![0]!).toBeCloseTo(1, 12);
  });

  it('when no point lands inside after 64 times the draws, the unit is counted as still at 0', () => {
    // (0.929 + 0.1/√2)² < 1: the sliver is empty, though interval bounds cannot prove it
    const r = run(offer, columns(offer, [{ x: 0.929, y: 0.929 }, { x: 0.9296, y: 0.9296 }, { x: 0.5, y: 0.5 }]), 1);
    expect(r.method[0]![0]).toBe(2);
    expect(r.aps[0]![0]).toBe(0);
    expect(r.refined[0]![0]).toBe(MAX_REFINEMENT | REFINED_AT_BOUND);
    expect(r.refined[0]![2]).toBe(0); // constant: never simulated
    expect(r.summary[0]!.refined).toBe(r.refined[0]![1] ? 2 : 1);
    expect(r.summary[0]!.refinedAtBound).toBe(1);
  });

  it('units that are not 0 or 1 keep the base draws', () => {
    const r = run(offer, columns(offer, [{ x: 0.99, y: 1.0 }]), 1);
    expect(r.aps[0]![0]).toBeGreaterThan(0.2);
    expect(r.refined[0]![0]).toBe(0);
    expect(r.summary[0]!.refined).toBe(0);
  });
});
