// The command line's run summary words results.findings and results.headline: it prints their
// verdicts and never states one of its own (changing a finding changes the line).

import { describe, expect, it } from 'vitest';
import { formatEvaluateSummary } from '../../main/cli/summaries.ts';
import type { OutcomeResults, Results, ResultsCore } from '../../main/contract/results.ts';
import { withFindings } from '../../main/report/findings/index.ts';

function results(): Results {
  const deltas = [0.05, 0.1, 0.2];
  const byDelta = deltas.map((delta, i) => ({
    delta, n: 100, offered: 50, notOffered: 50, estimable: true, estimate: -40, se: 10, ci: i === 0 ? [-60, 4] : [-60, -20], p: 0.001,
    firstStage: { coef: 0.5, se: 0.05, F: i === 0 ? 8 : 500 }, reducedForm: null, arCi: [[-70, -10]], arShape: 'interval', tfCi: [-65, -15], weakInstrument: i === 0,
    variance: 'CR1', clusters: 24, baseline: { mean: 120, n: 50 }, controls: [], dropped: [], warnings: [],
  }));
  const outcome = { column: 'Y', label: 'Arrears', missing: 0, byDelta, naiveOls: { estimate: -5, se: 1, n: 1000, warnings: [] }, ivNoControl: { estimate: -15, se: 2, n: 1000, warnings: [] }, localLinear: null } as unknown as OutcomeResults;
  return withFindings({
    study: { title: 'Invented', rowsUsed: 1000, rowsRead: 1000 }, settings: { deltas, variance: 'CR1', clusterColumn: 'SCHOOL' },
    estimand: { kind: 'treatment', note: '', treatmentPer: 1 }, outcomes: [outcome],
    design: { composition: deltas.map((delta) => ({ delta, boundary: 100, atoms: [], several: 0, lotteryOnly: 80 })) },
    balance: [], balanceJoint: [], density: [{ p: 0.07, description: 'score at the limit', path: 'p', atom: 0 }, { p: null, description: 'x', path: 'q', atom: 1 }],
    fidelity: null, warnings: [],
  } as unknown as ResultsCore) as Results;
}

const summary = (r: Results) => formatEvaluateSummary({ outDir: '/tmp/out', files: [], results: r, runId: null, studySha256: '', timings: {} });

describe('the evaluate summary', () => {
  it('states the headline delta with why, the design, and each verdict from the findings', () => {
    const text = summary(results());
    expect(text).toContain('Headline delta 0.1: the middle of the study\'s deltas.');
    expect(text).toContain('Design: edge and lottery (20% of the units compared near a limit, 80% by the draw alone).');
    expect(text).toMatch(/ {2}distinguishable: at delta 0\.1, .*; at delta 0\.05 the usual 95% interval covers zero\. Note: with 24 clusters the usual cluster-robust interval can be too narrow/);
    expect(text).toContain('Instrument: weak (first-stage F below 10 at delta 0.05).');
    expect(text).toContain('Sorting at the limits: weak sign of sorting (2 density tests, 1 ran).');
  });
  it('prints the finding it is given, not one of its own', () => {
    const r = results();
    r.findings.instrument.verdict = 'strong';
    r.findings.instrument.weakAt = [];
    expect(summary(r)).toContain('Instrument: strong.');
  });
});
