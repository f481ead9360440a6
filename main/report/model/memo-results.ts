// Section 5: results per outcome and delta, beside the naive comparison (all recipients against
// all non-recipients) and the comparison that uses the offer without controlling for the APS,
// with one sentence on what the difference means (selection).

import type { Cell, Inline, Section, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { distanceFigure } from './memo-charts.ts';
import { COUNT, DELTA, PVALUE, clusterWords, effectFormat, effectOf, outcomeName, upperFirst, lowerFirst } from './memo-format.ts';
import { num, numCell, stateCell, stateRun, text, textCell } from './memo-source.ts';

function outcomeSection(ctx: MemoContext, i: number): Section {
  const { r, ledger, headline: k } = ctx;
  const { many } = ctx.words;
  const o = r.outcomes[i]!;
  const name = outcomeName(o);
  const fmt = effectFormat(o, k);
  const signed = { ...fmt, signed: true };
  const rows: TableRow[] = o.byDelta.map((b, j): TableRow => {
    const p = `outcomes[${i}].byDelta[${j}]`;
    const cells: Cell[] = [
      numCell(r, `${p}.delta`),
      stateCell(ledger.get(`${p}.n`), `${p}.n`),
      stateCell(ledger.get(`${p}.offered`), `${p}.offered`),
      stateCell(ledger.get(`${p}.notOffered`), `${p}.notOffered`),
    ];
    if (b.estimable && b.estimate !== null && b.ci && b.p !== null) {
      cells.push(numCell(r, `${p}.estimate`), numCell(r, `${p}.ci[0]`), numCell(r, `${p}.ci[1]`), numCell(r, `${p}.p`));
    } else {
      cells.push(textCell('not estimable'), { kind: 'empty' }, { kind: 'empty' }, { kind: 'empty' });
    }
    return j === k ? { cells, emphasis: 'total' } : { cells };
  });
  const blocks: Section['blocks'] = [{
    kind: 'table',
    id: `estimates-${i}`,
    caption: `Effect of ${effectOf(r)} on ${lowerFirst(name.name)}${name.unit ? ` (${name.unit})` : ''}, at each delta (headline delta in bold)`,
    sheetName: r.outcomes.length > 1 ? `Effect ${i + 1}` : 'Effect',
    columns: [
      { header: 'Delta', align: 'right', format: DELTA },
      { header: `${upperFirst(many)} near the edge`, align: 'right', format: COUNT, width: 1.3 },
      { header: 'Offered', align: 'right', format: COUNT },
      { header: 'Not offered', align: 'right', format: COUNT },
      { header: 'Effect', align: 'right', format: signed },
      { header: '95% interval from', align: 'right', format: fmt },
      { header: 'to', align: 'right', format: fmt },
      { header: 'p-value', align: 'right', format: PVALUE },
    ],
    rows,
    notes: [[text(`Two-stage least squares near the edge, controlling for the offer probability; ${r.settings.variance === 'CR1' ? `cluster-robust standard errors (CR1), allowing for correlation ${clusterWords(r)}` : 'standard errors robust to unequal variances (HC1)'}. See the appendix.`)]],
  }];

  const cmp: Inline[] = [];
  const naive = o.naiveOls.estimate;
  const plain = o.ivNoControl.estimate;
  const head = o.byDelta[k];
  if (naive !== null) {
    cmp.push(text(`Comparing all ${many} who received the benefit with all who did not (`),
      stateRun(ledger.get(`outcomes[${i}].naiveOls.n`), `outcomes[${i}].naiveOls.n`),
      text(` ${many}) gives a difference of `), num(r, `outcomes[${i}].naiveOls.estimate`, { ...signed, ...(name.unit ? { unit: name.unit } : {}) }), text('. '));
  }
  if (plain !== null) {
    cmp.push(text('Using the offer over all of them without comparing like with like near the edge gives '),
      num(r, `outcomes[${i}].ivNoControl.estimate`, { ...signed, ...(name.unit ? { unit: name.unit } : {}) }), text('. '));
  }
  if (cmp.length && head && head.estimate !== null) {
    cmp.push(text(`The headline estimate${r.findings.design.kind === 'edge' ? ' near the edge' : ''} is `), num(r, `outcomes[${i}].byDelta[${k}].estimate`, { ...signed, ...(name.unit ? { unit: name.unit } : {}) }),
      text(`. The wider comparisons mix the effect of the benefit with differences between the ${many} who get it and those who do not (selection: who is eligible and who takes it up is not random), which is why they differ from the estimate near the edge.`));
  }
  if (cmp.length) blocks.push({ kind: 'paragraph', runs: cmp });
  const ll = o.localLinear;
  if (ll) {
    blocks.push({ kind: 'paragraph', runs: [
      text('Cross-check with one running variable (local-linear regression, Imbens and Kalyanaraman bandwidth): '),
      num(r, `outcomes[${i}].localLinear.estimate`, { ...signed, ...(name.unit ? { unit: name.unit } : {}) }),
      text(' (95% interval '), num(r, `outcomes[${i}].localLinear.ci[0]`, fmt), text(' to '), num(r, `outcomes[${i}].localLinear.ci[1]`, fmt), text(').'),
      ...localLinearReach(ctx, i),
    ] });
  }
  const fig = distanceFigure(ctx, i);
  if (fig) blocks.push(fig);
  return { id: `results-${i}`, heading: upperFirst(name.name), blocks };
}

/** The cross-check's bandwidth and how many units it used; close to a global fit when it takes in most of them. */
function localLinearReach(ctx: MemoContext, i: number): Inline[] {
  const { r } = ctx;
  const j = r.findings.localLinear.findIndex((f) => f.column === r.outcomes[i]!.column);
  const f = r.findings.localLinear[j];
  if (!f) return [];
  const base = `findings.localLinear[${j}]`;
  // The count is in no printed relation; hidden like any small count (suppress.ts) when it is one of 1 … smallCellMax.
  const shown = !(f.units >= 1 && f.units <= ctx.ledger.threshold);
  const runs: Inline[] = [text(' Its bandwidth is '), num(r, `outcomes[${i}].localLinear.bandwidth`, { style: 'decimal', decimals: 3 }), text(' on the running variable’s own scale; it used ')];
  if (shown) runs.push(num(r, `${base}.units`, COUNT), text(` ${ctx.words.many} (`), num(r, `${base}.share`, { style: 'percent', decimals: 0 }), text(` of those with this outcome).`));
  else runs.push(text(`few ${ctx.words.many}.`));
  if (f.nearGlobal) runs.push(text(' That is most of the data, so the check is close to a global fit, not a comparison near the limit.'));
  return runs;
}

export function resultsSection(ctx: MemoContext): Section {
  const { r } = ctx;
  const blocks: Section['blocks'] = [{
    kind: 'paragraph',
    runs: [text(`Each outcome is estimated at every delta. A smaller delta keeps only ${ctx.words.many} closer to the edge: the comparison is more like for like, but rests on fewer ${ctx.words.many}, so its interval is wider.`)],
  }];
  if (r.multipleOutcomes.length) {
    blocks.push({
      kind: 'table',
      id: 'multiple-outcomes',
      caption: 'p-values adjusted for testing several outcomes (Holm 1979), at each delta',
      sheetName: 'Several outcomes',
      columns: [
        { header: 'Outcome', align: 'left', width: 3 }, { header: 'Delta', align: 'right', format: DELTA },
        { header: 'p-value', align: 'right', format: PVALUE }, { header: 'Adjusted p-value', align: 'right', format: PVALUE },
      ],
      rows: r.multipleOutcomes.map((h, j): TableRow => {
        const o = r.outcomes.find((x) => x.column === h.column);
        return { cells: [
          textCell(o ? outcomeName(o).name : h.column),
          numCell(r, `multipleOutcomes[${j}].delta`),
          h.p !== null ? numCell(r, `multipleOutcomes[${j}].p`) : textCell('not estimable'),
          h.adjustedP !== null ? numCell(r, `multipleOutcomes[${j}].adjustedP`) : textCell('not estimable'),
        ] };
      }),
    });
  }
  return { id: 'results', heading: 'Results', blocks, sections: r.outcomes.map((_, i) => outcomeSection(ctx, i)) };
}
