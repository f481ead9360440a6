// The verdict rules of main/report/findings at their boundaries (issue 10 §4): p exactly 0.05 and
// 0.10; F at 10 and 104.7 (Staiger and Stock 1997; Lee, McCrary, Moreira and Porter 2022);
// standardized difference at 0.25 (Rubin 2001); an unbounded Anderson–Rubin set; an interval that
// touches zero; Holm's (1979) adjustment checked by hand; the design kind from the composition;
// and the baseline mean checked against a brute-force mean over the run's own unit columns.

import { beforeAll, describe, expect, it } from 'vitest';
import type { OutcomeResults, ResultsCore } from '../../main/contract/results.ts';
import { ensureFindings, findingsOf, withFindings } from '../../main/report/findings/index.ts';
import type { Results } from '../../main/contract/results.ts';
import { figureData } from '../../main/report/figure-data.ts';
import { buildMemo } from '../../main/report/model/memo.ts';
import { runsText } from '../../main/report/model/format.ts';
import { suppressionLegend } from '../../main/report/model/suppress.ts';
import { densityVerdict } from '../../main/report/findings/checks.ts';
import { intervalOnZero, setOnZero } from '../../main/report/findings/intervals.ts';
import type { StudyRun } from '../../main/pipeline/run-study.ts';
import { runFixture } from './memo-fixture.ts';

type Over = {
  ci?: [number, number]; ar?: Array<[number | null, number | null]>; tf?: [number | null, number | null] | null; F?: number[];
  estimand?: 'treatment' | 'offer'; boot?: [number, number]; clusters?: number; balance?: Array<{ d: number; delta: number; p: number }>;
  joint?: number[]; density?: Array<number | null>; lotteryOnly?: number;
};

function core(o: Over = {}): ResultsCore {
  const deltas = [0.05, 0.1, 0.2];
  const byDelta = deltas.map((delta, i) => ({
    delta, n: 100, offered: 50, notOffered: 50, estimable: true, estimate: -40, se: 10, ci: i === 1 ? (o.ci ?? [-60, -20]) : [-60, -20], p: 0.001,
    firstStage: o.estimand === 'offer' ? null : { coef: 0.5, se: 0.05, F: o.F?.[i] ?? 500 }, reducedForm: null,
    arCi: o.ar ?? [[-70, -10]], arShape: 'interval', tfCi: o.tf === undefined ? [-65, -15] : o.tf, weakInstrument: false,
    variance: 'HC1', clusters: o.clusters ?? null, baseline: { mean: 120, n: 50 }, controls: [], dropped: [], warnings: [],
    ...(o.boot ? { wildBootstrap: { p: 0.04, ci: o.boot, weights: 'webb', reps: 9999 } } : {}),
  }));
  const outcome = { column: 'Y', label: 'arrears', missing: 0, byDelta, naiveOls: { estimate: -5, se: 1, n: 1000, warnings: [] }, ivNoControl: { estimate: -15, se: 2, n: 1000, warnings: [] }, localLinear: null } as unknown as OutcomeResults;
  return {
    settings: { deltas }, estimand: { kind: o.estimand ?? 'treatment', note: '', treatmentPer: 1 }, outcomes: [outcome],
    design: { composition: deltas.map((delta) => ({ delta, boundary: 100, atoms: [], several: 0, lotteryOnly: o.lotteryOnly ?? 0 })) },
    balance: (o.balance ?? []).map((b, i) => ({ covariate: `X${i}`, delta: b.delta, standardizedDiff: b.d, p: b.p })),
    balanceJoint: (o.joint ?? []).map((p, i) => ({ delta: deltas[i], p })),
    density: (o.density ?? []).map((p, i) => ({ p, description: `limit ${i}`, path: `program.rule.all[${i}]`, atom: i })),
    fidelity: null,
  } as unknown as ResultsCore;
}
const f = (o: Over = {}) => findingsOf(core(o)).findings;

describe('is the effect distinguishable from zero (headline delta)', () => {
  it('yes only when the usual interval, the AR set and (F < 104.7) the tF interval exclude zero', () => {
    expect(f().outcomes[0]!.effect).toBe('distinguishable');
    expect(f({ F: [500, 50, 500] }).outcomes[0]!.effect).toBe('distinguishable');
    const tfCovers = f({ F: [500, 50, 500], tf: [-65, 3] }).outcomes[0]!;
    expect(tfCovers.effect).toBe('not distinguishable');
    expect(tfCovers.coveringZero).toEqual(['tF']);
    expect(tfCovers.because).toMatch(/at delta 0\.1, the tF interval .* covers zero/);
  });
  it('F exactly 104.7 needs no tF interval; just below it does', () => {
    expect(f({ F: [500, 104.7, 500], tf: [-65, 3] }).outcomes[0]!.tf).toBeNull();
    expect(f({ F: [500, 104.69, 500], tf: [-65, 3] }).outcomes[0]!.tf).toBe('covers');
  });
  it('an interval touching zero covers it', () => {
    expect(intervalOnZero([-60, 0])).toBe('covers');
    expect(intervalOnZero([0, 5])).toBe('covers');
    expect(intervalOnZero([1e-12, 5])).toBe('excludes');
    const touch = f({ ci: [-60, 0] }).outcomes[0]!;
    expect(touch.effect).toBe('not distinguishable');
    expect(touch.because).toMatch(/the usual 95% interval \(-60 to 0\) covers zero/);
  });
  it('an unbounded Anderson–Rubin set covers zero when any piece does', () => {
    expect(setOnZero([[null, -3], [4, null]])).toBe('excludes');
    expect(setOnZero([[null, null]])).toBe('covers');
    const unbounded = f({ ar: [[null, null]] }).outcomes[0]!;
    expect(unbounded.effect).toBe('not distinguishable');
    expect(unbounded.because).toMatch(/Anderson–Rubin\) set \(minus infinity to infinity\) covers zero/);
    expect(f({ ar: [[null, -3], [4, null]] }).outcomes[0]!.effect).toBe('distinguishable');
  });
  it('reads the wild cluster bootstrap interval when present, and says what few clusters mean', () => {
    const boot = f({ boot: [-80, 2], clusters: 24 }).outcomes[0]!;
    expect(boot.effect).toBe('not distinguishable');
    expect(boot.coveringZero).toEqual(['bootstrap']);
    expect(boot.clusters).toEqual({ count: 24, few: true, note: 'with 24 clusters the usual cluster-robust interval can be too narrow; the bootstrap interval is the one to read' });
    expect(f({ boot: [-80, -2], clusters: 24 }).outcomes[0]!.effect).toBe('distinguishable');
    expect(f({ clusters: 50 }).outcomes[0]!.clusters!.few).toBe(false);
    expect(f({ clusters: 49 }).outcomes[0]!.clusters!.few).toBe(true);
  });
  it('without a first stage (the effect of the offer) reads the usual interval alone', () => {
    const offer = f({ estimand: 'offer', ar: [[null, null]], tf: null }).outcomes[0]!;
    expect(offer.effect).toBe('distinguishable');
    expect(offer.anderson).toBeNull();
  });
  it('names another delta whose interval covers zero', () => {
    const r = core();
    r.outcomes[0]!.byDelta[0]!.ci = [-60, 5];
    const o = findingsOf(r).findings.outcomes[0]!;
    expect(o.effect).toBe('distinguishable');
    expect(o.coversZeroElsewhere).toEqual([0.05]);
    expect(o.because).toMatch(/; at delta 0\.05 the usual 95% interval covers zero$/);
  });
  it('carries the baseline and says when there is no estimate', () => {
    expect(f().outcomes[0]!.baseline).toEqual({ mean: 120, n: 50 });
    const r = core();
    Object.assign(r.outcomes[0]!.byDelta[1]!, { estimable: false, estimate: null, ci: null });
    expect(findingsOf(r).findings.outcomes[0]!.effect).toBe('not estimable');
  });
});

describe('instrument strength at every delta', () => {
  it('F = 10 is adequate, just below is weak, and every weak delta is listed', () => {
    expect(f({ F: [10, 200, 200] }).instrument).toMatchObject({ verdict: 'adequate', weakAt: [], belowFullAt: [0.05] });
    expect(f({ F: [9.99, 200, 9.5] }).instrument).toMatchObject({ verdict: 'weak', weakAt: [0.05, 0.2], minF: 9.5, minFDelta: 0.2 });
    expect(f({ F: [104.7, 200, 300] }).instrument.verdict).toBe('strong');
    expect(f({ estimand: 'offer' }).instrument.verdict).toBe('none');
  });
});

describe('balance', () => {
  it('flags a standardized difference beyond 0.25 even when p ≥ 0.05, not one of exactly 0.25', () => {
    const at = f({ balance: [{ d: 0.25, delta: 0.1, p: 0.6 }, { d: -0.2501, delta: 0.2, p: 0.6 }] }).balance;
    expect(at.flagged.map((x) => [x.covariate, x.why])).toEqual([['X1', ['large difference']]]);
    expect(at.verdict).toBe('differences to read');
    expect(at.advice).toBe('read the smaller delta');
    expect(f({ balance: [{ d: 0.3, delta: 0.05, p: 0.6 }] }).balance.advice).toBe('check the inputs and characteristics');
  });
  it('adjusts for the number of tests (Holm 1979): one p of 0.02 among four tests is not imbalance', () => {
    // by hand: sorted p = 0.02, 0.3, 0.5, 0.8 → adjusted 4·0.02 = 0.08 ≥ 0.05
    const one = f({ balance: [{ d: 0, delta: 0.05, p: 0.02 }, { d: 0, delta: 0.1, p: 0.3 }, { d: 0, delta: 0.2, p: 0.5 }, { d: 0, delta: 0.2, p: 0.8 }] }).balance;
    expect(one.tests).toBe(4);
    expect(one.verdict).toBe('differences to read');
    expect(one.flagged[0]).toMatchObject({ why: ['unadjusted p only'] });
    expect(one.flagged[0]!.adjustedP).toBeCloseTo(0.08, 12);
    expect(one.advice).toBe('none');
    // 0.01 → adjusted 0.04 < 0.05
    const real = f({ balance: [{ d: 0, delta: 0.05, p: 0.01 }, { d: 0, delta: 0.1, p: 0.3 }, { d: 0, delta: 0.2, p: 0.5 }, { d: 0, delta: 0.2, p: 0.8 }] }).balance;
    expect(real.verdict).toBe('imbalance');
    expect(real.flagged[0]!.why).toEqual(['adjusted p']);
  });
  it('joint tests are adjusted across deltas; none at all is "not checked"', () => {
    expect(f({ balance: [{ d: 0, delta: 0.1, p: 0.5 }], joint: [0.5, 0.04, 0.9] }).balance.verdict).toBe('balanced');
    expect(f({ balance: [{ d: 0, delta: 0.1, p: 0.5 }], joint: [0.5, 0.01, 0.9] }).balance).toMatchObject({ verdict: 'imbalance', jointRejectedAt: [0.1], jointTests: 3 });
    expect(f().balance.verdict).toBe('not checked');
  });
});

describe('sorting at the limits', () => {
  it('p exactly 0.05 is a weak sign, exactly 0.10 is no jump, below 0.05 a jump', () => {
    expect(densityVerdict(0.0499)).toBe('jump');
    expect(densityVerdict(0.05)).toBe('weak sign of sorting');
    expect(densityVerdict(0.0999)).toBe('weak sign of sorting');
    expect(densityVerdict(0.1)).toBe('no jump');
    expect(densityVerdict(null)).toBe('did not run');
  });
  it('counts tests that did not run apart', () => {
    expect(f({ density: [0.4, null] }).manipulation).toMatchObject({ verdict: 'no jump', tests: 2, ran: 1 });
    expect(f({ density: [null] }).manipulation).toMatchObject({ verdict: 'not tested', tests: 1, ran: 0 });
    expect(f({ density: [0.4, 0.07] }).manipulation.verdict).toBe('weak sign of sorting');
    expect(f({ density: [0.01, 0.07] }).manipulation.verdict).toBe('jump');
  });
});

describe('design kind from the boundary composition', () => {
  it('edge, lottery, or both with shares', () => {
    expect(f().design).toMatchObject({ kind: 'edge', edgeShare: 1, lotteryShare: 0 });
    expect(f({ lotteryOnly: 100 }).design).toMatchObject({ kind: 'lottery', lotteryShare: 1 });
    expect(f({ lotteryOnly: 80 }).design).toMatchObject({ kind: 'edge and lottery', lotteryShare: 0.8 });
    expect(f({ lotteryOnly: 80 }).design.edgeShare).toBeCloseTo(0.2, 12);
  });
  it('the headline delta is the middle one, with why', () => {
    expect(findingsOf(core()).headline).toEqual({ delta: 0.1, why: 'the middle of the study\'s deltas', index: 1 });
  });
});

describe('the delta check is descriptive', () => {
  it('records where one delta’s estimate lies outside another’s interval', () => {
    const r = core();
    Object.assign(r.outcomes[0]!.byDelta[0]!, { estimate: 10, ci: [-5, 25] });
    const s = findingsOf(r).findings.sensitivity[0]!;
    expect(s.signChanges).toBe(true);
    expect(s.range).toEqual([-40, 10]);
    expect(s.outside).toEqual([{ delta: 0.05, outsideIntervalOf: 0.1 }, { delta: 0.05, outsideIntervalOf: 0.2 }, { delta: 0.1, outsideIntervalOf: 0.05 }, { delta: 0.2, outsideIntervalOf: 0.05 }]);
  });
});

describe('on a run of the invented fixture study', () => {
  let run: StudyRun;
  beforeAll(async () => { run = await runFixture(3000); }, 60_000);
  it('the baseline is the mean outcome of the not-offered units with 0 < APS < 1 (brute force over the unit columns)', () => {
    const r = run.results;
    const y = run.prepared.data.outcomes[0]!;
    r.settings.deltas.forEach((_, k) => {
      let sum = 0, n = 0;
      const aps = run.units.aps[k]!;
      for (let i = 0; i < aps.length; i++) if (aps[i]! > 0 && aps[i]! < 1 && run.units.z[i] === 0 && Number.isFinite(y[i]!)) { sum += y[i]!; n++; }
      const b = r.outcomes[0]!.byDelta[k]!;
      expect(b.baseline!.n).toBe(n);
      expect(b.baseline!.n).toBe(b.notOffered);
      expect(b.baseline!.mean).toBeCloseTo(sum / n, 9);
    });
  });
  it('results carry headline and findings, stated from the rest of the results', () => {
    const { headline, findings, ...rest } = run.results;
    expect(findingsOf(rest)).toEqual({ headline, findings });
    expect(headline.index).toBe(1);
    expect(findings.design.kind).toBe('edge');
  });
  it('a run recorded before findings existed gets them stated; a newer one keeps its own', () => {
    const { headline, findings, ...old } = run.results;
    expect(ensureFindings(old)).toEqual(run.results);
    const kept = { ...run.results, findings: { ...findings, instrument: { ...findings.instrument, verdict: 'weak' as const } } };
    expect(ensureFindings(kept).findings.instrument.verdict).toBe('weak');
    expect(headline.index).toBe(1);
  });
  it('the key finding words the verdict, the baseline and another delta whose interval covers zero', () => {
    const r: Results = JSON.parse(JSON.stringify(run.results));
    const b = r.outcomes[0]!.byDelta;
    // headline: every interval excludes zero; the smallest delta: the usual interval covers it
    Object.assign(b[1]!, { estimate: -30, ci: [-40, -20], arCi: [[-42, -18]], tfCi: [-41, -19] });
    Object.assign(b[0]!, { estimate: -30, ci: [-60, 1] });
    Object.assign(b[2]!, { estimate: -30, ci: [-35, -25] });
    const restated = withFindings(r);
    expect(restated.findings.outcomes[0]!.effect).toBe('distinguishable');
    const doc = buildMemo(restated, figureData(run), { createdAt: '2025-03-12T09:30:00Z' });
    const kf = doc.sections[0]!.blocks[0]!;
    if (kf.kind !== 'keyFinding' || kf.body[0]!.kind !== 'paragraph') throw new Error('unexpected key finding');
    const words = runsText(kf.body[0]!.runs, suppressionLegend(10));
    expect(words).toContain('The data can tell this effect apart from no effect.');
    expect(words).toContain('With a narrower neighbourhood around the limits, the interval includes zero');
    expect(words).toMatch(/who were not offered the benefit averaged [\d,.]+ USD/);
    // the robust set covering zero turns the verdict, and the key finding says which interval does
    Object.assign(b[1]!, { arCi: [[null, null]] });
    const robust = buildMemo(withFindings(r), figureData(run), { createdAt: '2025-03-12T09:30:00Z' });
    const kf2 = robust.sections[0]!.blocks[0]!;
    if (kf2.kind !== 'keyFinding' || kf2.body[0]!.kind !== 'paragraph') throw new Error('unexpected key finding');
    expect(runsText(kf2.body[0]!.runs, suppressionLegend(10))).toContain('The usual interval does not include zero, but the wider interval that stays reliable when the offer changes little who receives the benefit does');
  });
});
