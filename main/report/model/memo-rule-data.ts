// Sections 2 and 3: the rule in plain language (the formula engine's own wording, from
// results.json) with the offer probabilities, and the data: file, hash, rows read, used and
// excluded by reason, joins, and how well the formula reproduces the recorded decisions.

import type { Cell, Inline, Section, Table, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { COUNT, PERCENT, criterionShort, outcomeName, upperFirst, lowerFirst, withColumnLabels } from './memo-format.ts';
import { shareableText } from './memo-scrub.ts';
import { numberAt, stateCell, stateRun, text, textCell } from './memo-source.ts';

export function ruleSection(ctx: MemoContext): Section {
  const { r } = ctx;
  const p = r.program;
  const blocks: Section['blocks'] = [
    { kind: 'paragraph', runs: [text(`${p.name}. `, 'bold'), text(p.wording)] },
    { kind: 'paragraph', runs: [text(`${r.findings.design.kind === 'lottery'
      ? `The analysis compares ${ctx.words.many} whose offer was left to the draw, not ${ctx.words.many} near a limit.`
      : r.findings.design.kind === 'edge and lottery'
        ? `The analysis looks at ${ctx.words.many} near the point where one of the criteria changes the verdict, and at ${ctx.words.many} whose offer was left to the draw.`
        : `The analysis looks at ${ctx.words.many} near the point where one of the criteria changes the verdict.`} ${shortNamesSentence(ctx)}`)] },
  ];
  const offer: Inline[] = [text(p.offerWording + ' ')];
  offer.push(text(p.offerKind === 'deterministic'
    ? 'So the offer follows from the formula alone: the chance of an offer is either certain or nil, and only near the edge of the rule can a small difference in the inputs change it.'
    : 'Part of the offer is decided by lottery, so among some eligible ' + ctx.words.many + ' the offer is a matter of chance.'));
  return {
    id: 'rule',
    heading: 'The rule',
    blocks,
    sections: [{ id: 'rule-offers', heading: 'Offer probabilities', blocks: [{ kind: 'paragraph', runs: offer }, { kind: 'paragraph', runs: [text(r.instrument.note)] }] }],
  };
}

/** The criteria are stated in full once, in the rule above; later sections use these short names. */
function shortNamesSentence(ctx: MemoContext): string {
  const names = ctx.r.program.criteria.map((c) => `“${criterionShort(ctx.r, c.atom, ctx.words.one)}”`);
  if (names.length === 0) return '';
  if (names.length === 1) return `Later sections call its one criterion ${names[0]}.`;
  return `Later sections call its criteria, in the order stated, ${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}.`;
}

function rowsTable(ctx: MemoContext): Table {
  const { r, ledger } = ctx;
  const s = r.study;
  const rows: TableRow[] = [
    { cells: [textCell('Rows read'), stateCell(ledger.get('study.rowsRead'), 'study.rowsRead')] },
    ...s.rowsExcluded.map((e, i): TableRow => ({ cells: [textCell(`Excluded: ${withColumnLabels(r, e.reason)}`), stateCell(ledger.get(`study.rowsExcluded[${i}].count`), `study.rowsExcluded[${i}].count`)] })),
    { emphasis: 'total', cells: [textCell('Rows used'), stateCell(ledger.get('study.rowsUsed'), 'study.rowsUsed')] },
  ];
  return {
    kind: 'table',
    id: 'rows',
    caption: 'Rows read, excluded (by reason) and used',
    sheetName: 'Rows',
    columns: [{ header: 'Rows', align: 'left', width: 4 }, { header: 'Count', align: 'right', format: COUNT }],
    rows,
    ...(s.rowsExcluded.length ? {} : { notes: [[text('No row was excluded.')]] }),
  };
}

function fidelityTable(ctx: MemoContext): Table | null {
  const { r, ledger } = ctx;
  if (!r.fidelity) return null;
  const { many } = ctx.words;
  const row = (label: string, path: string, share = true): TableRow => {
    const st = ledger.get(path);
    const cells: Cell[] = [textCell(label), stateCell(st, path)];
    cells.push(share ? stateCell(ledger.share(numberAt(r, path) / r.fidelity!.compared, path, 'fidelity.compared'), `${path} / fidelity.compared`, PERCENT) : { kind: 'empty' });
    return { cells };
  };
  return {
    kind: 'table',
    id: 'fidelity',
    caption: 'Recorded decisions compared with the formula',
    sheetName: 'Decisions',
    columns: [{ header: 'Recorded decision', align: 'left', width: 4 }, { header: upperFirst(many), align: 'right', format: COUNT }, { header: 'Share', align: 'right', format: PERCENT }],
    rows: [
      row('Agrees with the formula', 'fidelity.agree'),
      row('Offered although the formula says not eligible', 'fidelity.offeredAgainstRule'),
      row('Not offered although the formula says eligible', 'fidelity.refusedAgainstRule'),
      row('Differs from the formula (overrides), in all', 'fidelity.disagree'),
      { emphasis: 'total', cells: [textCell('Compared'), stateCell(ledger.get('fidelity.compared'), 'fidelity.compared'), { kind: 'empty' }] },
    ],
    notes: [[text(r.fidelity.basis)]],
  };
}

export function dataSection(ctx: MemoContext): Section {
  const { r, ledger } = ctx;
  const s = r.study;
  const { many } = ctx.words;
  const blocks: Section['blocks'] = [
    {
      kind: 'paragraph',
      runs: ledger.get('study.rowsRead').shown
        ? [
          text(`The data come from ${s.dataFile}${s.sheet ? `, sheet “${s.sheet}”` : ''} (SHA-256 ${s.dataSha256}). Of `),
          stateRun(ledger.get('study.rowsRead'), 'study.rowsRead'), text(' rows read, '),
          stateRun(ledger.get('study.rowsUsed'), 'study.rowsUsed'), text(` were used, one per ${ctx.words.one}.`),
        ]
        : [
          text(`The data come from ${s.dataFile}${s.sheet ? `, sheet “${s.sheet}”` : ''} (SHA-256 ${s.dataSha256}). `),
          stateRun(ledger.get('study.rowsUsed'), 'study.rowsUsed'), text(` rows were used, one per ${ctx.words.one}. Only a few rows were excluded, so their number, and with it the number of rows read, is not shown.`),
        ],
    },
    rowsTable(ctx),
  ];
  if (s.joins.length) {
    blocks.push({
      kind: 'table',
      id: 'joins',
      caption: 'Further files joined by the unit ID',
      sheetName: 'Joins',
      columns: [
        { header: 'File', align: 'left', width: 3 }, { header: 'Rows matched', align: 'right', format: COUNT },
        { header: 'IDs not found', align: 'right', format: COUNT }, { header: 'Repeated IDs', align: 'right', format: COUNT },
      ],
      rows: s.joins.map((j, i) => ({ cells: [
        textCell(j.source),
        stateCell(ledger.get(`study.joins[${i}].matched`), `study.joins[${i}].matched`),
        stateCell(ledger.get(`study.joins[${i}].unmatchedKeys.count`), `study.joins[${i}].unmatchedKeys.count`),
        stateCell(ledger.get(`study.joins[${i}].duplicateKeys.count`), `study.joins[${i}].duplicateKeys.count`),
      ] })),
    });
  }
  if (s.notes.length) {
    blocks.push({ kind: 'paragraph', runs: [text('Notes from reading the file:')] });
    blocks.push({ kind: 'list', items: s.notes.map((n) => [text(withColumnLabels(r, shareableText(n.message, ledger.threshold, [ctx.words.one, many])))]) });
  }
  r.outcomes.forEach((o, i) => {
    if (o.missing > 0) {
      blocks.push({ kind: 'paragraph', runs: [stateRun(ledger.get(`outcomes[${i}].missing`), `outcomes[${i}].missing`), text(` ${many} have no value for ${lowerFirst(outcomeName(o).name)}; they are left out of its estimates.`)] });
    }
  });
  const f = r.fidelity;
  if (f) {
    blocks.push({
      kind: 'paragraph',
      runs: [
        text('The formula reproduces the recorded decision for '), stateRun(ledger.get('fidelity.agree'), 'fidelity.agree'),
        text(' of '), stateRun(ledger.get('fidelity.compared'), 'fidelity.compared'),
        text(` ${many}; `), stateRun(ledger.get('fidelity.disagree'), 'fidelity.disagree'),
        text(' differ (overrides).'),
      ],
    });
    const t = fidelityTable(ctx);
    if (t) blocks.push(t);
  } else {
    blocks.push({ kind: 'paragraph', runs: [text('The study names no column of recorded decisions, so the formula could not be compared with what was decided.')] });
  }
  return { id: 'data', heading: 'The data', blocks };
}

