import { describe, expect, it } from 'vitest';
import { balanceVerdict, compositionVerdict, effectVerdict, fidelityVerdict, headlineNote, instrumentVerdict, manipulationVerdict, sensitivitySpec } from '../../app/lib/evidence.ts';
import { interval, num, pValue } from '../../app/lib/format.ts';
import type { OutcomeResults, Results, ResultsCore } from '../../main/contract/results.ts';
import { withFindings } from '../../main/report/findings/index.ts';

// Only the fields the findings read; the rest of results.json is not needed here. The screen words
// results.findings, stated here by main/report/findings as the pipeline does.
function results(over: { F?: number[]; ci?: [number, number]; jointP?: number[]; densityP?: Array<number | null>; agree?: number; lotteryOnly?: number } = {}): Results {
  const deltas = [0.05, 0.1, 0.2];
  const byDelta = deltas.map((delta, i) => ({
    delta, n: 100, offered: 50, notOffered: 50, estimable: true, estimate: -40, se: 10, ci: over.ci ?? [-60, -20], p: 0.001,
    firstStage: { coef: 0.5, se: 0.05, F: over.F?.[i] ?? 500 }, reducedForm: null, arCi: [[-70, -10]], arShape: 'interval', tfCi: [-65, -15], weakInstrument: false,
    variance: 'HC1', clusters: null, baseline: { mean: 120, n: 50 }, controls: [], dropped: [], warnings: [],
  }));
  const outcome = { column: 'Y', label: 'arrears', missing: 0, byDelta, naiveOls: { estimate: -5, se: 1, n: 1000, warnings: [] }, ivNoControl: { estimate: -15, se: 2, n: 1000, warnings: [] }, localLinear: null } as unknown as OutcomeResults;
  return withFindings({
    settings: { deltas }, estimand: { kind: 'treatment', note: '', treatmentPer: 1 }, outcomes: [outcome],
    design: { composition: deltas.map((delta) => ({ delta, boundary: 100, atoms: [], several: 0, lotteryOnly: over.lotteryOnly ?? 0 })) },
    balance: over.jointP ? [{ covariate: 'X', delta: 0.1, standardizedDiff: 0.01, p: 0.5 }] : [], balanceJoint: (over.jointP ?? []).map((p, i) => ({ delta: deltas[i], p })),
    density: (over.densityP ?? []).map((p, i) => ({ p, description: 'income at the limit', path: `p${i}`, atom: i })),
    fidelity: over.agree === undefined ? null : { compared: 1000, agree: over.agree, disagree: 1000 - over.agree, offeredAgainstRule: 0, refusedAgainstRule: 1000 - over.agree, basis: '' },
  } as unknown as ResultsCore) as Results;
}

describe('the Evidence screen\'s one-line verdicts word results.findings', () => {
  it('calls an effect distinguishable only when the findings do, and says which interval covers zero', () => {
    const r = results();
    expect(effectVerdict(r, r.outcomes[0]!)).toMatchObject({ tone: 'good', finding: 'distinguishable' });
    expect(effectVerdict(r, r.outcomes[0]!).text).toMatch(/Those not offered averaged 120/);
    const c = results({ ci: [-60, 5] });
    expect(effectVerdict(c, c.outcomes[0]!).text).toMatch(/Not distinguishable from no effect: at delta 0\.1, the usual 95% interval \(-60 to 5\) covers zero/);
    // the screen reads the findings, not the intervals: a changed finding changes the verdict
    c.findings.outcomes[0]!.effect = 'distinguishable';
    expect(effectVerdict(c, c.outcomes[0]!).finding).toBe('distinguishable');
  });
  it('reports a weak instrument at every delta where it is weak', () => {
    expect(instrumentVerdict(results({ F: [10, 200, 300] })).finding).toBe('adequate');
    const weak = instrumentVerdict(results({ F: [9.9, 200, 8] }));
    expect(weak.tone).toBe('caution');
    expect(weak.text).toMatch(/Weak at δ = 0\.05, δ = 0\.2/);
  });
  it('balance adjusted for the number of tests; density with weak signs and tests not run counted', () => {
    expect(balanceVerdict(results({ jointP: [0.2, 0.5, 0.9] })).finding).toBe('balanced');
    expect(balanceVerdict(results({ jointP: [0.2, 0.04, 0.9] })).finding).toBe('balanced'); // adjusted 0.12
    expect(balanceVerdict(results({ jointP: [0.2, 0.01, 0.9] })).text).toMatch(/joint test at δ = 0\.1/);
    expect(balanceVerdict(results()).tone).toBe('neutral');
    // A flagged characteristic is named as the study names it (results.study.columnLabels), as in the memo.
    const named = results({ jointP: [0.2, 0.5, 0.9] });
    named.balance[0]!.standardizedDiff = 0.4;
    const flagged = withFindings(named as unknown as ResultsCore) as Results;
    (flagged as { study: unknown }).study = { columnLabels: { X: 'Arrears the year before (USD)' } };
    expect(balanceVerdict(flagged).text).toMatch(/beyond 0\.25 \(Rubin 2001\): Arrears the year before \(USD\) at δ = 0\.1/);
    expect(manipulationVerdict(results({ densityP: [0.3, 0.01] })).tone).toBe('caution');
    expect(manipulationVerdict(results({ densityP: [0.3, 0.07] })).text).toMatch(/^Weak sign of sorting/);
    expect(manipulationVerdict(results({ densityP: [0.3, null] })).text).toMatch(/2 density tests, 1 ran \(1 could not\); p is at least 0\.10/);
  });
  it('states the design kind and the headline delta with why', () => {
    expect(compositionVerdict(results({ lotteryOnly: 80 })).text).toMatch(/^Edge and lottery: .* 80\.0% are there by the draw alone/);
    expect(compositionVerdict(results({ lotteryOnly: 100 })).text).toMatch(/not local to an edge/);
    expect(headlineNote(results())).toBe('The headline delta is 0.1, the middle of the study\'s deltas; the row in bold.');
  });
  it('reports fidelity as the share of recorded decisions the formula reproduces', () => {
    expect(fidelityVerdict(results({ agree: 996 })).text).toMatch(/99\.6% of the 1,000/);
    expect(fidelityVerdict(results({ agree: 985 })).tone).toBe('caution');
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
