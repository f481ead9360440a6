import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { hashFile, IMPORT_CANCELLED, readTable } from '../../main/data/read-table.ts';
import { CellKind } from '../../main/data/types.ts';
import { compoundFile, makeZip, mustRead, mustRefuse, tempDir, uniqueName, writeFile, writeXlsx } from './helpers.ts';

const dir = tempDir();
const DAY_MS = 86_400_000;

const applicants = [
  ['APPLICANT_ID', 'HH_INCOME', 'HH_SIZE'],
  ['A-0001', 12000, 2],
  ['A-0002', 30500, 3],
];

describe('finding the header', () => {
  it('skips title rows above the header in a workbook; row numbers are as Excel shows them', async () => {
    const path = await writeXlsx(dir, uniqueName('.xlsx'), {
      Applicants: [['Winter Energy Credit — applicants'], ['Prepared by the county office'], [], ...applicants, [], ['A-0003', 9000, 1]],
    });
    const t = await mustRead(path);
    expect(t.headerRow).toBe(4);
    expect(t.columns.map((c) => c.name)).toEqual(['APPLICANT_ID', 'HH_INCOME', 'HH_SIZE']);
    expect([...t.rowNumbers]).toEqual([5, 6, 8]);
    expect([...t.columns[1]!.numbers]).toEqual([12000, 30500, 9000]);
    expect(t.notes.find((n) => n.code === 'blank-rows')?.message).toMatch(/row 7/);
  });

  it('skips a title line in a CSV file', async () => {
    const t = await mustRead(writeFile(dir, uniqueName('.csv'), 'Applicants as of March\n\nID,INCOME,SIZE\nA1,100,1\nA2,200,2\n'));
    expect(t.headerRow).toBe(3);
    expect([...t.rowNumbers]).toEqual([4, 5]);
  });

  it('passes over a short title line directly above the header', async () => {
    const t = await mustRead(writeFile(dir, uniqueName('.csv'), 'Program: Winter credit,Date: 2024-03-01\nID,INCOME,SIZE\nA1,1,2\n'));
    expect(t.headerRow).toBe(2);
  });

  it('refuses when no row looks like a header', async () => {
    const p = await mustRefuse(writeFile(dir, uniqueName('.csv'), '1,2,3\n4,5,6\n'));
    expect(p.message).toMatch(/Could not tell which row holds the column names .*Give the header row number/);
  });

  it('takes the header row it is given', async () => {
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { S: [['Program', 'Season', 'Office'], ...applicants] });
    expect((await mustRead(path)).headerRow).toBe(1);
    const t = await mustRead(path, { headerRow: 2 });
    expect(t.headerRow).toBe(2);
    expect(t.columns[0]!.name).toBe('APPLICANT_ID');
    expect(t.rowCount).toBe(2);
    const p = await mustRefuse(path, { headerRow: 9 });
    expect(p.message).toMatch(/Row 9 .* cannot hold the column names/);
  });

  it('notes values to the right of the last named column', async () => {
    const t = await mustRead(writeFile(dir, uniqueName('.csv'), 'ID,INCOME\nA1,100\nA2,200,extra\n'));
    expect(t.notes.find((n) => n.code === 'values-beyond-header')?.message).toMatch(/\(B\).*row 3/);
  });
});

describe('cells of a workbook', () => {
  it('reads numbers, formula results, dates, booleans, text numbers, errors and blanks', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Data');
    ws.addRow(['ID', 'AMOUNT', 'WHEN', 'FLAG']);
    ws.addRow(['00102', 10, new Date(Date.UTC(2024, 2, 1)), true]);
    ws.addRow(['A-0102', { formula: 'B2*2', result: 20 }, '2024-03-02', false]);
    ws.addRow(['X', '$1,234.50', 45352, 'yes']);
    ws.addRow(['Y', { error: '#DIV/0!' }, null, null]);
    ws.addRow(['Z', { formula: 'B9' }, null, 'no']);
    ws.getCell('C4').numFmt = 'yyyy-mm-dd';
    const path = join(dir, uniqueName('.xlsx'));
    await wb.xlsx.writeFile(path);
    const t = await mustRead(path);
    const [id, amount, when, flag] = t.columns;
    expect(id!.texts).toEqual(['00102', 'A-0102', 'X', 'Y', 'Z']);
    expect([...amount!.kinds]).toEqual([CellKind.Number, CellKind.Number, CellKind.TextNumber, CellKind.Error, CellKind.NoResult]);
    expect([...amount!.numbers].slice(0, 3)).toEqual([10, 20, 1234.5]);
    expect(amount!.texts?.[3]).toBe('#DIV/0!');
    // 2024-03-01 is day 19,783 after 1970-01-01; Excel serial 45352 is the same day
    // (ECMA-376 Part 1 §18.17.4.1, 1900 date system: serial 25569 = 1970-01-01).
    expect(Date.UTC(2024, 2, 1) / DAY_MS).toBe(19783);
    expect([...when!.numbers].slice(0, 3)).toEqual([19783, 19784, 19783]);
    expect([...when!.kinds]).toEqual([CellKind.Date, CellKind.Date, CellKind.Date, CellKind.Blank, CellKind.Blank]);
    expect([...flag!.kinds].slice(0, 2)).toEqual([CellKind.Bool, CellKind.Bool]);
    expect([...flag!.numbers].slice(0, 2)).toEqual([1, 0]);
    expect(flag!.texts?.[2]).toBe('yes');
    expect(t.notes.find((n) => n.code === 'dates')?.message).toMatch(/WHEN: 3 dates/);
    expect(t.notes.find((n) => n.code === 'text-numbers')?.message).toMatch(/AMOUNT: 1 number .*\$1,234\.50/);
  });

  it('records the file: name, sheet, byte size and SHA-256', async () => {
    const path = await writeXlsx(dir, 'applicants.xlsx', { Applicants: applicants });
    const t = await mustRead(path);
    const bytes = readFileSync(path);
    expect(t.source).toMatchObject({ fileName: 'applicants.xlsx', sheet: 'Applicants', format: 'xlsx', bytes: bytes.length, sheets: ['Applicants'] });
    expect(t.source.sha256).toBe((await hashFile(path, false)).sha256);
  });

  it('hashes with SHA-256 (FIPS 180-2 Appendix B.1: "abc")', async () => {
    const path = writeFile(dir, uniqueName('.csv'), 'abc');
    expect((await hashFile(path, true)).sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});

describe('choosing the sheet', () => {
  it('takes the first sheet with data by default, and a sheet by name in any case', async () => {
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { Cover: [], Applicants: applicants, Payments: [['APPLICANT_ID', 'PAID'], ['A-0001', 1]] });
    const t = await mustRead(path);
    expect(t.source.sheet).toBe('Applicants');
    expect(t.notes.find((n) => n.code === 'sheet-chosen')?.message).toMatch(/Cover, Payments/);
    expect((await mustRead(path, { sheet: 'payments' })).columns[1]!.name).toBe('PAID');
  });

  it('refuses an unknown sheet name, listing the sheets', async () => {
    const path = await writeXlsx(dir, 'book.xlsx', { Applicants: applicants, Payments: [['ID'], [1]] });
    const p = await mustRefuse(path, { sheet: 'Applicant' });
    expect(p.path).toBe('book.xlsx › Applicant');
    expect(p.message).toBe('There is no sheet named Applicant in book.xlsx; did you mean Applicants? Its sheets are: Applicants, Payments.');
  });

  it('refuses an empty sheet and an empty workbook', async () => {
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { Applicants: applicants, Blank: [] });
    expect((await mustRefuse(path, { sheet: 'Blank' })).message).toMatch(/Sheet Blank in .* is empty/);
    const empty = await writeXlsx(dir, uniqueName('.xlsx'), { One: [], Two: [] });
    expect((await mustRefuse(empty)).message).toMatch(/Every sheet of .* is empty \(sheets: One, Two\)/);
  });
});

describe('refusals, one clear message each', () => {
  it('an old .xls workbook', async () => {
    const p = await mustRefuse(writeFile(dir, 'old.xls', compoundFile(['Workbook'])));
    expect(p.message).toMatch(/old-format Excel workbook.*Save As.*\.xlsx/);
    // The same file renamed .xlsx is recognised by its content.
    expect((await mustRefuse(writeFile(dir, 'old-renamed.xlsx', compoundFile(['Workbook'])))).message).toMatch(/Excel 97–2003/);
  });

  it('a password-protected workbook (an OLE file with an EncryptedPackage stream)', async () => {
    const p = await mustRefuse(writeFile(dir, 'secret.xlsx', compoundFile(['EncryptionInfo', 'EncryptedPackage'])));
    expect(p.path).toBe('secret.xlsx');
    expect(p.message).toMatch(/protected with a password.*remove the password/);
  });

  it('a truncated workbook and a damaged one', async () => {
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { S: applicants });
    const bytes = readFileSync(path);
    const cut = await mustRefuse(writeFile(dir, 'cut.xlsx', bytes.subarray(0, Math.floor(bytes.length * 0.6))));
    expect(cut.message).toMatch(/damaged or incomplete/);
    const flipped = Buffer.from(bytes);
    const name = flipped.indexOf(Buffer.from('xl/worksheets/sheet1.xml'));
    const dataStart = name + flipped.readUInt16LE(name - 4) + flipped.readUInt16LE(name - 2);
    flipped[dataStart + 5]! ^= 0xff;
    expect((await mustRefuse(writeFile(dir, 'flipped.xlsx', flipped))).message).toMatch(/damaged or incomplete/);
  });

  it('a zip that is not a workbook', async () => {
    const zip = makeZip([{ name: 'word/document.xml', data: Buffer.from('<w:document/>') }]);
    expect((await mustRefuse(writeFile(dir, 'letter.xlsx', zip))).message).toMatch(/not an Excel workbook\. It looks like a Word document/);
  });

  it('a workbook that would unpack beyond the limit (declared sizes)', async () => {
    const rows = Array.from({ length: 3000 }, (_, i) => [`A-${i}`, 1000 + i, 2]);
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { S: [['ID', 'INCOME', 'SIZE'], ...rows] });
    expect((await mustRead(path)).rowCount).toBe(3000);
    const p = await mustRefuse(path, { maxUncompressedBytes: 50_000 });
    expect(p.message).toMatch(/would unpack to .* more than the limit of 48\.8 KB/);
  });

  it('a zip bomb whose directory lies about the size: stopped as soon as a part outgrows its recorded size', async () => {
    const zeros = new Uint8Array(20 * 1024 * 1024);
    const zip = makeZip([
      { name: 'xl/workbook.xml', data: Buffer.from('<workbook><sheets><sheet name="S" sheetId="1" r:id="rId1"/></sheets></workbook>') },
      { name: 'xl/worksheets/sheet1.xml', data: zeros, deflate: true, declaredSize: 1000 },
    ]);
    expect(zip.length).toBeLessThan(100_000);
    const p = await mustRefuse(writeFile(dir, 'bomb.xlsx', zip), { maxUncompressedBytes: 1024 * 1024 });
    expect(p.message).toMatch(/damaged or incomplete/);
    // With honest sizes the same file is refused by the declared total alone.
    const honest = makeZip([{ name: 'xl/workbook.xml', data: Buffer.from('<workbook/>') }, { name: 'xl/worksheets/sheet1.xml', data: zeros, deflate: true }]);
    const q = await mustRefuse(writeFile(dir, 'bomb2.xlsx', honest), { maxUncompressedBytes: 1024 * 1024 });
    expect(q.message).toMatch(/would unpack to 20\.0 MB, more than the limit of 1\.0 MB/);
  });

  it('a sheet with column names but no rows, in a workbook and in a CSV file', async () => {
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { S: [['Title'], [], ['ID', 'INCOME']] });
    expect((await mustRefuse(path)).message).toMatch(/column names are in row 3 .* no rows of data/);
    expect((await mustRefuse(writeFile(dir, uniqueName('.csv'), 'ID,INCOME\r\n'))).message).toMatch(/row 1 .* no rows of data/);
  });

  it('duplicate column names, saying which columns', async () => {
    const path = await writeXlsx(dir, 'dups.xlsx', { S: [['ID', 'Income', 'SIZE', 'INCOME '], ['A', 1, 2, 3]] });
    const p = await mustRefuse(path);
    expect(p.path).toBe('dups.xlsx › S › row 1');
    expect(p.message).toMatch(/columns B and D are both named Income/);
  });

  it('a column with values but no name, saying which column; an empty unnamed column is noted', async () => {
    const p = await mustRefuse(writeFile(dir, uniqueName('.csv'), 'ID,,SIZE\nA,5,1\n'));
    expect(p.message).toMatch(/Column B .* has values but no name in the header row \(row 1\)/);
    const t = await mustRead(writeFile(dir, uniqueName('.csv'), 'ID,,SIZE\nA,,1\n'));
    expect(t.columns.map((c) => c.name)).toEqual(['ID', 'SIZE']);
    expect(t.columns[1]!.letter).toBe('C');
    expect(t.notes.some((n) => n.code === 'empty-unnamed-columns' && n.message.includes('Column B'))).toBe(true);
  });

  it('files that do not exist, folders, empty files and unknown kinds', async () => {
    expect((await mustRefuse(join(dir, 'missing.xlsx'))).message).toMatch(/There is no file missing\.xlsx at/);
    const folder = join(dir, 'folder.csv');
    mkdirSync(folder);
    expect((await mustRefuse(folder)).message).toMatch(/is a folder, not a file/);
    expect((await mustRefuse(writeFile(dir, 'zero.csv', ''))).message).toMatch(/is empty \(0 bytes\)/);
    expect((await mustRefuse(writeFile(dir, 'data.ods', 'x'))).message).toMatch(/reads Excel workbooks \(\.xlsx\) and comma-separated text/);
    expect((await mustRefuse(writeFile(dir, 'text.xlsx', 'ID,INCOME\n1,2\n'))).message).toMatch(/holds plain text.*rename it to end in \.csv/);
    const book = readFileSync(await writeXlsx(dir, uniqueName('.xlsx'), { S: applicants }));
    expect((await mustRefuse(writeFile(dir, 'book.csv', book))).message).toMatch(/Excel workbook saved with a \.csv name/);
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('ID,X\n1,2\n', 'utf16le')]);
    expect((await mustRefuse(writeFile(dir, 'u16.csv', utf16))).message).toMatch(/UTF-16.*CSV UTF-8/);
    expect((await mustRefuse(writeFile(dir, 'bin.csv', new Uint8Array([1, 0, 2, 0, 3])))).message).toMatch(/not a text file/);
  });
});

describe('progress and cancellation', () => {
  const big = () => {
    const lines = ['ID,INCOME,SIZE'];
    for (let i = 0; i < 60_000; i++) lines.push(`A-${i},${1000 + i},${1 + (i % 6)}`);
    return writeFile(dir, uniqueName('.csv'), lines.join('\n') + '\n');
  };

  it('reports rising progress ending at the total', async () => {
    const seen: Array<{ done: number; total: number }> = [];
    const t = await mustRead(big(), { onProgress: (p) => seen.push({ done: p.done, total: p.total }) });
    expect(t.rowCount).toBe(60_000);
    expect(seen.length).toBeGreaterThan(2);
    for (let i = 1; i < seen.length; i++) expect(seen[i]!.done).toBeGreaterThanOrEqual(seen[i - 1]!.done);
    expect(seen[seen.length - 1]!.done).toBe(seen[seen.length - 1]!.total);
  });

  it('stops when cancelled, before or during the import', async () => {
    const path = big();
    const before = new AbortController();
    before.abort();
    expect(await readTable(path, { signal: before.signal })).toEqual({ ok: false, problems: [{ path: path.split('/').pop(), message: IMPORT_CANCELLED }] });
    const during = new AbortController();
    let calls = 0;
    const got = await readTable(path, { signal: during.signal, onProgress: () => { calls++; during.abort(); } });
    expect(calls).toBeGreaterThan(0);
    expect(got.ok).toBe(false);
    if (!got.ok) expect(got.problems[0]!.message).toBe(IMPORT_CANCELLED);
  });

  it('reports progress on a workbook and can be cancelled there too', async () => {
    const rows = Array.from({ length: 5000 }, (_, i) => [`A-${i}`, i, 1]);
    const path = await writeXlsx(dir, uniqueName('.xlsx'), { S: [['ID', 'INCOME', 'SIZE'], ...rows] });
    const seen: number[] = [];
    const t = await mustRead(path, { onProgress: (p) => seen.push(p.done / p.total) });
    expect(t.rowCount).toBe(5000);
    expect(seen[seen.length - 1]).toBe(1);
    const ctl = new AbortController();
    const got = await readTable(path, { signal: ctl.signal, onProgress: () => ctl.abort() });
    expect(got.ok).toBe(false);
  });
});
