// Section 1, the key finding, in plain words, worded from the findings (main/report/findings):
// the effect of receiving the benefit on each outcome in its own units, its 95% interval, the
// level it is read against (the average among those not offered), whether the data can tell it
// apart from no effect (and, if not, which interval includes zero), whether another neighbourhood
// size gives an interval that includes zero, and for whom it holds — near a limit of the rule,
// by the draw, or both. No technical terms here (the glossary explains the others).

import type { OutcomeFinding } from '../../contract/results.ts';
import type { Inline, KeyFinding, Paragraph, Section } from './document.ts';
import type { Caveat } from '../caveats/types.ts';
import type { MemoContext } from './memo-context.ts';
import { COUNT, PERCENT, effectFormat, effectOf, outcomeName, upperFirst, lowerFirst } from './memo-format.ts';
import { absNum, num, stateRun, text } from './memo-source.ts';

/** Does the interval cover zero? null when there is no interval. */
export function coversZero(ci: [number, number] | null): boolean | null {
  return ci ? ci[0] <= 0 && ci[1] >= 0 : null;
}

/** Who the estimate is about, by the kind of design: "close to the edge of the rule", "whose offer was left to the draw", or both. */
export function whoPhrase(ctx: MemoContext): string {
  const kind = ctx.r.findings.design.kind;
  if (kind === 'lottery') return 'whose offer was left to the draw';
  if (kind === 'edge and lottery') return 'close to the edge of the rule or whose offer was left to the draw';
  return 'close to the edge of the rule';
}

function verdictRuns(f: OutcomeFinding): Inline[] {
  if (f.effect === 'distinguishable') return [text('The data can tell this effect apart from no effect.', 'bold')];
  if (f.usual === 'covers') return [text('The interval includes zero, so the result is consistent with no effect: the data cannot tell this effect apart from none.', 'bold')];
  const which: string[] = [];
  if (f.coveringZero.includes('Anderson–Rubin') || f.coveringZero.includes('tF')) which.push('the wider interval that stays reliable when the offer changes little who receives the benefit');
  if (f.coveringZero.includes('bootstrap')) which.push(`the interval that allows for the few groups the data are clustered in`);
  const named = which.length ? which.join(', and ') : 'a wider interval that stays reliable when the offer changes little who receives the benefit';
  return [text(`The usual interval does not include zero, but ${named} ${which.length > 1 ? 'do' : 'does'}: `), text('the data cannot tell this effect apart from no effect.', 'bold')];
}

function elsewhereRuns(ctx: MemoContext, f: OutcomeFinding): Inline[] {
  if (!f.coversZeroElsewhere.length) return [];
  const narrower = f.coversZeroElsewhere.some((d) => d < f.delta);
  const wider = f.coversZeroElsewhere.some((d) => d > f.delta);
  const size = narrower && wider ? 'a narrower or a wider' : narrower ? 'a narrower' : 'a wider';
  const around = ctx.r.findings.design.kind === 'lottery' ? 'neighbourhood' : 'neighbourhood around the limits';
  return [text(` With ${size} ${around}, the interval includes zero (see “Checks”).`)];
}

function outcomeFinding(ctx: MemoContext, i: number): Inline[] {
  const { r, headline: k } = ctx;
  const o = r.outcomes[i]!;
  const f = r.findings.outcomes[i]!;
  const b = o.byDelta[k];
  const name = outcomeName(o);
  const { many } = ctx.words;
  if (f.effect === 'not estimable' || !b || b.estimate === null || !b.ci) {
    return [text(`The data ${ctx.r.findings.design.kind === 'lottery' ? 'from the draw' : 'near the edge of the rule'} are not enough to estimate the effect on ${lowerFirst(name.name)}.`)];
  }
  const p = `outcomes[${i}].byDelta[${k}]`;
  const fmt = effectFormat(o, k, { unit: true });
  const runs: Inline[] = [];
  if (f.usual === 'covers') {
    runs.push(text(`${upperFirst(effectOf(r))} changed ${lowerFirst(name.name)} by `), num(r, `${p}.estimate`, { ...fmt, signed: true }));
  } else {
    runs.push(text(`${upperFirst(effectOf(r))} ${b.estimate < 0 ? 'lowered' : 'raised'} ${lowerFirst(name.name)} by `), absNum(r, `${p}.estimate`, fmt));
  }
  // The interval is worded the same way as the effect (issue 10 §6: no "lowered by 53 (95%
  // interval −97 to −10)"): signed when the effect is stated as a signed change, as sizes of the
  // same fall or rise otherwise.
  if (f.usual === 'covers') {
    runs.push(text(' on average (95% interval '), num(r, `${p}.ci[0]`, { ...fmt, signed: true }), text(' to '), num(r, `${p}.ci[1]`, { ...fmt, signed: true }), text('). '));
  } else if (b.estimate < 0) {
    runs.push(text(' on average (95% interval: lowered by '), absNum(r, `${p}.ci[1]`, fmt), text(' to '), absNum(r, `${p}.ci[0]`, fmt), text('). '));
  } else {
    runs.push(text(' on average (95% interval: raised by '), num(r, `${p}.ci[0]`, fmt), text(' to '), num(r, `${p}.ci[1]`, fmt), text('). '));
  }
  if (r.estimand.treatmentPer !== 1) {
    runs.push(text('This is per '), num(r, 'estimand.treatmentPer', { style: 'decimal', decimals: 0 }), text(' of the benefit received. '));
  }
  if (f.baseline && ctx.ledger.get(`${p}.notOffered`).shown) {
    runs.push(text(`For comparison, the ${many} compared who were not offered the benefit averaged `), num(r, `${p}.baseline.mean`, fmt), text('. '));
  }
  runs.push(...verdictRuns(f), ...elsewhereRuns(ctx, f));
  if (f.clusters?.few) {
    runs.push(text(` The ${many} come in only `), num(r, `findings.outcomes[${i}].clusters.count`, COUNT),
      text(f.bootstrap !== null
        ? ' groups whose outcomes may move together, so the usual interval can be too narrow; the verdict above also reads the interval built for few groups.'
        : ' groups whose outcomes may move together, so the usual interval can be too narrow and no interval built for few groups was computed: read it with care.'));
  }
  runs.push(text(` It holds for the `), stateRun(ctx.ledger.get(`${p}.n`), `${p}.n`, COUNT), text(` ${many} ${whoPhrase(ctx)}`));
  runs.push(r.estimand.kind === 'treatment'
    ? text(` who take the benefit when it is offered and not otherwise, not for all ${many} in the data.`)
    : text(`, not for all ${many} in the data.`));
  return runs;
}

/** How the comparison is made, by the kind of design (from the boundary composition at the headline delta). */
function designParagraph(ctx: MemoContext): Inline[] {
  const { r, ledger, headline: k } = ctx;
  const { many } = ctx.words;
  const d = r.findings.design;
  if (d.kind === 'lottery') {
    return [text(`The estimate compares ${many} who were offered the benefit by the draw with ${many} who were not, among those whose offer the rule leaves to the draw: only chance decided which of them were offered.`)];
  }
  if (d.kind === 'edge and lottery') {
    const lot = `design.composition[${k}].lotteryOnly`;
    const all = `design.byDelta[${k}].boundary`;
    return [
      text(`The estimate rests on two comparisons. Of the ${many} it compares, `),
      stateRun(ledger.share(d.lotteryShare, lot, all), 'findings.design.lotteryShare', PERCENT),
      text(` had their offer left to the draw, far from any limit of the rule: chance alone decided which of them were offered. The other `),
      stateRun(ledger.share(d.edgeShare, lot, all), 'findings.design.edgeShare', PERCENT),
      text(` sit just inside or just outside a limit of the rule and are compared with ${many} alike except for which side of the limit they fall on.`),
    ];
  }
  return [text(`The estimate compares ${many} just inside the limits of the rule with ${many} just outside them, who are alike except for which side of the limit they fall on.`)];
}

export function keyFindingSection(ctx: MemoContext, caveats: Caveat[]): Section {
  const { r } = ctx;
  const first = r.outcomes[0];
  let title = `What ${effectOf(r)} did`;
  if (r.outcomes.length === 1 && first) {
    const f = r.findings.outcomes[0]!;
    const b = first.byDelta[ctx.headline];
    const name = lowerFirst(outcomeName(first).name);
    if (f.effect === 'not estimable' || !b || b.estimate === null) title = `The effect on ${name} could not be estimated`;
    else if (f.effect === 'not distinguishable') title = `${upperFirst(effectOf(r))}: consistent with no effect on ${name}`;
    else title = `${upperFirst(effectOf(r))} ${b.estimate < 0 ? 'lowered' : 'raised'} ${name}`;
  }
  const body: Array<Paragraph | KeyFinding['body'][number]> = [];
  if (r.outcomes.length === 1) body.push({ kind: 'paragraph', runs: outcomeFinding(ctx, 0) });
  else body.push({ kind: 'list', items: r.outcomes.map((_, i) => outcomeFinding(ctx, i)) });
  if (r.findings.design.kind !== 'none') body.push({ kind: 'paragraph', runs: designParagraph(ctx) });
  const concerns = caveats.filter((c) => c.tone === 'caution');
  if (concerns.length) {
    body.push({
      kind: 'paragraph',
      runs: [text('Read before using this result: ', 'bold'), text(concerns.map((c) => c.title.toLowerCase()).join('; ') + ' (see “Limits and caveats”).')],
    });
  }
  return {
    id: 'key-finding',
    heading: 'Key finding',
    blocks: [{ kind: 'keyFinding', title, body }],
  };
}
