// A quick size check: a 200,000-row CSV imports and maps with every row counted.
import { describe, expect, it } from 'vitest';
import { mapStudyColumns } from '../../main/data/map-columns.ts';
import { readTable } from '../../main/data/read-table.ts';
import { tempDir, writeFile } from './helpers.ts';

const dir = tempDir();
const ROWS = 200_000;

describe('size', () => {
  it('imports 200,000 rows', async () => {
    const lines = ['APPLICANT_ID,HH_INCOME,HH_SIZE,ARREARS,OFFERED'];
    for (let i = 0; i < ROWS; i++) lines.push(`A-${i},${20000 + (i % 9000)},${1 + (i % 6)},${i % 13 === 0 ? '' : i % 500},${i % 2}`);
    const path = writeFile(dir, 'big.csv', lines.join('\n') + '\n');
    const got = await readTable(path);
    expect(got.ok).toBe(true);
    if (!got.ok) return;
    expect(got.value.rowCount).toBe(ROWS);
    expect(got.value.rowNumbers[ROWS - 1]).toBe(ROWS + 1);
    const m = mapStudyColumns(got.value, {
      id: 'APPLICANT_ID',
      variables: [{ key: 'income', column: 'HH_INCOME', type: 'continuous', path: 'p' }, { key: 'size', column: 'HH_SIZE', type: 'discrete', path: 'q' }],
      outcomes: [{ column: 'ARREARS', path: 'r' }],
      decision: { column: 'OFFERED', path: 's' },
      covariates: [],
      controls: [],
    });
    expect(m.ok).toBe(true);
    if (!m.ok) return;
    expect(m.value.n).toBe(ROWS);
    expect(m.value.outcomeMissing[0]!.count).toBe(Math.ceil(ROWS / 13));
  }, 20_000);
});
