// Sections 7 and 8: limits and caveats written from the results (main/report/caveats), with the
// small-change projections and their validity; and the fixed cautions on what the memo is for.

import type { Caveat } from '../caveats/types.ts';
import type { Cell, NumberFormat, Section, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { COUNT, effectFormat, limitName, outcomeName, lowerFirst } from './memo-format.ts';
import { num, numCell, stateCell, text, textCell } from './memo-source.ts';

function projectionTable(ctx: MemoContext, i: number): Section['blocks'][number] | null {
  const { r, ledger } = ctx;
  const tc = r.thresholdChanges;
  const o = r.outcomes[i];
  if (!tc || !tc.scenarios.length || !o) return null;
  const name = outcomeName(o);
  const fmt = effectFormat(o, ctx.headline);
  const rows: TableRow[] = tc.scenarios.map((s, j): TableRow => {
    const base = `thresholdChanges.scenarios[${j}]`;
    const sw = ledger.get(`${base}.switchers`);
    const so = s.outcomes.findIndex((x) => x.column === o.column);
    const proj = s.outcomes[so];
    const hide = (path: string, f?: NumberFormat): Cell =>
      sw.shown ? numCell(r, path, f) : { kind: 'suppressed', reason: 'derived' };
    const cells: Cell[] = [
      textCell(limitName(r, s, ctx.words.one)),
      numCell(r, `${base}.relativeChange`),
      stateCell(sw, `${base}.switchers`),
      stateCell(ledger.get(`${base}.switchersOutsideBand`), `${base}.switchersOutsideBand`),
      proj?.takeUpChange ? hide(`${base}.outcomes[${so}].takeUpChange.estimate`) : textCell('—'),
      proj?.outcomeTotalChange ? hide(`${base}.outcomes[${so}].outcomeTotalChange.estimate`, fmt) : textCell('not estimable'),
      proj?.outcomeTotalChange ? hide(`${base}.outcomes[${so}].outcomeTotalChange.ci[0]`, fmt) : { kind: 'empty' },
      proj?.outcomeTotalChange ? hide(`${base}.outcomes[${so}].outcomeTotalChange.ci[1]`, fmt) : { kind: 'empty' },
      textCell(s.valid ? 'yes' : 'no'),
    ];
    return { cells };
  });
  return {
    kind: 'table',
    id: `projections-${i}`,
    caption: `Projected effects of small changes of a limit on ${lowerFirst(name.name)} (totals over the ${ctx.words.many} in the data)`,
    sheetName: r.outcomes.length > 1 ? `Projections ${i + 1}` : 'Projections',
    columns: [
      { header: 'Limit', align: 'left', width: 0.6 },
      { header: 'Change', align: 'right', format: { style: 'percent', decimals: 0, signed: true } },
      { header: 'Switch', align: 'right', format: COUNT },
      { header: 'Outside', align: 'right', format: COUNT },
      { header: 'Receiving', align: 'right', format: { style: 'decimal', decimals: 1, signed: true } },
      { header: `Total${name.unit ? ` (${name.unit})` : ''}`, align: 'right', format: { ...fmt, signed: true } },
      { header: 'From', align: 'right', format: fmt },
      { header: 'To', align: 'right', format: fmt },
      { header: 'Supported', align: 'left' },
    ],
    rows,
    notes: [[text(`Switch: ${ctx.words.many} whose eligibility the change would reverse. Outside: those of them not near the edge, where the estimate says nothing; a projection is supported only when there are none. Receiving: the projected change in the number receiving the benefit. Total: the projected change in the outcome summed over all ${ctx.words.many}, with its 95% interval (From, To).`)]],
  };
}

export function limitsSection(ctx: MemoContext, caveats: Caveat[]): Section {
  const blocks: Section['blocks'] = [{ kind: 'paragraph', runs: [text('These limits are written from the results of this study; each appears only when it applies.')] }];
  for (const c of caveats) blocks.push({ kind: 'note', tone: c.tone, title: c.title, body: c.body });
  ctx.r.outcomes.forEach((_, i) => { const t = projectionTable(ctx, i); if (t) blocks.push(t); });
  return { id: 'limits', heading: 'Limits and caveats', pageBreakBefore: true, blocks };
}

export function cautionsSection(ctx: MemoContext): Section {
  const { many } = ctx.words;
  return {
    id: 'cautions',
    heading: 'Cautions',
    blocks: [{
      kind: 'list',
      items: [
        [text('This memo evaluates a rule. It determines no one’s eligibility and must not be used to decide about any individual ' + ctx.words.one + '.')],
        [text('Decisions about individual ' + many + ' stay with the program’s legal authority and its own procedures.')],
        [text('The statistical conclusions should be reviewed by a qualified evaluator before they inform policy.')],
        ctx.r.settings.smallCellMax > 0
          ? [text('Small counts are hidden to protect the people counted: no count from one to '), num(ctx.r, 'settings.smallCellMax', COUNT), text(' is shown, nor any figure from which such a count could be worked out.')]
          : [text('Small-cell suppression was turned off for this memo (the study sets the threshold to zero): every count is shown. Do not share it beyond those entitled to see the data.')],
      ],
    }],
  };
}
