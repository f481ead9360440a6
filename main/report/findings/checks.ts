// The verdicts of the checks, from results.json: instrument strength at every delta, balance
// with a large-difference flag and Holm's (1979) adjustment for the number of tests, sorting at
// each limit (McCrary 2008 density test) with tests that did not run counted apart, the delta
// comparison shown descriptively, fidelity to the recorded decisions, and the local-linear
// cross-check's reach.

import type {
  BalanceFinding, BalanceFlag, DensityFinding, FidelityFinding, InstrumentFinding, LocalLinearFinding,
  ManipulationFinding, ResultsCore, SensitivityFinding,
} from '../../contract/results.ts';
import { holmAdjust } from '../../estimate/multiplicity.ts';
import { FINDING_THRESHOLDS as T } from './thresholds.ts';

const unique = (xs: number[]) => [...new Set(xs)].sort((a, b) => a - b);

/** Weak (F < 10) wherever it is weak, not only at the worst delta; strong only when F ≥ 104.7 everywhere. */
export function instrumentFinding(r: ResultsCore): InstrumentFinding {
  const stages = r.estimand.kind === 'treatment'
    ? r.outcomes.flatMap((o) => o.byDelta.filter((b) => b.firstStage).map((b) => ({ delta: b.delta, F: b.firstStage!.F })))
    : [];
  if (!stages.length) return { verdict: 'none', weakAt: [], belowFullAt: [], minF: null, minFDelta: null };
  // A first stage without a finite F (no take-up variation; NaN is null in JSON) counts as weak.
  const weakAt = unique(stages.filter((s) => !(typeof s.F === 'number' && s.F >= T.WEAK_F)).map((s) => s.delta));
  const belowFullAt = unique(stages.filter((s) => !(typeof s.F === 'number' && s.F >= T.TF_FULL)).map((s) => s.delta));
  const finite = stages.filter((s) => typeof s.F === 'number' && Number.isFinite(s.F));
  const min = finite.reduce<{ delta: number; F: number } | null>((a, s) => (a === null || s.F < a.F ? s : a), null);
  const verdict = weakAt.length ? 'weak' : belowFullAt.length ? 'adequate' : 'strong';
  return { verdict, weakAt, belowFullAt, minF: min?.F ?? null, minFDelta: min?.delta ?? null };
}

export function balanceFinding(r: ResultsCore): BalanceFinding {
  const rows = r.balance;
  const adjusted = holmAdjust(rows.map((b) => b.p));
  const tests = rows.filter((b) => b.p !== null && Number.isFinite(b.p)).length;
  const flagged: BalanceFlag[] = [];
  rows.forEach((b, i) => {
    const why: BalanceFlag['why'] = [];
    const adj = Number.isNaN(adjusted[i]!) ? null : adjusted[i]!;
    if (b.standardizedDiff !== null && Math.abs(b.standardizedDiff) > T.LARGE_STD_DIFF) why.push('large difference');
    if (adj !== null && adj < T.ALPHA) why.push('adjusted p');
    else if (b.p !== null && b.p < T.ALPHA) why.push('unadjusted p only');
    if (why.length) flagged.push({ covariate: b.covariate, delta: b.delta, standardizedDiff: b.standardizedDiff, p: b.p, adjustedP: adj, why });
  });
  const jointAdjusted = holmAdjust(r.balanceJoint.map((j) => j.p));
  const jointTests = r.balanceJoint.filter((j) => j.p !== null && Number.isFinite(j.p)).length;
  const jointRejectedAt = unique(r.balanceJoint.filter((_, i) => jointAdjusted[i]! < T.ALPHA).map((j) => j.delta));
  if (!rows.length) return { verdict: 'not checked', tests: 0, flagged: [], jointTests: 0, jointRejectedAt: [], advice: 'none' };
  const imbalance = jointRejectedAt.length > 0 || flagged.some((f) => f.why.includes('adjusted p'));
  const verdict = imbalance ? 'imbalance' : flagged.length ? 'differences to read' : 'balanced';
  const badDeltas = unique([...flagged.filter((f) => f.why.some((w) => w !== 'unadjusted p only')).map((f) => f.delta), ...jointRejectedAt]);
  const smallest = r.settings.deltas[0];
  const advice = verdict === 'balanced' || !badDeltas.length
    ? 'none'
    : badDeltas.includes(smallest!) ? 'check the inputs and characteristics' : 'read the smaller delta';
  return { verdict, tests, flagged, jointTests, jointRejectedAt, advice };
}

/** One density test's verdict: a jump below 0.05; a weak sign from 0.05 to below 0.10; no jump from 0.10. */
export function densityVerdict(p: number | null): DensityFinding['verdict'] {
  if (p === null || !Number.isFinite(p)) return 'did not run';
  if (p < T.ALPHA) return 'jump';
  if (p < T.WEAK_SIGN_P) return 'weak sign of sorting';
  return 'no jump';
}

export function manipulationFinding(r: ResultsCore): ManipulationFinding {
  const limits = r.density.map((d): DensityFinding => ({ path: d.path, description: d.description, atom: d.atom, p: d.p, verdict: densityVerdict(d.p) }));
  const ran = limits.filter((l) => l.verdict !== 'did not run').length;
  const has = (v: DensityFinding['verdict']) => limits.some((l) => l.verdict === v);
  const verdict = ran === 0 ? 'not tested' : has('jump') ? 'jump' : has('weak sign of sorting') ? 'weak sign of sorting' : 'no jump';
  return { verdict, tests: limits.length, ran, limits };
}

/** Descriptive only: the samples at different deltas are nested, so their estimates are correlated
 * and overlap of intervals proves little (Schenker and Gentleman 2001, Am. Statistician 55(3):182–186). */
export function sensitivityFindings(r: ResultsCore): SensitivityFinding[] {
  return r.outcomes.map((o) => {
    const estimates = o.byDelta.map((b) => ({ delta: b.delta, estimate: b.estimable ? b.estimate : null }));
    const known = o.byDelta.filter((b) => b.estimable && b.estimate !== null && b.ci) as Array<typeof o.byDelta[number] & { estimate: number; ci: [number, number] }>;
    const values = known.map((b) => b.estimate);
    const range: [number, number] | null = values.length ? [Math.min(...values), Math.max(...values)] : null;
    const outside: SensitivityFinding['outside'] = [];
    for (const a of known) for (const b of known) if (a !== b && (a.estimate < b.ci[0] || a.estimate > b.ci[1])) outside.push({ delta: a.delta, outsideIntervalOf: b.delta });
    return { column: o.column, estimates, range, signChanges: values.some((v) => v > 0) && values.some((v) => v < 0), outside };
  });
}

export function fidelityFinding(r: ResultsCore): FidelityFinding {
  const f = r.fidelity;
  if (!f || f.compared === 0) return { verdict: 'not compared', share: null };
  return { verdict: f.disagree / f.compared >= T.OVERRIDE_SHARE ? 'differs from the formula' : 'follows the formula', share: f.agree / f.compared };
}

export function localLinearFindings(r: ResultsCore): LocalLinearFinding[] {
  return r.outcomes.flatMap((o) => {
    const ll = o.localLinear;
    if (!ll) return [];
    const units = ll.unitsOffered + ll.unitsNotOffered;
    const share = o.ivNoControl.n > 0 ? units / o.ivNoControl.n : 0;
    return [{ column: o.column, bandwidth: ll.bandwidth, units, share, nearGlobal: share > T.NEAR_GLOBAL_SHARE }];
  });
}
