import { describe, expect, it } from 'vitest';
import { balanceVerdict, effectVerdict, fidelityVerdict, instrumentVerdict, manipulationVerdict, sensitivitySpec } from '../../app/lib/evidence.ts';
import { interval, num, pValue } from '../../app/lib/format.ts';
import type { OutcomeResults, Results } from '../../main/contract/results.ts';

// Only the fields the verdicts read; the rest of results.json is not needed here.
function results(over: { F?: number[]; ci?: [number, number]; jointP?: number[]; densityP?: number[]; agree?: number } = {}): Results {
  const deltas = [0.05, 0.1, 0.2];
  const byDelta = deltas.map((delta, i) => ({
    delta, n: 100, offered: 50, notOffered: 50, estimable: true, estimate: -40, se: 10, ci: over.ci ?? [-60, -20], p: 0.001,
    firstStage: { coef: 0.5, se: 0.05, F: over.F?.[i] ?? 50 }, reducedForm: null, arCi: null, arShape: null, tfCi: null, weakInstrument: false,
    variance: 'HC1', clusters: null, controls: [], dropped: [], warnings: [],
  }));
  const outcome = { column: 'Y', label: 'arrears', missing: 0, byDelta, naiveOls: { estimate: -5, se: 1, n: 1000, warnings: [] }, ivNoControl: { estimate: -15, se: 2, n: 1000, warnings: [] } } as unknown as OutcomeResults;
  return {
    settings: { deltas }, estimand: { kind: 'treatment', note: '', treatmentPer: 1 }, outcomes: [outcome],
    balance: over.jointP ? [{ covariate: 'X' }] : [], balanceJoint: (over.jointP ?? []).map((p, i) => ({ delta: deltas[i], p })),
    density: (over.densityP ?? []).map((p) => ({ p, description: 'income at the limit' })),
    fidelity: over.agree === undefined ? null : { compared: 1000, agree: over.agree, disagree: 1000 - over.agree, offeredAgainstRule: 0, refusedAgainstRule: 1000 - over.agree, basis: '' },
  } as unknown as Results;
}

describe('the Evidence screen\'s one-line verdicts', () => {
  it('calls an effect clear only when its 95% interval excludes zero', () => {
    expect(effectVerdict(results(), results().outcomes[0]!).tone).toBe('good');
    const r = results({ ci: [-60, 5] });
    expect(effectVerdict(r, r.outcomes[0]!).text).toMatch(/includes zero/);
  });
  it('flags a first-stage F below 10 (Staiger & Stock 1997) and names the radius', () => {
    expect(instrumentVerdict(results({ F: [10, 20, 30] })).tone).toBe('good');
    const weak = instrumentVerdict(results({ F: [9.9, 20, 30] }));
    expect(weak.tone).toBe('caution');
    expect(weak.text).toMatch(/δ = 0\.05/);
  });
  it('flags balance and density tests at p < 0.05 (5%, common practice), and says when nothing was tested', () => {
    expect(balanceVerdict(results({ jointP: [0.2, 0.5, 0.9] })).tone).toBe('good');
    expect(balanceVerdict(results({ jointP: [0.2, 0.04, 0.9] })).text).toMatch(/δ = 0\.1/);
    expect(balanceVerdict(results()).tone).toBe('neutral');
    expect(manipulationVerdict(results({ densityP: [0.3, 0.01] })).tone).toBe('caution');
    expect(manipulationVerdict(results({ densityP: [0.3] })).tone).toBe('good');
  });
  it('reports fidelity as the share of recorded decisions the formula reproduces', () => {
    expect(fidelityVerdict(results({ agree: 996 })).text).toMatch(/99\.6% of the 1,000/);
    expect(fidelityVerdict(results({ agree: 900 })).tone).toBe('caution');
    expect(fidelityVerdict(results()).tone).toBe('neutral');
  });
  it('marks every verdict with a sign as well as a colour', () => {
    for (const v of [instrumentVerdict(results({ F: [5, 5, 5] })), balanceVerdict(results())]) expect(['✓', '!', '·']).toContain(v.mark);
  });
  it('builds the estimate-by-radius chart spec from the estimates with intervals', () => {
    const r = results();
    const spec = sensitivitySpec(r, r.outcomes[0]!);
    expect(spec.points).toEqual([0.05, 0.1, 0.2].map((delta) => ({ delta, estimate: -40, low: -60, high: -20 })));
    expect(spec.references).toEqual([{ label: 'Naive comparison', value: -5 }]);
  });
});

describe('numbers as the screens show them', () => {
  it('groups thousands, keeps three significant digits and uses a real minus sign', () => {
    expect(num(-39.84)).toBe('−39.8');
    expect(num(21000)).toBe('21,000');
    expect(num(0.012345)).toBe('0.0123');
    expect(num(null)).toBe('—');
    expect(pValue(0.0004)).toBe('< 0.001');
    expect(interval([null, 3])).toBe('−∞ to 3');
    expect(interval([null, null])).toMatch(/unbounded/);
  });
});
