// Section 6: the checks, each with a plain verdict and the figure behind it — instrument
// strength (robust first-stage F, tF interval, Anderson–Rubin set), balance (per covariate and
// the joint test), manipulation at each limit (density test) and delta sensitivity.

import type { Cell, Inline, Section, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { balanceFigure, deltaFigure, densityFigure, distanceFigure } from './memo-charts.ts';
import { MEMO_CONSTANTS } from './memo-constants.ts';
import { DELTA, F_STAT, PVALUE, STD_DIFF, columnLabel, criterionShort, effectFormat, outcomeName, lowerFirst } from './memo-format.ts';
import { constNum, num, numCell, numCellOr, text, textCell } from './memo-source.ts';
import { deltaList } from './memo-deltas.ts';
import { balanceVerdictRuns, manipulationVerdictRuns } from './memo-verdicts.ts';

const verdict = (label: string, rest: Inline[]): Section['blocks'][number] => ({ kind: 'paragraph', runs: [text(`Verdict: ${label}. `, 'bold'), ...rest] });

function instrumentSection(ctx: MemoContext): Section | null {
  const { r } = ctx;
  if (r.estimand.kind !== 'treatment') {
    return { id: 'check-instrument', heading: 'Instrument strength', blocks: [{ kind: 'paragraph', runs: [text('No column of who received the benefit was given, so the memo estimates the effect of the offer itself and there is no instrument to check.')] }] };
  }
  const many = r.outcomes.length > 1;
  const rows: TableRow[] = [];
  r.outcomes.forEach((o, i) => o.byDelta.forEach((b, j) => {
    const p = `outcomes[${i}].byDelta[${j}]`;
    const fmt = effectFormat(o, ctx.headline);
    const cells: Cell[] = many ? [textCell(outcomeName(o).name)] : [];
    cells.push(numCell(r, `${p}.delta`));
    if (!b.firstStage) {
      cells.push(textCell('not estimable'), { kind: 'empty' }, { kind: 'empty' }, { kind: 'empty' }, { kind: 'empty' }, { kind: 'empty' });
    } else {
      cells.push(numCell(r, `${p}.firstStage.coef`), numCell(r, `${p}.firstStage.F`));
      const tf = b.tfCi;
      cells.push(tf && tf[0] !== null ? numCell(r, `${p}.tfCi[0]`, fmt) : textCell('unbounded'));
      cells.push(tf && tf[1] !== null ? numCell(r, `${p}.tfCi[1]`, fmt) : textCell('unbounded'));
      const ar = b.arCi;
      if (b.arShape === 'interval' && ar && ar.length === 1 && ar[0]![0] !== null && ar[0]![1] !== null) {
        cells.push(numCell(r, `${p}.arCi[0][0]`, fmt), numCell(r, `${p}.arCi[0][1]`, fmt));
      } else {
        const words = { 'two-rays': 'two open-ended ranges', 'whole-line': 'every value', 'half-line': 'an open-ended range', interval: 'see results.json' } as const;
        cells.push(textCell(b.arShape ? words[b.arShape] : 'not available'), { kind: 'empty' });
      }
    }
    rows.push({ cells });
  }));
  const f = r.findings.instrument;
  let rest: Inline[];
  if (f.verdict === 'none') rest = [text('The first stage could not be estimated.')];
  else if (f.verdict === 'strong') {
    rest = [text('At every delta the offer changes who receives the benefit by a wide margin: the first-stage F is at least '), constNum('TF_FULL', MEMO_CONSTANTS.TF_FULL, F_STAT), text(', where the usual 95% interval is reliable (Lee and others, 2022).')];
  } else if (f.verdict === 'adequate') {
    rest = [text('The first-stage F is at least '), constNum('WEAK_F', MEMO_CONSTANTS.WEAK_F, { style: 'integer' }), text(' at every delta but below '), constNum('TF_FULL', MEMO_CONSTANTS.TF_FULL, F_STAT),
      text(' at delta '), ...deltaList(ctx, f.belowFullAt), text('; there the tF interval, which allows for this, is the one to read beside the usual one.')];
  } else {
    rest = [text('The first-stage F is below '), constNum('WEAK_F', MEMO_CONSTANTS.WEAK_F, { style: 'integer' }), text(' at delta '), ...deltaList(ctx, f.weakAt),
      text(': there read the tF interval and the Anderson–Rubin set, not the usual interval.')];
    const alsoBelow = f.belowFullAt.filter((d) => !f.weakAt.includes(d));
    if (alsoBelow.length) rest.push(text(' At delta '), ...deltaList(ctx, alsoBelow), text(' it is below '), constNum('TF_FULL', MEMO_CONSTANTS.TF_FULL, F_STAT), text(', so the tF interval is the one to read there too.'));
  }
  const label = f.verdict;
  const blocks: Section['blocks'] = [
    { kind: 'paragraph', runs: [text(`The method needs the offer to change who receives the benefit near the edge. The first stage measures by how much (the share of ${ctx.words.many} receiving it rises by this much with an offer); the F statistic says whether that is strong enough to rely on.`)] },
    verdict(label, rest),
    {
      kind: 'table',
      id: 'first-stage',
      caption: 'How strongly the offer changes who receives the benefit, at each delta',
      sheetName: 'Instrument strength',
      columns: [
        ...(many ? [{ header: 'Outcome', align: 'left' as const, width: 2 }] : []),
        { header: 'Delta', align: 'right', format: DELTA },
        { header: 'Offer’s effect on receiving', align: 'right', format: { style: 'decimal', decimals: 3 }, width: 1.3 },
        { header: 'First-stage F', align: 'right', format: F_STAT },
        { header: 'tF interval from', align: 'right' },
        { header: 'to', align: 'right' },
        { header: 'Anderson–Rubin from', align: 'right', width: 1.3 },
        { header: 'to', align: 'right' },
      ],
      rows,
      notes: [[text('The tF interval (Lee, McCrary, Moreira and Porter 2022) and the Anderson–Rubin set stay valid when the offer matters little; with a strong first stage they agree with the usual interval.')]],
    },
  ];
  const fig = distanceFigure(ctx, 'takeUp');
  if (fig) blocks.push(fig);
  return { id: 'check-instrument', heading: 'Instrument strength', blocks };
}

function balanceSection(ctx: MemoContext): Section | null {
  const { r } = ctx;
  if (!r.balance.length) {
    return { id: 'check-balance', heading: 'Balance', blocks: [{ kind: 'paragraph', runs: [text('The study names no characteristics fixed before the offer (covariates), so balance could not be checked.')] }] };
  }
  const blocks: Section['blocks'] = [
    { kind: 'paragraph', runs: [text(`Among the ${ctx.words.many} compared, once the offer probability is controlled for, offered and not-offered ${ctx.words.many} should not differ in characteristics fixed before the offer. Each characteristic is tested at each delta, and a joint test asks whether all the differences together are more than chance; with many tests, one small p-value is expected by chance, so the p-values are adjusted for their number.`)] },
    verdict(r.findings.balance.verdict, balanceVerdictRuns(r)),
    {
      kind: 'table',
      id: 'balance',
      caption: 'Differences between offered and not-offered units near the edge, controlling for the offer probability',
      sheetName: 'Balance',
      columns: [
        { header: 'Characteristic', align: 'left', width: 2.2 },
        { header: 'Delta', align: 'right', format: DELTA },
        { header: 'Difference', align: 'right', format: { style: 'decimal', decimals: 3, signed: true } },
        { header: 'Standardized', align: 'right', format: STD_DIFF },
        { header: 'p-value', align: 'right', format: PVALUE },
      ],
      rows: r.balance.map((b, k) => ({ b, k })).sort((x, y) => (x.b.covariate === y.b.covariate ? x.b.delta - y.b.delta : r.balance.findIndex((z) => z.covariate === x.b.covariate) - r.balance.findIndex((z) => z.covariate === y.b.covariate))).map(({ b, k }): TableRow => ({ cells: [
        textCell(columnLabel(r, b.covariate)), numCell(r, `balance[${k}].delta`),
        numCellOr(r, `balance[${k}].diff`, 'not estimable'), numCellOr(r, `balance[${k}].standardizedDiff`, ''), numCellOr(r, `balance[${k}].p`, ''),
      ] })),
    },
    {
      kind: 'table',
      id: 'balance-joint',
      caption: 'Joint test of all characteristics at each delta',
      sheetName: 'Balance joint',
      columns: [
        { header: 'Delta', align: 'right', format: DELTA },
        { header: 'Test statistic', align: 'right', format: { style: 'decimal', decimals: 2 } },
        { header: 'Degrees of freedom', align: 'right', format: { style: 'integer' } },
        { header: 'p-value', align: 'right', format: PVALUE },
      ],
      rows: r.balanceJoint.map((j, k): TableRow => ({ cells: [
        numCell(r, `balanceJoint[${k}].delta`), numCellOr(r, `balanceJoint[${k}].statistic`, 'not estimable'), numCell(r, `balanceJoint[${k}].df`), numCellOr(r, `balanceJoint[${k}].p`, ''),
      ] })),
    },
  ];
  const fig = balanceFigure(ctx);
  if (fig) blocks.push(fig);
  return { id: 'check-balance', heading: 'Balance', blocks };
}

function manipulationSection(ctx: MemoContext): Section {
  const { r } = ctx;
  if (!r.density.length) {
    return { id: 'check-density', heading: 'Sorting at the limits', blocks: [{ kind: 'paragraph', runs: [text('The rule has no limit on a continuous input, so there is no density to check.')] }] };
  }
  const blocks: Section['blocks'] = [
    { kind: 'paragraph', runs: [text(`If ${ctx.words.many} or staff adjusted reported values to meet a limit, there would be more ${ctx.words.many} just on the eligible side than just on the other. The density test (McCrary 2008) compares the two.`)] },
    verdict(r.findings.manipulation.verdict, manipulationVerdictRuns(r)),
    {
      kind: 'table',
      id: 'density',
      caption: 'Density test at each limit: the log difference compares the density just above the limit with just below it',
      sheetName: 'Density',
      columns: [
        { header: 'Criterion', align: 'left', width: 0.45 },
        { header: 'Log difference', align: 'right', format: { style: 'decimal', decimals: 3, signed: true } },
        { header: 'p-value', align: 'right', format: PVALUE },
        { header: 'Verdict', align: 'left' },
      ],
      rows: r.density.map((d, k): TableRow => ({ cells: [
        textCell(criterionShort(r, d.atom, ctx.words.one)),
        numCellOr(r, `density[${k}].logDifference`, 'not estimable'), numCellOr(r, `density[${k}].p`, ''),
        textCell(r.findings.manipulation.limits[k]?.verdict ?? 'did not run'),
      ] })),
    },
  ];
  r.density.forEach((_, k) => { const f = densityFigure(ctx, k); if (f) blocks.push(f); });
  return { id: 'check-density', heading: 'Sorting at the limits', blocks };
}

function sensitivitySection(ctx: MemoContext): Section {
  const { r } = ctx;
  const blocks: Section['blocks'] = [
    { kind: 'paragraph', runs: [text('The estimate should not depend much on how near the edge counts as near. The figures show the estimate at every delta. The comparison is descriptive: the smaller samples are part of the larger ones, so the estimates are correlated and no test of their difference is made (whether 95% intervals overlap would prove little; Schenker and Gentleman 2001).')] },
  ];
  const items: Inline[][] = [];
  r.findings.sensitivity.forEach((f, i) => {
    const o = r.outcomes[i]!;
    const name = lowerFirst(outcomeName(o).name);
    const known = o.byDelta.map((b, j) => ({ b, j })).filter(({ b }) => b.estimable && b.estimate !== null);
    if (!f.range || known.length < 2) { items.push([text(`For ${name}, fewer than two deltas have an estimate.`)]); return; }
    const fmt = effectFormat(o, ctx.headline);
    const lo = known.reduce((a, x) => (x.b.estimate! < a.b.estimate! ? x : a));
    const hi = known.reduce((a, x) => (x.b.estimate! > a.b.estimate! ? x : a));
    const it: Inline[] = [text(`For ${name} the estimates run from `), num(r, `outcomes[${i}].byDelta[${lo.j}].estimate`, { ...fmt, signed: true }), text(' (delta '), ...deltaList(ctx, [lo.b.delta]),
      text(') to '), num(r, `outcomes[${i}].byDelta[${hi.j}].estimate`, { ...fmt, signed: true }), text(' (delta '), ...deltaList(ctx, [hi.b.delta]), text(')')];
    it.push(text(f.signChanges ? '; their sign changes with delta.' : '; they have the same sign at every delta.'));
    if (f.outside.length) {
      it.push(text(' The estimate at delta '), ...deltaList(ctx, [...new Set(f.outside.map((x) => x.delta))]), text(' lies outside the 95% interval at another delta (see “Limits and caveats”).'));
    }
    items.push(it);
  });
  blocks.push(verdict('shown descriptively', []), { kind: 'list', items });
  r.outcomes.forEach((_, i) => { const f = deltaFigure(ctx, i); if (f) blocks.push(f); });
  return { id: 'check-delta', heading: 'Sensitivity to delta', blocks };
}

export function checksSection(ctx: MemoContext): Section {
  const sections = [instrumentSection(ctx), balanceSection(ctx), manipulationSection(ctx), sensitivitySection(ctx)].filter((s): s is Section => s !== null);
  return {
    id: 'checks',
    heading: 'Checks',
    pageBreakBefore: true,
    blocks: [{ kind: 'paragraph', runs: [text('Four checks say whether the comparison near the edge can be trusted. Each ends with a plain verdict.')] }],
    sections,
  };
}


