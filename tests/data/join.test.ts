import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { indexJoinedTable, readJoins } from '../../main/data/join.ts';
import { mapStudyColumns, type ColumnSpec, type MappedData } from '../../main/data/map-columns.ts';
import { mustRead, tempDir, writeFile, writeXlsx } from './helpers.ts';

const dir = tempDir();

const units = [
  'APPLICANT_ID,HH_INCOME,HH_SIZE',
  'A1,100,1', // row 2
  'A2,200,2', // row 3
  'A3,300,3', // row 4
  'A4,400,1', // row 5
  'A5,500,2', // row 6
].join('\n');

const baseSpec: ColumnSpec = {
  id: 'APPLICANT_ID',
  variables: [{ key: 'income', column: 'HH_INCOME', type: 'continuous', path: 'program.variables[0].column' }],
  outcomes: [{ column: 'ARREARS_MARCH', path: 'columns.outcomes[0].column' }],
  covariates: [],
  controls: [],
};

function ok(got: ReturnType<typeof mapStudyColumns>): MappedData {
  if (!got.ok) throw new Error(got.problems.map((p) => `${p.path}: ${p.message}`).join(' | '));
  return got.value;
}

describe('data.join: sources linked by the unit ID', () => {
  it('reads each source, reports unmatched and duplicate keys, and leaves outcomes missing where a unit has no row', async () => {
    const unitTable = await mustRead(writeFile(dir, 'applicants.csv', units));
    writeFile(dir, 'outcomes.csv', 'CASE_NO,ARREARS_MARCH\nA1,10\nA2,20\nA2,21\nA9,90\nB7,70\n,5\n');
    await writeXlsx(dir, 'payments.xlsx', { Paid: [['Payments, season 1'], [], ['APPLICANT_ID', 'AMOUNT'], ['A1', 250], ['A3', 100], ['A3', 150], ['Z1', 50]] });
    const joins = await readJoins(
      [{ path: 'outcomes.csv', key: 'CASE_NO' }, { path: 'payments.xlsx', sheet: 'Paid', key: 'APPLICANT_ID' }],
      dir,
    );
    if (!joins.ok) throw new Error(joins.problems[0]!.message);
    const m = ok(mapStudyColumns(unitTable, { ...baseSpec, treatment: { listedIn: 'payments.xlsx', path: 'columns.treatment' } }, joins.value));
    expect(m.n).toBe(5);
    expect(m.excluded).toEqual([]);
    // Outcome: A1 has a row; A2 has two rows (ambiguous) → missing; A3–A5 have none → missing.
    expect(m.outcomes[0]![0]).toBe(10);
    expect(m.outcomeMissing[0]).toEqual({ count: 4, rows: [3, 4, 5, 6] });
    expect(m.notes.find((n) => n.code === 'outcome-missing')?.message).toMatch(/1: APPLICANT_ID appears more than once in outcomes\.csv; 3: no row in outcomes\.csv for this APPLICANT_ID/);
    // Treatment listed in payments: 1 if the ID appears there (once or more), else 0.
    expect([...m.treatment!]).toEqual([1, 0, 1, 0, 0]);
    expect(m.joins).toEqual([
      { source: 'outcomes.csv', matched: 2, unmatchedKeys: { count: 2, examples: ['A9', 'B7'] }, duplicateKeys: { count: 1, examples: ['A2'] } },
      { source: 'payments.xlsx', matched: 2, unmatchedKeys: { count: 1, examples: ['Z1'] }, duplicateKeys: { count: 1, examples: ['A3'] } },
    ]);
    expect(m.notes.find((n) => n.code === 'join-blank-key')?.message).toMatch(/outcomes\.csv: 1 row has no CASE_NO .*row 7/);
  });

  it('excludes a unit with no row in a source that holds a program variable', async () => {
    const unitTable = await mustRead(writeFile(dir, 'roster.csv', 'APPLICANT_ID,ARREARS_MARCH\nA1,1\nA2,2\nA3,3\n'));
    const incomes = await mustRead(writeFile(dir, 'incomes.csv', 'ID,HH_INCOME\nA1,100\nA3,300\nA3,301\n'));
    const joined = indexJoinedTable('incomes.csv', 'data.join[0]', 'id', incomes);
    if (!joined.ok) throw new Error('index');
    const m = ok(mapStudyColumns(unitTable, baseSpec, [joined.value]));
    expect(m.ids).toEqual(['A1']);
    expect(m.excluded).toEqual([
      { reason: 'no row in incomes.csv for this APPLICANT_ID', count: 1, rows: [3] },
      { reason: 'APPLICANT_ID appears more than once in incomes.csv', count: 1, rows: [4] },
    ]);
    expect(m.n + m.excluded.reduce((s, g) => s + g.count, 0)).toBe(m.rowsRead);
  });

  it('says which key column is closest, with the JSON path of the join entry', async () => {
    writeFile(dir, 'o2.csv', 'CASE_NO,ARREARS_MARCH\nA1,1\n');
    const got = await readJoins([{ path: 'o2.csv', key: 'CASE_NUM' }], dir);
    expect(got).toEqual({ ok: false, problems: [{ path: 'data.join[0].key', message: 'No column CASE_NUM in o2.csv; did you mean CASE_NO?' }] });
    const missing = await readJoins([{ path: 'nowhere.csv', key: 'ID' }], dir);
    expect(missing.ok).toBe(false);
    if (!missing.ok) expect(missing.problems[0]!.message).toContain(`There is no file nowhere.csv at ${join(dir, 'nowhere.csv')}`);
  });

  it('refuses a treatment listed in a file that is not joined, and a column found in two joined files', async () => {
    const unitTable = await mustRead(writeFile(dir, 'u3.csv', units));
    const a = indexJoinedTable('a.csv', 'data.join[0]', 'APPLICANT_ID', await mustRead(writeFile(dir, 'a.csv', 'APPLICANT_ID,ARREARS_MARCH\nA1,1\n')));
    const b = indexJoinedTable('b.csv', 'data.join[1]', 'APPLICANT_ID', await mustRead(writeFile(dir, 'b.csv', 'APPLICANT_ID,arrears_march\nA1,1\n')));
    if (!a.ok || !b.ok) throw new Error('index');
    const got = mapStudyColumns(unitTable, { ...baseSpec, treatment: { listedIn: 'paid.xlsx', path: 'columns.treatment' } }, [a.value, b.value]);
    expect(got.ok).toBe(false);
    if (got.ok) return;
    expect(got.problems.map((p) => p.path)).toEqual(['columns.outcomes[0].column', 'columns.treatment']);
    expect(got.problems[0]!.message).toMatch(/ARREARS_MARCH is in more than one joined file \(a\.csv, b\.csv\)/);
    expect(got.problems[1]!.message).toMatch(/data\.join has no file paid\.xlsx.*The joined files are: a\.csv, b\.csv/);
  });
});
