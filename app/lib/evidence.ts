// The Evidence screen's one-line verdicts and its chart spec, from results.json (Results). Every
// verdict is read from `results.findings` and the headline delta from `results.headline`
// (main/report/findings states them once for the screen, the memo and the command line); this
// module only words them. A verdict always carries words and a mark (✓ / !), never colour alone,
// and `finding` holds the findings' own verdict word so the memo and the screen can be compared.

import type { OutcomeResults, Results } from '../../main/contract/results.ts';
import type { DeltaSensitivitySpec } from '../../main/report/charts/spec.ts';
import { count, interval, num, percent, pValue } from './format.ts';
import { columnName } from './names.ts';

export type Tone = 'good' | 'caution' | 'neutral';
export interface Verdict { tone: Tone; mark: '✓' | '!' | '·'; text: string; finding?: string }

const good = (text: string, finding?: string): Verdict => ({ tone: 'good', mark: '✓', text, ...(finding ? { finding } : {}) });
const caution = (text: string, finding?: string): Verdict => ({ tone: 'caution', mark: '!', text, ...(finding ? { finding } : {}) });
const neutral = (text: string, finding?: string): Verdict => ({ tone: 'neutral', mark: '·', text, ...(finding ? { finding } : {}) });

/** The headline delta's index, as the findings state it. */
export function headlineIndex(r: Results): number {
  return r.headline.index;
}

/** The headline delta and why it was chosen, in one line. */
export function headlineNote(r: Results): string {
  return `The headline delta is ${r.headline.delta}, ${r.headline.why}; the row in bold.`;
}

const WHO = { edge: 'near the edge', lottery: 'offered by the draw', 'edge and lottery': 'near the edge or offered by the draw', none: 'near the edge' } as const;

export function effectVerdict(r: Results, o: OutcomeResults): Verdict {
  const i = r.outcomes.indexOf(o);
  const f = r.findings.outcomes[i >= 0 ? i : r.findings.outcomes.findIndex((x) => x.column === o.column)];
  const at = o.byDelta[headlineIndex(r)];
  if (!f || f.effect === 'not estimable' || !at || at.estimate === null || !at.ci) return caution(`No estimate for ${o.label} at the headline delta: ${f?.because ?? 'see the warnings'}.`, f?.effect ?? 'not estimable');
  const what = r.estimand.kind === 'treatment' ? 'receiving the benefit' : 'being offered the benefit';
  const baseline = f.baseline ? ` Those not offered averaged ${num(f.baseline.mean)}.` : '';
  const text = `For units ${WHO[r.findings.design.kind]} (δ = ${at.delta}), ${what} changed ${o.label} by ${num(at.estimate)} (95% interval ${interval(at.ci)}; ${count(at.n)} units).${baseline}`;
  const clusters = f.clusters?.few ? ` Note: ${f.clusters.note}.` : '';
  return f.effect === 'distinguishable'
    ? good(`${text} Distinguishable from no effect: ${f.because}.${clusters}`, f.effect)
    : neutral(`${text} Not distinguishable from no effect: ${f.because}.${clusters}`, f.effect);
}

export function comparisonVerdict(r: Results, o: OutcomeResults): Verdict {
  const at = o.byDelta[headlineIndex(r)];
  const naive = o.naiveOls.estimate;
  if (naive === null || !at || at.estimate === null) return neutral('The naive comparison could not be computed.');
  return neutral(`A naive comparison of all units gives ${num(naive)}, and the offer without the APS control gives ${num(o.ivNoControl.estimate)}; the design's ${num(at.estimate)} compares like with like.`);
}

const deltas = (ds: number[]) => ds.map((d) => `δ = ${d}`).join(', ');

export function instrumentVerdict(r: Results): Verdict {
  const f = r.findings.instrument;
  if (f.verdict === 'none') return neutral(r.estimand.kind === 'offer' ? 'No take-up column: the estimate is the effect of the offer itself, so there is no first stage.' : 'The first stage could not be estimated.', f.verdict);
  const smallest = f.minF !== null ? ` (smallest first-stage F = ${num(f.minF)} at δ = ${f.minFDelta})` : '';
  // thresholds (main/report/findings/thresholds.ts): F ≥ 104.7 makes the usual interval valid (Lee,
  // McCrary, Moreira & Porter 2022); F below 10 is weak (Staiger & Stock 1997)
  if (f.verdict === 'strong') return good(`Strong: the offer clearly moves take-up at every delta${smallest}; at F ≥ 104.7 the usual interval is reliable.`, f.verdict);
  if (f.verdict === 'adequate') return good(`Adequate: first-stage F is at least 10 everywhere${smallest}, but below 104.7 at ${deltas(f.belowFullAt)}: there read the tF interval, which widens the usual one to stay reliable.`, f.verdict);
  return caution(`Weak at ${deltas(f.weakAt)} (first-stage F below 10${smallest}): rely on the Anderson–Rubin and tF intervals there.`, f.verdict);
}

export function balanceVerdict(r: Results): Verdict {
  const b = r.findings.balance;
  if (b.verdict === 'not checked') return neutral('No covariates were chosen, so balance was not checked. Add characteristics measured before the decision.', b.verdict);
  const tests = `${b.tests} single-characteristic test${b.tests === 1 ? '' : 's'} and ${b.jointTests} joint test${b.jointTests === 1 ? '' : 's'}, p-values adjusted for their number (Holm 1979)`;
  const list = (why: string) => b.flagged.filter((f) => f.why.includes(why as never)).map((f) => `${columnName(r, f.covariate)} at δ = ${f.delta}`).join('; ');
  const large = list('large difference');
  const largeText = large ? ` Standardized difference beyond 0.25 (Rubin 2001): ${large}.` : '';
  const advice = b.advice === 'read the smaller delta' ? ' The smallest delta is clean: give it the most weight.' : b.advice === 'check the inputs and characteristics' ? ' The smallest delta is flagged too: check how the inputs and characteristics were recorded.' : '';
  if (b.verdict === 'balanced') return good(`Balanced: ${tests}; none below 0.05 after adjustment and no standardized difference beyond 0.25.`, b.verdict);
  if (b.verdict === 'imbalance') {
    const adj = list('adjusted p');
    const joint = b.jointRejectedAt.length ? `joint test at ${deltas(b.jointRejectedAt)}` : '';
    return caution(`Imbalance: ${tests}; below 0.05 after adjustment: ${[adj, joint].filter(Boolean).join('; ')}.${largeText}${advice}`, b.verdict);
  }
  const unadj = list('unadjusted p only');
  return caution(`Differences to read: ${tests}; none below 0.05 after adjustment, so no evidence of imbalance.${largeText}${unadj ? ` Below 0.05 before adjustment only: ${unadj}.` : ''}${advice}`, b.verdict);
}

export function manipulationVerdict(r: Results): Verdict {
  const m = r.findings.manipulation;
  if (m.tests === 0) return neutral('No threshold on a continuous input to test for bunching.', m.verdict);
  const ran = m.ran === m.tests ? `${m.tests} density test${m.tests === 1 ? '' : 's'}` : `${m.tests} density tests, ${m.ran} ran (${m.tests - m.ran} could not)`;
  if (m.verdict === 'not tested') return neutral(`${ran}: sorting at the limits was not checked.`, m.verdict);
  const at = (v: string) => m.limits.filter((l) => l.verdict === v).map((l) => `${l.description} (p = ${pValue(l.p)})`).join('; ');
  if (m.verdict === 'no jump') return good(`No jump: ${ran}; p is at least 0.10 at every limit tested.`, m.verdict);
  if (m.verdict === 'weak sign of sorting') return caution(`Weak sign of sorting: ${ran}; p between 0.05 and 0.10 at ${at('weak sign of sorting')}. Check whether values could be adjusted to qualify.`, m.verdict);
  return caution(`Jump: ${ran}; p below 0.05 at ${at('jump')}${at('weak sign of sorting') ? `; p between 0.05 and 0.10 at ${at('weak sign of sorting')}` : ''}. Check whether values could be adjusted to qualify.`, m.verdict);
}

export function sensitivityVerdict(r: Results, o: OutcomeResults): Verdict {
  const f = r.findings.sensitivity.find((s) => s.column === o.column);
  if (!f || !f.range) return neutral('Fewer than two deltas have an estimate.', 'shown descriptively');
  const outside = f.outside.length ? ` The estimate at ${deltas([...new Set(f.outside.map((x) => x.delta))])} lies outside another delta's interval.` : '';
  return neutral(`Across deltas the estimate runs from ${num(f.range[0])} to ${num(f.range[1])}${f.signChanges ? ', changing sign' : ', with one sign'}. Shown descriptively: the samples are nested, so no test of the difference is made.${outside}`, 'shown descriptively');
}

export function localLinearVerdict(r: Results, o: OutcomeResults): Verdict | null {
  const f = r.findings.localLinear.find((x) => x.column === o.column);
  if (!f || !o.localLinear) return null;
  return neutral(`One-variable local-linear cross-check: ${num(o.localLinear.estimate)} (95% interval ${interval(o.localLinear.ci)}), bandwidth ${num(f.bandwidth)}, ${count(f.units)} units (${percent(f.share, 0)} of those with the outcome).${f.nearGlobal ? ' That is most of the data: the check is close to a global fit.' : ''}`);
}

export function fidelityVerdict(r: Results): Verdict {
  const f = r.fidelity;
  const v = r.findings.fidelity;
  if (!f || v.verdict === 'not compared') return neutral('No recorded decisions were given, so the formula could not be compared with what the agency decided.', v.verdict);
  const text = `The formula reproduces ${percent(v.share)} of the ${count(f.compared)} recorded decisions (${count(f.disagree)} differ: ${count(f.offeredAgainstRule)} offered against the rule, ${count(f.refusedAgainstRule)} refused against it).`;
  return v.verdict === 'follows the formula' ? good(text, v.verdict) : caution(`${text} Check that the rule is encoded as the agency applies it.`, v.verdict);
}

export function compositionVerdict(r: Results): Verdict {
  const d = r.findings.design;
  const c = r.design.composition[headlineIndex(r)];
  if (d.kind === 'none' || !c) return caution('No unit has an offer that could go either way at the headline delta.', d.kind);
  if (d.kind === 'lottery') return neutral(`Lottery: all ${count(d.boundary)} units compared at δ = ${d.delta} are there because their offer was drawn, not because a limit is near; the estimate is not local to an edge.`, d.kind);
  const top = [...c.atoms].sort((a, b) => b.share - a.share)[0];
  const edge = `${top ? `; the most common crossing is “${top.description}” (${percent(top.share)})` : ''}${c.several ? `, and ${count(c.several)} are near two or more criteria` : ''}`;
  if (d.kind === 'edge') return neutral(`Edge: ${count(d.boundary)} units sit near the edge at δ = ${d.delta}${edge}.`, d.kind);
  return neutral(`Edge and lottery: of ${count(d.boundary)} units compared at δ = ${d.delta}, ${percent(d.lotteryShare)} are there by the draw alone, far from any limit, and ${percent(d.edgeShare)} near the edge${edge}.`, d.kind);
}

export function complierVerdict(r: Results): Verdict {
  const p = r.compliers[headlineIndex(r)] ?? r.compliers[0];
  if (!p || !p.complierShare) return neutral('No complier profile: it needs covariates, a 0/1 offer and a 0/1 take-up.');
  return neutral(`About ${percent(p.complierShare.coef, 0)} of the units compared take the benefit up because they are offered it (compliers); the table compares them with everyone.`);
}

/** The estimate-by-delta chart for one outcome (chart.js through main/report/charts). */
export function sensitivitySpec(r: Results, o: OutcomeResults): DeltaSensitivitySpec {
  return {
    kind: 'deltaSensitivity',
    title: `Estimated effect on ${o.label} by ball radius`,
    effect: { label: 'Estimated effect' },
    points: o.byDelta.flatMap((d) => (d.estimate !== null && d.ci ? [{ delta: d.delta, estimate: d.estimate, low: d.ci[0], high: d.ci[1] }] : [])),
    references: o.naiveOls.estimate !== null ? [{ label: 'Naive comparison', value: o.naiveOls.estimate }] : [],
  };
}
