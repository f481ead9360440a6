// Delta sensitivity (main/estimate/sensitivity.ts): rows sorted by delta and a flag for pairs of
// 95% intervals that share no point (closed-form interval arithmetic; see Schenker & Gentleman
// 2001 for why non-overlap is a conservative screen).
import { describe, expect, it } from 'vitest';
import type { DeltaEstimate } from '../../main/estimate/aps-iv.ts';
import { deltaSensitivity } from '../../main/estimate/sensitivity.ts';

function entry(delta: number, estimate: number | null, ci: [number, number] | null): DeltaEstimate {
  return {
    delta, n: 100, offered: 50, notOffered: 50, estimable: estimate !== null, estimate, se: null, ci, p: null,
    firstStage: null, reducedForm: null, arCi: null, arShape: null, tfCi: null, weakInstrument: null,
    variance: 'HC1', clusters: null, referenceDf: null, wildBootstrap: null, baseline: null, controls: [], dropped: [], warnings: [],
  };
}

describe('delta sensitivity', () => {
  it('flags exactly the pairs whose intervals do not overlap', () => {
    const s = deltaSensitivity('ARREARS', [entry(0.2, 5, [4, 6]), entry(0.05, 1, [0, 2]), entry(0.1, 3, [1.5, 4.5]), entry(0.4, null, null)]);
    expect(s.rows.map((r) => r.delta)).toEqual([0.05, 0.1, 0.2, 0.4]);
    expect(s.pairs).toEqual([
      { deltaA: 0.05, deltaB: 0.1, overlap: true },
      { deltaA: 0.05, deltaB: 0.2, overlap: false },
      { deltaA: 0.1, deltaB: 0.2, overlap: true },
    ]);
    expect(s.flagged).toEqual([{ deltaA: 0.05, deltaB: 0.2, overlap: false }]);
    expect(s.warnings).toHaveLength(1);
    expect(s.warnings[0]!.code).toBe('delta-sensitive');
    expect(s.warnings[0]!.message).toMatch(/at delta 0.05 \(1\) and at delta 0.2 \(5\) have 95% intervals that do not overlap/);
  });

  it('intervals touching at one point overlap', () => {
    expect(deltaSensitivity('Y', [entry(0.1, 0, [-1, 1]), entry(0.2, 2, [1, 3])]).flagged).toEqual([]);
  });
});
