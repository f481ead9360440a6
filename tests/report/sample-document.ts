// A representative memo document for the renderer tests and scripts/render-sample-memo.ts.
// Everything in it is INVENTED: a fictional program ("Harbour County Winter Energy Credit"), made-up
// numbers and offices. It exercises every node type, a long table (90 rows, so the PDF must split it
// across pages), suppressed cells (primary and secondary) and all five chart kinds.

import type { Cell, Document, Inline, Table, TableRow } from '../../main/report/model/document.ts';
import { DOCUMENT_FORMAT } from '../../main/report/model/document.ts';
import {
  suppressBinnedCounts, suppressCount, suppressCountTable, suppressionLegend, toCell, toInline,
} from '../../main/report/model/suppress.ts';
import type { BoundaryMapSpec } from '../../main/report/charts/spec.ts';

/** Deterministic pseudo-random numbers (Park & Miller 1988 minimal standard generator). */
function lcg(seed: number): () => number {
  let s = seed;
  return () => { s = (s * 16807) % 2147483647; return s / 2147483647; };
}

const t = (text: string, style?: 'bold' | 'italic'): Inline => (style ? { kind: 'text', text, style } : { kind: 'text', text });
const usd = (value: number, footnote?: string): Inline => ({
  kind: 'number', value, format: { style: 'decimal', decimals: 1, unit: 'USD' }, ...(footnote ? { footnote } : {}),
});
const int = (value: number): Inline => ({ kind: 'number', value, format: { style: 'integer' } });

export const SAMPLE_THRESHOLD = 10;

export interface SampleDocument {
  doc: Document;
  /** Every count that the sample hides (the renderers must never print them in a hidden cell's place). */
  hiddenCounts: number[];
  /** Per table id: for each hidden cell, its true value, row and column. */
  hiddenCells: Map<string, Array<{ row: number; column: number; value: number }>>;
}

function officeTable(hiddenCells: SampleDocument['hiddenCells']): Table {
  const rnd = lcg(7);
  const counts: number[][] = [];
  for (let i = 0; i < 90; i++) {
    // Mostly large counts, some small ones (1–10) and a few zeros.
    const row = [0, 1, 2].map(() => {
      const u = rnd();
      if (u < 0.12) return 1 + Math.floor(rnd() * 10);
      if (u < 0.15) return 0;
      return 11 + Math.floor(rnd() * 240);
    });
    counts.push(row);
  }
  const s = suppressCountTable({ counts, rowTotals: true, columnTotals: true }, SAMPLE_THRESHOLD);
  const hidden: Array<{ row: number; column: number; value: number }> = [];
  const rows: TableRow[] = counts.map((row, r) => {
    const cells: Cell[] = [{ kind: 'text', text: `Office ${String(r + 1).padStart(2, '0')}` }];
    row.forEach((v, c) => {
      const st = s.counts[r]![c]!;
      if (!st.shown) hidden.push({ row: r, column: c + 1, value: v });
      cells.push(toCell(st));
    });
    const tot = s.rowTotals![r]!;
    if (!tot.shown) hidden.push({ row: r, column: 4, value: row.reduce((a, b) => a + b, 0) });
    cells.push(toCell(tot));
    return { cells };
  });
  const colTotals = s.columnTotals!;
  rows.push({
    emphasis: 'total',
    cells: [{ kind: 'text', text: 'All offices' }, ...colTotals.map((c) => toCell(c)), toCell(s.grandTotal!)],
  });
  hiddenCells.set('units-by-office', hidden);
  return {
    kind: 'table',
    id: 'units-by-office',
    caption: 'Households near the edge by office and household size (delta = 0.1)',
    sheetName: 'By office',
    columns: [
      { header: 'Office', align: 'left', width: 2 },
      { header: '1 person', align: 'right', format: { style: 'integer' } },
      { header: '2 people', align: 'right', format: { style: 'integer' } },
      { header: '3 or more', align: 'right', format: { style: 'integer' } },
      { header: 'All sizes', align: 'right', format: { style: 'integer' } },
    ],
    rows,
    notes: [[t('Counts are households with an offer probability strictly between 0 and 1 at delta = 0.1.')]],
  };
}

function boundaryMap(): BoundaryMapSpec {
  // Invented rule for the picture: offered when income ≤ 35,000 USD, or when income ≤ 45,000 USD
  // and the oldest member is 65 or older.
  const nx = 40, ny = 30;
  const xEdges = Array.from({ length: nx + 1 }, (_, i) => 15000 + i * 1000);
  const yEdges = Array.from({ length: ny + 1 }, (_, i) => 40 + i * 1.5);
  const offered = (x: number, y: number) => (x <= 35000 || (x <= 45000 && y >= 65) ? 1 : 0);
  const probability: number[][] = [];
  const inBand: boolean[][] = [];
  const delta = { x: 2500, y: 4 };
  for (let iy = 0; iy < ny; iy++) {
    const pr: number[] = [];
    const band: boolean[] = [];
    for (let ix = 0; ix < nx; ix++) {
      const x = (xEdges[ix]! + xEdges[ix + 1]!) / 2;
      const y = (yEdges[iy]! + yEdges[iy + 1]!) / 2;
      pr.push(offered(x, y));
      const corners = [[-1, -1], [-1, 1], [1, -1], [1, 1], [0, 0]].map(([a, b]) => offered(x + a! * delta.x, y + b! * delta.y));
      band.push(Math.min(...corners) !== Math.max(...corners));
    }
    probability.push(pr);
    inBand.push(band);
  }
  const rnd = lcg(11);
  const cx = 20, cy = 15;
  const cxEdges = Array.from({ length: cx + 1 }, (_, i) => 15000 + i * 2000);
  const cyEdges = Array.from({ length: cy + 1 }, (_, i) => 40 + i * 3);
  const raw: number[][] = [];
  for (let iy = 0; iy < cy; iy++) {
    const row: number[] = [];
    for (let ix = 0; ix < cx; ix++) {
      const dx = (ix - 9) / 6, dy = (iy - 6) / 5;
      const mean = 90 * Math.exp(-(dx * dx + dy * dy));
      row.push(Math.floor(mean * (0.5 + rnd())));
    }
    raw.push(row);
  }
  return {
    kind: 'boundaryMap',
    title: 'Where the rule’s edge runs',
    subtitle: 'Households of 2 people (the most common size)',
    x: { label: 'Annual household income', unit: 'USD' },
    y: { label: 'Age of oldest member', unit: 'years' },
    grid: { xEdges, yEdges, probability, inBand },
    delta: 0.1,
    counts: { xEdges: cxEdges, yEdges: cyEdges, values: suppressBinnedCounts(raw, SAMPLE_THRESHOLD) },
  };
}

export function sampleDocument(): SampleDocument {
  const hiddenCells: SampleDocument['hiddenCells'] = new Map();
  const legend = suppressionLegend(SAMPLE_THRESHOLD);

  // Excluded rows: a one-way table whose total (rows read) is printed, so secondary suppression applies.
  const excluded = [
    { reason: 'Household income is not a number', count: 13 },
    { reason: 'Household size is missing', count: 4 },
    { reason: 'Age of oldest member is below 16', count: 7 },
    { reason: 'Duplicate applicant ID', count: 212 },
  ];
  const used = 4764;
  const ex = suppressCountTable({ counts: [...excluded.map((e) => [e.count]), [used]], columnTotals: true }, SAMPLE_THRESHOLD);
  const exHidden: Array<{ row: number; column: number; value: number }> = [];
  const exRows: TableRow[] = excluded.map((e, i) => {
    const st = ex.counts[i]![0]!;
    if (!st.shown) exHidden.push({ row: i, column: 1, value: e.count });
    return { cells: [{ kind: 'text', text: e.reason }, toCell(st)] };
  });
  exRows.push({ cells: [{ kind: 'text', text: 'Rows used' }, toCell(ex.counts[excluded.length]![0]!)] });
  exRows.push({ emphasis: 'total', cells: [{ kind: 'text', text: 'Rows read' }, toCell(ex.columnTotals![0]!)] });
  hiddenCells.set('rows-excluded', exHidden);

  const overrides = suppressCount(6, SAMPLE_THRESHOLD);

  const doc: Document = {
    format: DOCUMENT_FORMAT,
    title: {
      title: 'Winter Energy Credit: effect on March utility arrears',
      subtitle: 'Harbour County, first season — an invented example for testing the memo layout',
      dateLine: '12 March 2025 · Fenceline 0.1.0',
      createdAt: '2025-03-12T09:30:00Z',
      provenance: [
        'Data: applicants.xlsx, sheet “Applicants” (invented data)',
        'SHA-256: 3f5a9c0e2b7d4a1f8e6c5b3a2d1f0e9c8b7a6d5c4b3a2f1e0d9c8b7a6f5e4d3c',
        'Rows read 5,000; used 4,764; settings: deltas 0.05, 0.1, 0.2; 4,000 draws; seed 1',
      ],
      author: 'Fenceline',
      language: 'en',
    },
    suppression: legend,
    footnotes: [
      { id: 'fn-ci', body: [t('A 95% interval: the range of effects the data cannot tell apart from the estimate.')] },
      { id: 'fn-hc1', body: [t('Standard errors robust to unequal variances (HC1; MacKinnon and White 1985, Journal of Econometrics 29:305–325).')] },
    ],
    sections: [
      {
        id: 'key-finding',
        heading: 'Key finding',
        blocks: [
          {
            kind: 'keyFinding',
            title: 'Receiving the credit lowered March arrears, but the data are also consistent with no effect',
            body: [
              {
                kind: 'paragraph',
                runs: [
                  t('For households near the income and age limits, receiving the credit changed March utility arrears by '),
                  usd(-35.2, 'fn-ci'),
                  t(' (95% interval '), usd(-76.4), t(' to '), usd(6.0), t(').'),
                ],
              },
              { kind: 'list', items: [
                [t('The interval covers zero: '), t('consistent with no effect', 'bold'), t('.')],
                [t('It holds for the '), int(812), t(' households close to the edge, not for all applicants.')],
              ] },
            ],
          },
          { kind: 'paragraph', runs: [t('This memo is an invented example. The program, the county and every number in it are made up.', 'italic')] },
        ],
      },
      {
        id: 'rule',
        heading: 'The rule',
        blocks: [
          { kind: 'paragraph', runs: [t('A household is offered the credit when its annual income is at or below the limit for its size '), t('and', 'bold'), t(' its oldest member is 65 or older or its income per person is at most 6,000 USD.')] },
          { kind: 'list', ordered: true, items: [
            [t('1 person: 21,000 USD')], [t('2 people: 28,000 USD')], [t('3 people: 35,000 USD; each further person adds 7,000 USD')],
          ] },
        ],
        sections: [
          {
            id: 'rule-offers',
            heading: 'Offer probabilities',
            blocks: [{ kind: 'paragraph', runs: [t('Every eligible household is offered the credit (probability 1); no other household is (probability 0).')] }],
          },
        ],
      },
      {
        id: 'data',
        heading: 'The data',
        blocks: [
          { kind: 'paragraph', runs: [t('The formula reproduces the recorded decisions for all but '), toInline(overrides), t(' households (overrides).')] },
          {
            kind: 'table',
            id: 'rows-excluded',
            caption: 'Rows read, used and excluded',
            columns: [
              { header: 'Reason', align: 'left', width: 3 },
              { header: 'Rows', align: 'right', format: { style: 'integer' } },
            ],
            rows: exRows,
          },
        ],
      },
      {
        id: 'who',
        heading: 'Who the estimate is about',
        pageBreakBefore: true,
        blocks: [
          { kind: 'paragraph', runs: [t('The estimate describes households near the edge of the rule. The map shows where they sit.')] },
          {
            kind: 'figure',
            id: 'fig-map',
            chart: boundaryMap(),
            caption: 'Offer probability over income and age, the boundary band at delta = 0.1, and households per bin',
            alt: 'A map with income on the horizontal axis and age on the vertical axis. Households below 35,000 USD, and those 65 or older below 45,000 USD, are offered the credit. A hatched band marks the edge. Circles show how many households fall in each bin; bins with 10 or fewer households are blank.',
          },
          officeTable(hiddenCells),
        ],
      },
      {
        id: 'results',
        heading: 'Results',
        blocks: [
          {
            kind: 'table',
            id: 'estimates',
            caption: 'Effect on March arrears by delta',
            sheetName: 'Estimates',
            columns: [
              { header: 'Delta', align: 'right', format: { style: 'decimal', decimals: 2 } },
              { header: 'Households', align: 'right', format: { style: 'integer' } },
              { header: 'Effect (USD)', align: 'right', format: { style: 'decimal', decimals: 1, signed: true } },
              { header: 'Std. error', align: 'right', format: { style: 'decimal', decimals: 1 } },
              { header: 'p-value', align: 'right', format: { style: 'pvalue' } },
            ],
            rows: [
              { cells: [{ kind: 'number', value: 0.05 }, { kind: 'number', value: 402 }, { kind: 'number', value: -41.8 }, { kind: 'number', value: 30.2, footnote: 'fn-hc1' }, { kind: 'number', value: 0.166 }] },
              { cells: [{ kind: 'number', value: 0.1 }, { kind: 'number', value: 812 }, { kind: 'number', value: -35.2 }, { kind: 'number', value: 21.0 }, { kind: 'number', value: 0.094 }] },
              { cells: [{ kind: 'number', value: 0.2 }, { kind: 'number', value: 1630 }, { kind: 'number', value: -28.9 }, { kind: 'number', value: 14.7 }, { kind: 'number', value: 0.0004 }] },
            ],
          },
          {
            kind: 'figure',
            id: 'fig-delta',
            chart: {
              kind: 'deltaSensitivity',
              effect: { label: 'Effect on March arrears', unit: 'USD' },
              points: [
                { delta: 0.05, estimate: -41.8, low: -101.0, high: 17.4 },
                { delta: 0.1, estimate: -35.2, low: -76.4, high: 6.0 },
                { delta: 0.2, estimate: -28.9, low: -57.7, high: -0.1 },
              ],
              references: [{ label: 'Naive comparison', value: 12.5 }],
            },
            caption: 'Estimated effect and 95% interval at each delta',
            alt: 'Three estimates between -42 and -29 USD with intervals that shrink as delta grows; the two smaller deltas include zero.',
          },
          { kind: 'paragraph', runs: [t('A naive comparison of recipients with everyone else gives '), usd(12.5), t(': recipients differ from non-recipients in ways that have nothing to do with the credit (selection).')] },
        ],
      },
      {
        id: 'checks',
        heading: 'Checks',
        blocks: [
          {
            kind: 'figure',
            id: 'fig-balance',
            chart: {
              kind: 'balance',
              covariates: ['Prior arrears', 'Renter', 'Household size', 'Age of oldest member'],
              series: [
                { name: 'All households', values: [0.42, 0.31, -0.18, 0.25] },
                { name: 'Near the edge, controlling for the offer probability', values: [0.04, -0.06, 0.02, null] },
              ],
            },
            caption: 'Standardized differences between offered and not-offered households',
            alt: 'Differences are large among all households and within ±0.1 near the edge.',
          },
          {
            kind: 'figure',
            id: 'fig-binned',
            chart: {
              kind: 'binnedMeans',
              x: { label: 'Distance to the nearest edge', unit: 'scaled units' },
              y: { label: 'Received the credit', unit: 'share' },
              sides: { below: 'Not offered', above: 'Offered' },
              yRange: [0, 1],
              bins: Array.from({ length: 20 }, (_, i) => {
                const x = -0.95 + i * 0.1;
                return { x, mean: i === 3 ? null : x < 0 ? 0.04 + 0.01 * i : 0.78 + 0.01 * (i - 10), side: x < 0 ? 'below' as const : 'above' as const };
              }),
              fits: [
                { side: 'below', points: [{ x: -1, y: 0.035 }, { x: 0, y: 0.135 }] },
                { side: 'above', points: [{ x: 0, y: 0.775 }, { x: 1, y: 0.875 }] },
              ],
            },
            caption: 'Share receiving the credit against the distance to the nearest edge',
            alt: 'Take-up jumps from about 14% to about 78% at the edge.',
          },
          {
            kind: 'figure',
            id: 'fig-density',
            chart: {
              kind: 'density',
              x: { label: 'Annual household income', unit: 'USD' },
              threshold: 28000,
              thresholdLabel: 'Limit for 2 people',
              sides: { below: 'Below the limit', above: 'Above the limit' },
              bins: Array.from({ length: 16 }, (_, i) => ({ from: 20000 + i * 1000, to: 21000 + i * 1000, count: i === 15 ? null : 60 + ((i * 37) % 23) })),
              fits: [
                { side: 'below', points: [{ x: 20000, y: 66 }, { x: 28000, y: 72 }] },
                { side: 'above', points: [{ x: 28000, y: 73 }, { x: 36000, y: 70 }] },
              ],
            },
            caption: 'Households per 1,000 USD of income around the limit for 2 people',
            alt: 'The number of households per income bin is about the same on both sides of the limit.',
          },
          { kind: 'note', tone: 'caution', title: 'Few households at the smallest delta', body: [{ kind: 'paragraph', runs: [t('At delta = 0.05 only '), int(402), t(' households are near the edge; the interval is wide.')] }] },
        ],
      },
      {
        id: 'limits',
        heading: 'Limits and caveats',
        blocks: [
          { kind: 'note', tone: 'limitation', title: 'Local to the edge', body: [{ kind: 'paragraph', runs: [t('The effect is measured for households near the limits. It is not a forecast for households far from them or for a large change of the rule.')] }] },
          { kind: 'pageBreak' },
          { kind: 'paragraph', runs: [t('This memo evaluates a rule; it determines no one’s eligibility.')] },
        ],
      },
      {
        id: 'glossary',
        heading: 'Glossary',
        blocks: [
          {
            kind: 'glossary',
            entries: [
              { term: 'Delta', definition: [t('The radius of the small ball around each household’s inputs over which the offer probability is averaged.')] },
              { term: 'APS', definition: [t('Approximate propensity score: the average offer probability over that ball (Narita and Yata 2023).')] },
              { term: '2SLS', definition: [t('Two-stage least squares: the effect of receiving the credit, using the offer as the instrument.')] },
            ],
          },
        ],
      },
    ],
  };
  const hiddenCounts = [...hiddenCells.values()].flat().map((h) => h.value);
  if (!overrides.shown) hiddenCounts.push(6);
  return { doc, hiddenCounts, hiddenCells };
}
