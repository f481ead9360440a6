// Numbers written the European way and dates in a rule input (issue "Hardened", §6), through
// data.check as the Data screen calls it: a column of decimal commas is read with a note, the
// study may state "decimal": ",", and a date in a continuous rule input is refused with a message
// naming the column unless the study lists the column under "dateColumns".

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { singleFileStudy } from '../serve/single-file-study.ts';

/** 300 invented households; income written as `income(i)` gives. */
function study(income: (i: number) => string, data: Record<string, unknown> = {}) {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-decimal-'));
  const lines = ['APPLICANT_ID,HH_INCOME,HH_SIZE,AGE_MAX,ARREARS_MARCH,RECEIVED,OFFERED,OFFICE,ARREARS_PRIOR,RENTER'];
  for (let i = 0; i < 300; i++) lines.push([`A${i}`, `"${income(i)}"`, 1 + (i % 4), 40 + (i % 40), 100 + i, i % 2, i % 2, `O${i % 5}`, 50, i % 2].join(','));
  writeFileSync(join(dir, 'applicants.csv'), lines.join('\r\n') + '\r\n');
  const s = singleFileStudy();
  return { study: { ...s, data: { ...s.data, ...data } }, baseDir: dir };
}

type Report = { rowsUsed: number; rowsExcluded: Array<{ reason: string; count: number }>; notes: Array<{ code: string; message: string }> };

describe('numbers written with decimal commas', () => {
  it('are read, and said so in a note, instead of excluding every row', async () => {
    // 20.000 + 37,5·i with a decimal comma and point groups ("20.037,5"); some rows plain thousands ("21.000").
    const r = await callApi('data.check', study((i) => (i % 10 === 0 ? `${20 + i / 10}.000` : (20000 + 37.5 * i).toLocaleString('de-DE'))));
    if (!r.ok) throw new Error(JSON.stringify(r.error));
    const v = r.value as Report;
    expect(v.rowsExcluded.filter((e) => /HH_INCOME/.test(e.reason))).toEqual([]);
    expect(v.notes.find((n) => n.code === 'decimal-comma')?.message).toMatch(/^HH_INCOME: numbers written with a decimal comma \(such as "20\.037,5"\) were read that way \(20,037\.5\)/);
  });
  it('the study may say so for a column that looks the other way ("1.234" alone)', async () => {
    const s = study((i) => `${20 + (i % 30)}.${String(100 + i).padStart(3, '0')}`, { decimal: ',' });
    const r = await callApi('data.check', s);
    if (!r.ok) throw new Error(JSON.stringify(r.error));
    expect((r.value as Report).notes.some((n) => n.code === 'decimal-comma')).toBe(true);
    const bad = await callApi('data.check', study(() => '1', { decimal: ';' }));
    expect(bad).toMatchObject({ ok: false, error: { problems: [{ path: 'data.decimal' }] } });
  });
});

describe('dates in a continuous rule input', () => {
  it('are refused with the column named and what to do', async () => {
    const r = await callApi('data.check', study((i) => (i === 7 ? '2024-03-01' : String(20000 + i))));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.problems[0]!.path).toBe('program.variables[0].column');
      expect(r.error.problems[0]!.message).toMatch(/HH_INCOME holds 1 date \(such as 2024-03-01\), but it is the continuous rule input "income"\. If it is a date on purpose, add "HH_INCOME" to "dateColumns" under data/);
    }
  });
  it('are read as days when the study lists the column', async () => {
    const r = await callApi('data.check', study((i) => (i === 7 ? '2024-03-01' : String(20000 + i)), { dateColumns: ['HH_INCOME'] }));
    expect(r.ok).toBe(true);
  });
});
