// Section 1, the key finding, in plain words: the effect of receiving the benefit on each
// outcome in its own units, its 95% interval, for whom it holds, and whether the data can tell
// it apart from no effect. No technical terms here (the glossary explains the others).

import type { Inline, KeyFinding, Paragraph, Section } from './document.ts';
import type { Caveat } from '../caveats/types.ts';
import type { MemoContext } from './memo-context.ts';
import { COUNT, effectFormat, effectOf, outcomeName, upperFirst, lowerFirst } from './memo-format.ts';
import { absNum, num, stateRun, text } from './memo-source.ts';

/** Does the interval cover zero? null when there is no interval. */
export function coversZero(ci: [number, number] | null): boolean | null {
  return ci ? ci[0] <= 0 && ci[1] >= 0 : null;
}

function outcomeFinding(ctx: MemoContext, i: number): Inline[] {
  const { r, headline: k } = ctx;
  const o = r.outcomes[i]!;
  const b = o.byDelta[k];
  const name = outcomeName(o);
  const { many } = ctx.words;
  if (!b || !b.estimable || b.estimate === null || !b.ci) {
    return [text(`The data near the edge of the rule are not enough to estimate the effect on ${lowerFirst(name.name)}.`)];
  }
  const p = `outcomes[${i}].byDelta[${k}]`;
  const fmt = effectFormat(o, k, { unit: true });
  const covers = coversZero(b.ci)!;
  const runs: Inline[] = [];
  if (covers) {
    runs.push(text(`${upperFirst(effectOf(r))} changed ${lowerFirst(name.name)} by `), num(r, `${p}.estimate`, { ...fmt, signed: true }));
  } else {
    runs.push(text(`${upperFirst(effectOf(r))} ${b.estimate < 0 ? 'lowered' : 'raised'} ${lowerFirst(name.name)} by `), absNum(r, `${p}.estimate`, fmt));
  }
  runs.push(text(' on average (95% interval '), num(r, `${p}.ci[0]`, fmt), text(' to '), num(r, `${p}.ci[1]`, fmt), text('). '));
  if (r.estimand.treatmentPer !== 1) {
    runs.push(text('This is per '), num(r, 'estimand.treatmentPer', { style: 'decimal', decimals: 0 }), text(' of the benefit received. '));
  }
  runs.push(covers
    ? text('The interval includes zero, so the result is consistent with no effect: the data cannot tell this effect apart from none.', 'bold')
    : text('The interval does not include zero: the data can tell this effect apart from no effect.', 'bold'));
  runs.push(text(` It holds for the `), stateRun(ctx.ledger.get(`${p}.n`), `${p}.n`, COUNT), text(` ${many} close to the edge of the rule`));
  runs.push(r.estimand.kind === 'treatment'
    ? text(` who take the benefit when it is offered and not otherwise, not for all ${many} in the data.`)
    : text(`, not for all ${many} in the data.`));
  return runs;
}

export function keyFindingSection(ctx: MemoContext, caveats: Caveat[]): Section {
  const { r } = ctx;
  const { many } = ctx.words;
  const first = r.outcomes[0];
  let title = `What ${effectOf(r)} did`;
  if (r.outcomes.length === 1 && first) {
    const b = first.byDelta[ctx.headline];
    const name = lowerFirst(outcomeName(first).name);
    const covers = b ? coversZero(b.ci) : null;
    if (covers === true) title = `${upperFirst(effectOf(r))}: consistent with no effect on ${name}`;
    else if (covers === false && b && b.estimate !== null) title = `${upperFirst(effectOf(r))} ${b.estimate < 0 ? 'lowered' : 'raised'} ${name}`;
    else title = `The effect on ${name} could not be estimated`;
  }
  const body: Array<Paragraph | KeyFinding['body'][number]> = [];
  if (r.outcomes.length === 1) body.push({ kind: 'paragraph', runs: outcomeFinding(ctx, 0) });
  else body.push({ kind: 'list', items: r.outcomes.map((_, i) => outcomeFinding(ctx, i)) });
  body.push({
    kind: 'paragraph',
    runs: [text(`The estimate compares ${many} just inside the limits of the rule with ${many} just outside them, who are alike except for which side of the limit they fall on.`)],
  });
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
