import { describe, expect, it } from 'vitest';
import { mapStudyColumns, type ColumnSpec, type MappedData } from '../../main/data/map-columns.ts';
import type { RawTable } from '../../main/data/types.ts';
import { mustRead, tempDir, uniqueName, writeFile } from './helpers.ts';

const dir = tempDir();
const table = (csv: string): Promise<RawTable> => mustRead(writeFile(dir, uniqueName('.csv'), csv));

const spec = (over: Partial<ColumnSpec> = {}): ColumnSpec => ({
  id: 'APPLICANT_ID',
  variables: [
    { key: 'income', column: 'HH_INCOME', type: 'continuous', path: 'program.variables[0].column' },
    { key: 'size', column: 'HH_SIZE', type: 'discrete', path: 'program.variables[1].column' },
  ],
  outcomes: [{ column: 'ARREARS', path: 'columns.outcomes[0].column' }],
  covariates: [],
  controls: [],
  ...over,
});

function mapped(t: RawTable, s: ColumnSpec): MappedData {
  const got = mapStudyColumns(t, s);
  if (!got.ok) throw new Error(got.problems.map((p) => `${p.path}: ${p.message}`).join(' | '));
  return got.value;
}

/** Nothing dropped silently: every data row is used or excluded once. */
function expectAccounted(m: MappedData): void {
  expect(m.n + m.excluded.reduce((s, g) => s + g.count, 0)).toBe(m.rowsRead);
}

describe('mapping study columns to headers', () => {
  it('forgives case and surrounding spaces, with a note', async () => {
    const t = await table('applicant_id, hh_income ,HH_SIZE,Arrears\nA1,100,1,5\n');
    const m = mapped(t, spec());
    expect(m.n).toBe(1);
    expect(m.notes.find((n) => n.code === 'column-name-case')?.message).toMatch(/HH_INCOME → hh_income/);
  });

  it('says which header is closest on a miss, with the JSON path of the study field', async () => {
    const t = await mustRead(writeFile(dir, 'applicants.csv', 'APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS_MARCH\nA1,100,1,5\n'));
    const got = mapStudyColumns(t, spec({
      variables: [{ key: 'income', column: 'HH_INCOM', type: 'continuous', path: 'program.variables[0].column' }],
      outcomes: [{ column: 'ARREARS_MARCH', path: 'columns.outcomes[0].column' }, { column: 'EMPLOYED', path: 'columns.outcomes[1].column' }],
    }));
    expect(got.ok).toBe(false);
    if (got.ok) return;
    expect(got.problems).toEqual([
      { path: 'program.variables[0].column', message: 'No column HH_INCOM in applicants.csv; did you mean HH_INCOME?' },
      { path: 'columns.outcomes[1].column', message: expect.stringMatching(/^No column EMPLOYED in applicants\.csv\. Its columns are: APPLICANT_ID, HH_INCOME, HH_SIZE, ARREARS_MARCH\./) },
    ]);
  });
});

describe('exclusions, with row numbers as seen in the sheet', () => {
  const csv = [
    'Winter credit applicants', // row 1: title
    'APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS,RECEIVED,OFFERED', // row 2: header
    'A1,100,1,5,1,yes', // 3 used
    'A2,abc,2,5,0,no', // 4 HH_INCOME is not a number
    'A3,,2,5,0,N', // 5 HH_INCOME is blank
    'A4,200,2,,1,Y', // 6 used, ARREARS missing
    'A5,300,2,7,2,TRUE', // 7 RECEIVED amount 2: used (treatment is an amount)
    'A6,300,2,7,-1,false', // 8 RECEIVED is negative
    'A7,300,2,7,1,maybe', // 9 OFFERED is not 0/1
    'A1,400,3,7,1,1', // 10 duplicate APPLICANT_ID (with row 3)
    ',400,3,7,1,1', // 11 APPLICANT_ID is blank
    'A8,#N/A,3,7,1,0', // 12 HH_INCOME holds an Excel error value
    'A9,"$1,500",3,n/a,0,0', // 13 used; text number; ARREARS not a number → missing
  ].join('\n');

  it('excludes each unusable row once, naming the column, and accounts for every row', async () => {
    const t = await table(csv);
    expect(t.rowCount).toBe(11);
    const m = mapped(t, spec({
      treatment: { column: 'RECEIVED', path: 'columns.treatment' },
      decision: { column: 'OFFERED', path: 'columns.decision' },
    }));
    expect(m.rowsRead).toBe(11);
    expect(m.ids).toEqual(['A4', 'A5', 'A9']);
    expect([...m.rowNumbers]).toEqual([6, 7, 13]);
    expect(m.excluded).toEqual([
      { reason: 'duplicate APPLICANT_ID', count: 2, rows: [3, 10] },
      { reason: 'HH_INCOME is not a number', count: 1, rows: [4] },
      { reason: 'HH_INCOME is blank', count: 1, rows: [5] },
      { reason: 'RECEIVED is negative', count: 1, rows: [8] },
      { reason: 'OFFERED is not 0/1', count: 1, rows: [9] },
      { reason: 'APPLICANT_ID is blank', count: 1, rows: [11] },
      { reason: 'HH_INCOME holds an Excel error value', count: 1, rows: [12] },
    ]);
    expectAccounted(m);
    expect([...m.variables[0]!]).toEqual([200, 300, 1500]);
    expect([...m.treatment!]).toEqual([1, 2, 0]);
    expect([...m.decision!]).toEqual([1, 1, 0]);
    expect(m.outcomes[0]![0]).toBeNaN();
    expect(m.outcomes[0]![1]).toBe(7);
    expect(m.outcomeMissing).toEqual([{ count: 2, rows: [6, 13] }]);
    expect(m.notes.find((n) => n.code === 'outcome-missing')?.message).toMatch(/1: ARREARS is blank; 1: ARREARS is not a number/);
    expect(m.notes.some((n) => n.code === 'treatment-amount')).toBe(true);
  });

  it('reads decisions written 0/1, yes/no, y/n, true/false in any case', async () => {
    const t = await table('APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS,OFFERED\n' + ['1', '0', 'Yes', 'NO', 'y', 'N', 'TRUE', 'false', '2', 'offered']
      .map((d, i) => `U${i},1,1,1,${d}`).join('\n'));
    const m = mapped(t, spec({ decision: { column: 'OFFERED', path: 'columns.decision' } }));
    expect([...m.decision!]).toEqual([1, 0, 1, 0, 1, 0, 1, 0]);
    expect(m.excluded).toEqual([{ reason: 'OFFERED is not 0/1', count: 2, rows: [10, 11] }]);
    expectAccounted(m);
  });

  it('says "not 0/1" for a 0/1 treatment and "not 0/1 or an amount" for an amount', async () => {
    const t = await table('APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS,D\nA,1,1,1,1\nB,1,1,1,0\nC,1,1,1,x\n');
    expect(mapped(t, spec({ treatment: { column: 'D', path: 'columns.treatment' } })).excluded[0]!.reason).toBe('D is not 0/1');
    const u = await table('APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS,D\nA,1,1,1,250\nB,1,1,1,0\nC,1,1,1,x\n');
    expect(mapped(u, spec({ treatment: { column: 'D', path: 'columns.treatment' } })).excluded[0]!.reason).toBe('D is not 0/1 or an amount');
  });

  it('codes text categories of a discrete variable and clusters, and checks covariates and controls', async () => {
    const t = await table('APPLICANT_ID,HH_INCOME,REGION,ARREARS,OFFICE,RENTER,PRIOR\nA,1,North,1,East,yes,5\nB,2,South,1,West,no,6\nC,3,North,1,East,y,\nD,4,,1,East,n,7\n');
    const m = mapped(t, spec({
      variables: [
        { key: 'income', column: 'HH_INCOME', type: 'continuous', path: 'program.variables[0].column' },
        { key: 'region', column: 'REGION', type: 'discrete', path: 'program.variables[1].column' },
      ],
      cluster: { column: 'OFFICE', path: 'columns.cluster' },
      covariates: [{ column: 'RENTER', path: 'columns.covariates[0]' }, { column: 'PRIOR', path: 'columns.covariates[1]' }],
      controls: [{ column: 'PRIOR', path: 'columns.controls[0]' }],
    }));
    expect(m.dictionaries).toEqual([null, ['North', 'South']]);
    expect([...m.variables[1]!]).toEqual([0, 1]);
    expect(m.cluster).toEqual({ codes: new Int32Array([0, 1]), labels: ['East', 'West'] });
    expect([...m.covariates[0]!]).toEqual([1, 0]);
    expect([...m.controls[0]!]).toEqual([5, 6]);
    expect(m.excluded).toEqual([
      { reason: 'PRIOR is blank', count: 1, rows: [4] },
      { reason: 'REGION is blank', count: 1, rows: [5] },
    ]);
    expectAccounted(m);
  });

  it('links IDs written "00102" to 102 and shows them as written', async () => {
    const t = await table('APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS\n00102,1,1,1\n102,1,1,1\n');
    const m = mapped(t, spec());
    expect(m.excluded).toEqual([{ reason: 'duplicate APPLICANT_ID', count: 2, rows: [2, 3] }]);
  });
});
