// Section 4: who the estimate is about. Units near the edge per delta, which criterion they sit
// near (composition), and how they and the compliers differ from all units (complier profile:
// the 2SLS of W·D on D, Angrist and Pischke 2009 §4.4.4; Abadie 2003's κ only where the offer
// probabilities are known) — the basis of the caveats on extrapolation.

import type { Cell, Inline, Section, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { boundaryMapFigure } from './memo-charts.ts';
import { COUNT, DELTA, PERCENT, columnLabel, criterionShort, upperFirst } from './memo-format.ts';
import { num, numCellOr, stateCell, stateRun, text, textCell } from './memo-source.ts';
import { article } from '../../rules/wording.ts';

const MEAN = { style: 'decimal', decimals: 2 } as const;

const criterion = (ctx: MemoContext, atom: number) => criterionShort(ctx.r, atom, ctx.words.one);

/** What the composition means for whom the estimate speaks, from the design the findings state. */
function designWords(ctx: MemoContext, topShare: number): Inline[] {
  const { many } = ctx.words;
  const d = ctx.r.findings.design;
  if (d.kind === 'edge') {
    return [text(topShare > 0.5
      ? `The estimate therefore speaks mostly for ${many} near that limit.`
      : `No one limit holds most of them: the estimate speaks for ${many} near each of the limits in the table, in these proportions.`)];
  }
  const k = ctx.headline;
  const share = ctx.ledger.share(d.lotteryShare, `design.composition[${k}].lotteryOnly`, `design.byDelta[${k}].boundary`);
  if (d.kind === 'lottery') return [text(`But every one of them is there because the offer was left to the draw, not because a limit is near: the estimate speaks for ${many} whose offer was drawn, wherever their inputs lie within the rule.`)];
  return [text('But '), stateRun(share, 'findings.design.lotteryShare', PERCENT),
    text(` of the ${many} compared are there because the offer was left to the draw, far from any limit: the estimate speaks mostly for ${many} whose offer was drawn, and for those near a limit only in part.`)];
}

export function whoSection(ctx: MemoContext): Section {
  const { r, ledger, headline: k } = ctx;
  const { one, many } = ctx.words;
  const blocks: Section['blocks'] = [{
    kind: 'paragraph',
    runs: [text(`${r.findings.design.kind === 'edge' || r.findings.design.kind === 'none'
      ? `Only ${many} near the edge of the rule tell us about the effect: those whose inputs are so close to a limit that a small difference would change the verdict.`
      : `Only ${many} whose offer could have gone either way tell us about the effect: those whose offer was left to the draw, and those whose inputs are so close to a limit that a small difference would change the verdict.`} How close counts as near is set by delta, the radius of a small neighbourhood around each ${one}’s inputs (measured in scaled units, see the appendix); the analysis is repeated for several deltas. The headline delta is `), num(r, 'headline.delta', DELTA), text(`, ${r.headline.why}.`)],
  }];
  blocks.push({
    kind: 'table',
    id: 'boundary-by-delta',
    caption: `${upperFirst(many)} near the edge of the rule at each delta`,
    sheetName: 'Near the edge',
    columns: [
      { header: 'Delta', align: 'right', format: DELTA },
      { header: `${upperFirst(many)} near the edge`, align: 'right', format: COUNT },
      { header: `Share of all ${many} used`, align: 'right', format: PERCENT },
    ],
    rows: r.design.byDelta.map((d, j): TableRow => {
      const path = `design.byDelta[${j}].boundary`;
      return { cells: [
        { kind: 'number', value: d.delta, source: `design.byDelta[${j}].delta` },
        stateCell(ledger.get(path), path),
        stateCell(ledger.share(d.boundary / r.study.rowsUsed, path, 'study.rowsUsed'), `${path} / study.rowsUsed`),
      ] };
    }),
  });

  const comp = r.design.composition[k];
  if (comp && comp.boundary > 0) {
    const rows: TableRow[] = comp.atoms.map((a, j): TableRow => {
      const base = `design.composition[${k}].atoms[${j}]`;
      return { cells: [
        textCell(criterion(ctx, a.atom)),
        stateCell(ledger.get(`${base}.straddling`), `${base}.straddling`),
        stateCell(ledger.share(a.share, `${base}.straddling`, `design.byDelta[${k}].boundary`), `${base}.share`, PERCENT),
        stateCell(ledger.get(`${base}.only`), `${base}.only`),
      ] };
    });
    rows.push({ cells: [textCell('Near two or more criteria at once'), { kind: 'empty' }, { kind: 'empty' }, stateCell(ledger.get(`design.composition[${k}].several`), `design.composition[${k}].several`)] });
    if (comp.lotteryOnly > 0) rows.push({ cells: [textCell('Near no criterion (the lottery alone)'), { kind: 'empty' }, { kind: 'empty' }, stateCell(ledger.get(`design.composition[${k}].lotteryOnly`), `design.composition[${k}].lotteryOnly`)] });
    rows.push({ emphasis: 'total', cells: [textCell(`All ${many} near the edge`), { kind: 'empty' }, { kind: 'empty' }, stateCell(ledger.get(`design.byDelta[${k}].boundary`), `design.byDelta[${k}].boundary`)] });
    const top = comp.atoms.map((a, j) => ({ a, j })).sort((x, y) => y.a.straddling - x.a.straddling)[0];
    if (top) {
      const base = `design.composition[${k}].atoms[${top.j}]`;
      blocks.push({ kind: 'paragraph', runs: [
        text(`At the headline delta, the criterion with the most ${many} near it is “${criterion(ctx, top.a.atom)}”: `),
        stateRun(ledger.share(top.a.share, `${base}.straddling`, `design.byDelta[${k}].boundary`), `${base}.share`, PERCENT),
        text(` of the ${many} near the edge. `), ...designWords(ctx, top.a.share),
      ] });
    }
    blocks.push({
      kind: 'table',
      id: 'composition',
      caption: `Which criterion the ${many} near the edge sit near (headline delta)`,
      sheetName: 'Which criterion',
      columns: [
        { header: 'Criterion', align: 'left', width: 0.9 },
        { header: `Near it`, align: 'right', format: COUNT },
        { header: 'Share near it', align: 'right', format: PERCENT },
        { header: 'Near it only', align: 'right', format: COUNT },
      ],
      rows,
      notes: [[text(`${upperFirst(article(one))} ${one} near two criteria counts in both rows of “Near it”, so that column does not add up; “Near it only” does.`)]],
    });
  }

  const map = boundaryMapFigure(ctx);
  if (map) blocks.push(map);
  else if (ctx.figures.boundaryMapNote) blocks.push({ kind: 'paragraph', runs: [text(ctx.figures.boundaryMapNote)] });

  const prof = r.compliers.findIndex((c) => c.delta === r.settings.deltas[k]);
  const profile = r.compliers[prof];
  if (profile && profile.rows.length) {
    const nearShown = ledger.get(`design.byDelta[${k}].boundary`).shown;
    const rows: TableRow[] = profile.rows.map((row, j): TableRow => {
      const base = `compliers[${prof}].rows[${j}]`;
      const cells: Cell[] = [
        textCell(columnLabel(r, row.covariate)),
        numCellOr(r, `${base}.all`, 'not available', MEAN),
        nearShown ? numCellOr(r, `${base}.boundary`, 'not available', MEAN) : { kind: 'suppressed', reason: 'derived' },
        nearShown ? numCellOr(r, `${base}.compliers.coef`, 'not available', MEAN) : { kind: 'suppressed', reason: 'derived' },
      ];
      return { cells };
    });
    const share = profile.complierShare;
    blocks.push({ kind: 'paragraph', runs: share !== null && nearShown
      ? [text(`Among the ${many} ${r.findings.design.kind === 'edge' ? 'near the edge' : 'compared'}, an estimated `), num(r, `compliers[${prof}].complierShare.coef`, PERCENT),
        text(` take the benefit when offered and would not take it otherwise (the compliers, for whom the effect is measured). The table compares them with all ${many} and with everyone near the edge: where they differ, the effect for other ${many} may differ too.`)]
      : [text(`The table compares the ${many} near the edge and the compliers with all ${many}: where they differ, the effect for other ${many} may differ too.`)],
    });
    blocks.push({
      kind: 'table',
      id: 'compliers',
      caption: `Average characteristics: all ${many}, those near the edge, and the compliers (headline delta)`,
      sheetName: 'Compliers',
      columns: [
        { header: 'Characteristic', align: 'left', width: 2.5 },
        { header: `All ${many}`, align: 'right', format: MEAN },
        { header: 'Near the edge', align: 'right', format: MEAN },
        { header: 'Compliers', align: 'right', format: MEAN },
      ],
      rows,
      notes: [[text(r.compliers[prof]?.method === 'kappa'
        ? 'Complier averages are weighted by the known offer probabilities of the draw (Abadie 2003); for a yes/no characteristic the average is the share with it.'
        : 'Complier averages use the same comparison and weighting as the effect estimate (a two-stage least squares regression; Angrist and Pischke 2009); for a yes/no characteristic the average is the share with it.')]],
    });
  }
  return { id: 'who', heading: 'Who the estimate is about', blocks };
}
