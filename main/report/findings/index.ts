// The statements the product makes about a run, stated once (issue 9 §2, "one run, one truth"):
// the headline delta and why it was chosen, the kind of design, whether each effect can be told
// apart from zero, and the verdict of every check. The pipeline writes them into results.json
// (`headline`, `findings`); the Evidence screen, the memo and the command line only word them.

import type { DesignFinding, Findings, Headline, ResultsCore } from '../../contract/results.ts';
import { headlineDelta } from '../../estimate/headline.ts';
import { balanceFinding, fidelityFinding, instrumentFinding, localLinearFindings, manipulationFinding, sensitivityFindings } from './checks.ts';
import { outcomeFinding } from './outcome.ts';

export { FINDING_THRESHOLDS } from './thresholds.ts';
export { densityVerdict } from './checks.ts';

export function headlineOf(r: Pick<ResultsCore, 'settings'>): Headline {
  const h = headlineDelta(r.settings.deltas);
  return { delta: h.delta, why: h.why, index: h.index };
}

/** Edge, lottery or both, from the boundary composition at the headline delta: a boundary unit whose
 * ball crosses no criterion has 0 < APS < 1 from the draw alone (main/estimate/composition.ts). */
export function designFinding(r: ResultsCore, k: number): DesignFinding {
  const delta = r.settings.deltas[k]!;
  const c = r.design.composition.find((x) => x.delta === delta);
  if (!c || c.boundary === 0) return { kind: 'none', edgeShare: 0, lotteryShare: 0, delta, boundary: 0 };
  const lotteryShare = c.lotteryOnly / c.boundary;
  const kind = c.lotteryOnly === 0 ? 'edge' : c.lotteryOnly === c.boundary ? 'lottery' : 'edge and lottery';
  return { kind, edgeShare: 1 - lotteryShare, lotteryShare, delta, boundary: c.boundary };
}

export function findingsOf(r: ResultsCore): { headline: Headline; findings: Findings } {
  const headline = headlineOf(r);
  const k = headline.index;
  return {
    headline,
    findings: {
      design: designFinding(r, k),
      outcomes: r.outcomes.map((o) => outcomeFinding(r, o, k)),
      instrument: instrumentFinding(r),
      balance: balanceFinding(r),
      manipulation: manipulationFinding(r),
      sensitivity: sensitivityFindings(r),
      fidelity: fidelityFinding(r),
      localLinear: localLinearFindings(r),
    },
  };
}

/** Results with their findings (stated afresh; for results read from an older run that lacks them). */
export function withFindings<R extends ResultsCore>(r: R): R & { headline: Headline; findings: Findings } {
  return { ...r, ...findingsOf(r) };
}

/** Results read back from a run recorded before findings existed get them stated now; newer ones are kept as written. */
export function ensureFindings(r: ResultsCore & { headline?: Headline; findings?: Findings }): ResultsCore & { headline: Headline; findings: Findings } {
  return r.headline && r.findings ? { ...r, headline: r.headline, findings: r.findings } : withFindings(r);
}
