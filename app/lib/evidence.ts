// The Evidence screen's one-line verdicts and its chart spec, from results.json (Results).
// Thresholds, each with its source:
//   - a 95% interval that excludes 0 is a "clear" effect (5% two-sided, common practice);
//   - first-stage F below 10 is a weak instrument (Staiger & Stock 1997, Econometrica 65(3));
//   - standardized differences beyond 0.1 are notable (Austin 2009, Statistics in Medicine 28(25));
//   - a density test (McCrary 2008, Journal of Econometrics 142(2)) or a joint balance test with
//     p < 0.05 is flagged (5%, common practice).
// A verdict always carries words and a mark (✓ / !), never colour alone.

import type { OutcomeResults, Results } from '../../main/contract/results.ts';
import type { DeltaSensitivitySpec } from '../../main/report/charts/spec.ts';
import { count, interval, num, percent, pValue } from './format.ts';

export type Tone = 'good' | 'caution' | 'neutral';
export interface Verdict { tone: Tone; mark: '✓' | '!' | '·'; text: string }

const good = (text: string): Verdict => ({ tone: 'good', mark: '✓', text });
const caution = (text: string): Verdict => ({ tone: 'caution', mark: '!', text });
const neutral = (text: string): Verdict => ({ tone: 'neutral', mark: '·', text });

/** The delta the memo leads with: the middle of the list (the study's own choice of a central radius). */
export function headlineIndex(r: Results): number {
  return Math.floor(r.settings.deltas.length / 2);
}

export function effectVerdict(r: Results, o: OutcomeResults): Verdict {
  const at = o.byDelta[headlineIndex(r)];
  if (!at || !at.estimable || at.estimate === null || !at.ci) return caution(`No estimate for ${o.label} at the middle radius: too few units near the edge (see the warnings).`);
  const what = r.estimand.kind === 'treatment' ? 'receiving the benefit' : 'being offered the benefit';
  const clear = at.ci[0] > 0 || at.ci[1] < 0;
  const text = `Near the edge (δ = ${at.delta}), ${what} changed ${o.label} by ${num(at.estimate)} (95% interval ${interval(at.ci)}; ${count(at.n)} units).`;
  return clear ? good(`${text} The interval excludes zero: a clear effect.`) : neutral(`${text} The interval includes zero: no clear effect.`);
}

export function comparisonVerdict(r: Results, o: OutcomeResults): Verdict {
  const at = o.byDelta[headlineIndex(r)];
  const naive = o.naiveOls.estimate;
  if (naive === null || !at || at.estimate === null) return neutral('The naive comparison could not be computed.');
  return neutral(`A naive comparison of all units gives ${num(naive)}, and the offer without the APS control gives ${num(o.ivNoControl.estimate)}; the design's ${num(at.estimate)} compares like with like near the edge.`);
}

export function instrumentVerdict(r: Results): Verdict {
  const stages = r.outcomes.flatMap((o) => o.byDelta.map((d) => ({ delta: d.delta, F: d.firstStage?.F ?? null })));
  const known = stages.filter((s): s is { delta: number; F: number } => s.F !== null);
  if (known.length === 0) return neutral(r.estimand.kind === 'offer' ? 'No take-up column: the estimate is the effect of the offer itself, so there is no first stage.' : 'The first stage could not be estimated.');
  const weakest = known.reduce((a, b) => (b.F < a.F ? b : a));
  // thresholds: F ≥ 104.7 makes the usual ±1.96 interval valid (Lee, McCrary, Moreira & Porter 2022);
  // F ≥ 10 is the rule of thumb of Staiger & Stock (1997), under which the tF interval is the one to read
  if (weakest.F >= 104.7) return good(`Strong: the offer clearly moves take-up (smallest first-stage F = ${num(weakest.F)} at δ = ${weakest.delta}; above 104.7 the usual interval is reliable).`);
  if (weakest.F >= 10) return good(`Adequate: the offer moves take-up (smallest first-stage F = ${num(weakest.F)} at δ = ${weakest.delta}, above the usual threshold of 10); below F = 104.7 read the tF interval, which widens the usual one to stay reliable.`);
  return caution(`Weak at δ = ${weakest.delta} (first-stage F = ${num(weakest.F)}, below 10): rely on the Anderson–Rubin and tF intervals there.`);
}

export function balanceVerdict(r: Results): Verdict {
  if (r.balance.length === 0) return neutral('No covariates were chosen, so balance was not checked. Add characteristics measured before the decision.');
  const flagged = r.balanceJoint.filter((j) => j.p !== null && j.p < 0.05);
  if (flagged.length === 0) {
    const ps = r.balanceJoint.map((j) => j.p).filter((p): p is number => p !== null);
    return good(`Balanced: near the edge, offered and not-offered units do not differ more than chance allows (joint tests, smallest p = ${pValue(Math.min(...ps))}).`);
  }
  return caution(`Imbalance at δ = ${flagged.map((j) => j.delta).join(', ')} (joint test p < 0.05): offered and not-offered units differ before the decision; read the estimate with care.`);
}

export function manipulationVerdict(r: Results): Verdict {
  if (r.density.length === 0) return neutral('No threshold on a continuous input to test for bunching.');
  const flagged = r.density.filter((d) => d.p !== null && d.p < 0.05);
  if (flagged.length === 0) return good(`No sign of units bunching at the thresholds (${r.density.length} density test${r.density.length === 1 ? '' : 's'}, all p ≥ 0.05).`);
  return caution(`Possible sorting around ${flagged.length} threshold${flagged.length === 1 ? '' : 's'} (density test p < 0.05): ${flagged.map((d) => d.description).join('; ')}. Check whether values could be adjusted to qualify.`);
}

export function fidelityVerdict(r: Results): Verdict {
  const f = r.fidelity;
  if (!f) return neutral('No recorded decisions were given, so the formula could not be compared with what the agency decided.');
  const share = f.compared ? f.agree / f.compared : 0;
  const text = `The formula reproduces ${percent(share)} of the ${count(f.compared)} recorded decisions (${count(f.disagree)} differ: ${count(f.offeredAgainstRule)} offered against the rule, ${count(f.refusedAgainstRule)} refused against it).`;
  return share >= 0.95 ? good(text) : caution(`${text} Check that the rule is encoded as the agency applies it.`);
}

export function compositionVerdict(r: Results): Verdict {
  const c = r.design.composition[headlineIndex(r)];
  if (!c || c.boundary === 0) return caution('No unit sits near the edge at the middle radius.');
  const top = [...c.atoms].sort((a, b) => b.share - a.share)[0];
  return neutral(`${count(c.boundary)} units sit near the edge at δ = ${c.delta}${top ? `; the most common crossing is “${top.description}” (${percent(top.share)})` : ''}${c.several ? `, and ${count(c.several)} are near two or more criteria` : ''}.`);
}

export function complierVerdict(r: Results): Verdict {
  const p = r.compliers[headlineIndex(r)] ?? r.compliers[0];
  if (!p || !p.complierShare) return neutral('No complier profile: it needs covariates, a 0/1 offer and a 0/1 take-up.');
  return neutral(`About ${percent(p.complierShare.coef, 0)} of units near the edge take the benefit up because they are offered it (compliers); the table compares them with everyone.`);
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
