// The caveat writer (issue 5 §4): on clean results none of the cautions appears; given a weak
// first stage, imbalance, a density jump, strong delta sensitivity, many overrides, a high
// exclusion rate or a coarse input, exactly the matching caveat appears, and it quotes the
// numbers that triggered it. The caveats word results.findings, so each case restates the
// findings after changing the results (as the pipeline does). Thresholds: Staiger and Stock 1997
// for F; Rubin 2001 for 0.25; Holm 1979 for the adjustment; 5% and 1% are common practice.

import { beforeAll, describe, expect, it } from 'vitest';
import type { Results } from '../../main/contract/results.ts';
import { writeCaveats } from '../../main/report/caveats/index.ts';
import { coarseVariableCaveat } from '../../main/report/caveats/coarse.ts';
import { manipulationCaveat } from '../../main/report/caveats/density.ts';
import { exclusionCaveat } from '../../main/report/caveats/exclusions.ts';
import { imbalanceCaveat } from '../../main/report/caveats/balance.ts';
import { weakInstrumentCaveat } from '../../main/report/caveats/instrument.ts';
import { localEstimateCaveat, supportedRange } from '../../main/report/caveats/local.ts';
import { overrideCaveat } from '../../main/report/caveats/overrides.ts';
import { sensitivityCaveat } from '../../main/report/caveats/sensitivity.ts';
import type { Caveat, CaveatContext } from '../../main/report/caveats/types.ts';
import { runsText } from '../../main/report/model/format.ts';
import { buildCountLedger } from '../../main/report/model/memo-counts.ts';
import { suppressionLegend } from '../../main/report/model/suppress.ts';
import { withFindings } from '../../main/report/findings/index.ts';
import { runFixture } from './memo-fixture.ts';

let fixture: Results;
beforeAll(async () => { fixture = JSON.parse(JSON.stringify((await runFixture(3000)).results)); }, 60_000);

/** The fixture's results with every check made clean. */
function clean(): Results {
  const r: Results = JSON.parse(JSON.stringify(fixture));
  for (const d of r.density) { d.p = 0.5; d.logDifference = 0.01; }
  for (const j of r.balanceJoint) j.p = 0.5;
  for (const b of r.balance) b.standardizedDiff = 0.01;
  for (const o of r.outcomes) {
    for (const b of o.byDelta) { b.weakInstrument = false; if (b.firstStage) b.firstStage.F = 200; }
    o.sensitivity.flagged = [];
  }
  r.warnings = [];
  if (r.fidelity) { r.fidelity.disagree = 0; r.fidelity.agree = r.fidelity.compared; r.fidelity.offeredAgainstRule = 0; r.fidelity.refusedAgainstRule = 0; }
  return r;
}
/** The findings stated afresh from the changed results. */
const restate = (r: Results): Results => Object.assign(r, withFindings(r));
const ctx = (r: Results): CaveatContext => ({ ledger: buildCountLedger(restate(r)), headline: 1 });
const words = (c: Caveat | null) => (c ? c.body.map((p) => runsText(p.runs, suppressionLegend(10))).join(' ') : '');
const cautions = (r: Results) => writeCaveats(restate(r), ctx(r)).filter((c) => c.tone === 'caution').map((c) => c.id);

describe('caveats', () => {
  it('clean results: no caution, only the limitation that the estimate is local', () => {
    const r = clean();
    expect(cautions(r)).toEqual([]);
    expect(writeCaveats(r, ctx(r)).map((c) => c.id)).toEqual(['local-estimate']);
  });
  it('weak first stage', () => {
    const r = clean();
    expect(weakInstrumentCaveat(restate(r))).toBeNull();
    r.outcomes[0]!.byDelta[0]!.weakInstrument = true;
    r.outcomes[0]!.byDelta[0]!.firstStage!.F = 6.4;
    r.outcomes[0]!.byDelta[2]!.firstStage!.F = 9.99;
    expect(cautions(r)).toEqual(['weak-instrument']);
    // every delta where it is weak, not only the worst
    expect(words(weakInstrumentCaveat(r))).toContain('F = 6.4');
    expect(words(weakInstrumentCaveat(r))).toContain('F = 10.0');
    expect(words(weakInstrumentCaveat(r))).toContain('below 10');
  });
  it('imbalance: a test below 5% after Holm\'s adjustment, or a standardized difference beyond 0.25 at any delta', () => {
    let r = clean();
    expect(imbalanceCaveat(restate(r))).toBeNull();
    r.balanceJoint[2]!.p = 0.012; // 3 joint tests: Holm-adjusted 0.036 < 0.05
    expect(cautions(r)).toEqual(['imbalance']);
    expect(words(imbalanceCaveat(r))).toMatch(/joint test at delta 0\.20/);
    r = clean();
    r.balanceJoint[2]!.p = 0.04; // adjusted 0.12: one test among three is not imbalance
    expect(imbalanceCaveat(restate(r))).toBeNull();
    r = clean();
    const row = r.balance.find((b) => b.delta === r.settings.deltas[1])!;
    row.standardizedDiff = -0.23; // within 0.25: no flag
    expect(imbalanceCaveat(restate(r))).toBeNull();
    row.standardizedDiff = -0.26;
    expect(words(imbalanceCaveat(restate(r)))).toContain(`${r.study.columnLabels?.[row.covariate] ?? row.covariate} at delta 0.10: -0.26 standard deviations`);
    // beyond 0.25 at the smallest delta: a smaller delta is no remedy
    r = clean();
    r.balance.find((b) => b.delta === r.settings.deltas[0])!.standardizedDiff = 0.4;
    expect(words(imbalanceCaveat(restate(r)))).toContain('a smaller delta is no remedy');
    r = clean();
    r.balance.find((b) => b.delta === r.settings.deltas[2])!.standardizedDiff = 0.4;
    expect(words(imbalanceCaveat(restate(r)))).toContain('The smallest delta shows no such difference');
  });
  it('density jump at a limit', () => {
    const r = clean();
    expect(manipulationCaveat(restate(r))).toBeNull();
    r.density[0]!.p = 0.003;
    r.density[0]!.logDifference = 0.31;
    expect(cautions(r)).toEqual(['manipulation']);
    expect(words(manipulationCaveat(r))).toMatch(/p is below 0\.05 at .*p = 0\.003/);
    // a p from 0.05 to below 0.10 is a weak sign, a limitation rather than a caution
    r.density[0]!.p = 0.07;
    expect(cautions(r)).toEqual([]);
    expect(manipulationCaveat(restate(r))!.title).toBe('A weak sign of sorting at a limit');
  });
  it('strong delta sensitivity', () => {
    const r = clean();
    for (const b of r.outcomes[0]!.byDelta) { b.estimate = -30; b.ci = [-50, -10]; }
    expect(sensitivityCaveat(restate(r))).toBeNull();
    r.outcomes[0]!.byDelta[0]!.estimate = -60; r.outcomes[0]!.byDelta[0]!.ci = [-90, -30];
    expect(cautions(r)).toEqual(['delta-sensitivity']);
    expect(words(sensitivityCaveat(r))).toContain('the estimate at delta 0.05 lies outside the interval at delta 0.10');
    expect(words(sensitivityCaveat(r))).toContain('not a test');
  });
  it('overrides from 1% of the decisions compared', () => {
    const r = clean();
    const f = r.fidelity!;
    f.disagree = Math.floor(f.compared * 0.009); f.agree = f.compared - f.disagree; f.offeredAgainstRule = f.disagree; 
    expect(overrideCaveat(restate(r), ctx(r))).toBeNull();
    f.disagree = Math.ceil(f.compared * 0.02); f.agree = f.compared - f.disagree; f.offeredAgainstRule = f.disagree; f.refusedAgainstRule = 0;
    expect(cautions(r)).toEqual(['overrides']);
    expect(words(overrideCaveat(r, ctx(r)))).toContain(`${f.disagree} households (2.0% of those compared`);
  });
  it('high exclusion rate (above 5% of rows read)', () => {
    const r = clean();
    expect(exclusionCaveat(restate(r), ctx(r))).toBeNull(); // 3 of about 3,000 rows
    r.study.rowsExcluded = [{ reason: 'INCOME is not a number', count: 400, rows: [] }];
    r.study.rowsRead = r.study.rowsUsed + 400;
    expect(cautions(r)).toEqual(['exclusions']);
    expect(words(exclusionCaveat(r, ctx(r)))).toMatch(/^\d+\.\d% of the rows read were left out/);
  });
  it('coarse input', () => {
    const r = clean();
    expect(coarseVariableCaveat(restate(r))).toBeNull();
    r.warnings = [{ code: 'coarse-variable', message: 'AGE is recorded in steps of 1 years, but at delta 0.05 the neighbourhood reaches only ±0.5 years.' }];
    expect(cautions(r)).toEqual(['coarse-variable']);
  });
  it('local estimate: present whenever an effect was estimated, with the supported range of changes', () => {
    const r = clean();
    const local = localEstimateCaveat(r, ctx(r))!;
    expect(local.tone).toBe('limitation');
    expect(words(local)).toContain('not a forecast');
    const ranges = supportedRange(r);
    expect(ranges.length).toBeGreaterThan(0);
    for (const x of ranges) {
      for (const i of [x.down, x.up]) if (i !== null) expect(r.thresholdChanges!.scenarios[i]!.valid).toBe(true);
      if (x.firstUnsupported !== null) expect(r.thresholdChanges!.scenarios[x.firstUnsupported]!.valid).toBe(false);
    }
    for (const o of r.outcomes) for (const b of o.byDelta) b.estimable = false;
    expect(localEstimateCaveat(r, ctx(r))).toBeNull();
  });
});
