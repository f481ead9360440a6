// The narrow workbook reader (main/data/read-xlsx.ts over main/data/xlsx/) against exceljs 4.4's
// streaming reader, the general-purpose library Fenceline read workbooks with before
// (tests/data/xlsx-oracle.ts): random workbooks written by exceljs must give identical tables
// (header, row numbers, every cell's kind, number and text, notes) through both. One known
// difference is by design: exceljs's reader loses a formula's saved value when it is 0, FALSE or
// empty text and reads saved booleans and errors as numbers, while ECMA-376 Part 1 §18.3.1.4/96
// makes v the cell's value, of type t, formula or not. So formula cells are compared with a twin
// workbook where each formula with a saved value holds that value plainly. Then hand-written
// sheets exceljs does not write, checked against ECMA-376 Part 1 directly.

import { statSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import ExcelJS from 'exceljs';
import { readTable } from '../../main/data/read-table.ts';
import { classifySheetCell, readXlsxRows } from '../../main/data/read-xlsx.ts';
import { TableBuilder } from '../../main/data/table-builder.ts';
import { CellKind } from '../../main/data/types.ts';
import { isDateFormatCode } from '../../main/data/xlsx/styles.ts';
import { floatAt, intAt } from '../../main/data/xlsx/xml-bytes.ts';
import { inspectWorkbookZip } from '../../main/data/zip-check.ts';
import { makeZip, tempDir, uniqueName, writeFile } from './helpers.ts';
import { classifyXlsxValue, readXlsxRows as readWithExceljs } from './xlsx-oracle.ts';

const dir = tempDir();
const place = (row?: number) => (row === undefined ? 'sheet' : `sheet › row ${row}`);

async function tableOf(path: string, sheetName: string, reader: 'narrow' | 'exceljs', headerRow?: number, where = 'in the sheet') {
  if (reader === 'exceljs') {
    const builder = new TableBuilder(classifyXlsxValue, place, where, headerRow);
    const problem = await readWithExceljs(path, sheetName, builder, place, {});
    return problem ?? builder.finish();
  }
  const info = await inspectWorkbookZip(path, statSync(path).size, 2 ** 31);
  const sheet = info.sheets.find((s) => s.name === sheetName)!;
  const builder = new TableBuilder(classifySheetCell, place, where, headerRow);
  const problem = await readXlsxRows(path, info, sheet, builder, place, {});
  return problem ?? builder.finish();
}

// ---- random workbooks written by exceljs -------------------------------------------------

// Text with XML's special characters, non-ASCII letters, spaces and line breaks. No ';': exceljs's
// reader decodes entities a second time in t="str" text ("&amp;lt;" read as "<"), so text that
// looks like an entity is left to the hand-written cases below.
const text = fc.string({ unit: fc.constantFrom('a', 'Z', '7', '0', ' ', '<', '>', '&', '"', "'", 'é', 'ß', '中', '😀', '\n', '-', '.', ',', '$', '#'), maxLength: 12 });
const number = fc.oneof(
  fc.integer({ min: -1_000_000, max: 1_000_000 }),
  fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }),
  fc.constantFrom(1e300, -1e300, 1e-300, 5e-324, 2 ** 53, 0.1, -0.5, 123456789012345.6),
  // decimals with few digits, as typed into a sheet (the reader's fast path)
  fc.tuple(fc.integer({ min: -1e9, max: 1e9 }), fc.integer({ min: 1, max: 6 })).map(([m, k]) => m / 10 ** k),
);
const DATE_FORMATS = ['yyyy-mm-dd', 'dd/mm/yyyy', 'mm-dd-yy', 'd-mmm-yy', 'yyyy-mm-dd hh:mm:ss', 'h:mm', '[h]:mm:ss', 'mmm yyyy'];
const OTHER_FORMATS = ['0.00', '#,##0', '0%', '"Days:" 0', '[Red]0.0', '@'];
const date = fc.date({ min: new Date(Date.UTC(1900, 2, 1)), max: new Date(Date.UTC(2200, 0, 1)), noInvalidDate: true });
const errorCode = fc.constantFrom('#N/A', '#DIV/0!', '#VALUE!', '#REF!', '#NAME?', '#NUM!', '#NULL!');
const scalar = fc.oneof(number, text, fc.boolean(), date);
type Cell = { value: ExcelJS.CellValue; numFmt?: string } | undefined;
const cell: fc.Arbitrary<Cell> = fc.oneof(
  { weight: 3, arbitrary: fc.constant(undefined) },
  { weight: 4, arbitrary: number.map((value) => ({ value })) },
  { weight: 3, arbitrary: text.map((value) => ({ value })) },
  { weight: 1, arbitrary: fc.constantFrom('00123', '$1,234.50', '2024-03-05', '(12)', 'TRUE', ' 42 ', '1 234,5').map((value) => ({ value })) },
  { weight: 2, arbitrary: fc.tuple(date, fc.constantFrom(...DATE_FORMATS)).map(([value, numFmt]) => ({ value, numFmt })) },
  { weight: 1, arbitrary: fc.tuple(number, fc.constantFrom(...DATE_FORMATS, ...OTHER_FORMATS)).map(([value, numFmt]) => ({ value, numFmt })) },
  { weight: 1, arbitrary: fc.boolean().map((value) => ({ value })) },
  { weight: 1, arbitrary: errorCode.map((error) => ({ value: { error } as ExcelJS.CellErrorValue })) },
  { weight: 1, arbitrary: fc.array(text, { minLength: 1, maxLength: 3 }).map((parts) => ({ value: { richText: parts.map((t, i) => ({ text: t, ...(i % 2 === 1 ? { font: { bold: true } } : {}) })) } })) },
  { weight: 2, arbitrary: fc.option(fc.oneof(scalar, errorCode.map((error) => ({ error }))), { nil: undefined }).map((result) => ({ value: { formula: 'SUM(A1:A2)', ...(result === undefined ? {} : { result }) } as ExcelJS.CellValue })) },
);
const sheet: fc.Arbitrary<SheetSpec> = fc.record({
  titleRows: fc.integer({ min: 0, max: 2 }),
  firstColumn: fc.integer({ min: 1, max: 3 }),
  names: fc.uniqueArray(fc.stringMatching(/^[A-Z][A-Z_]{0,5}$/), { minLength: 1, maxLength: 6, comparator: (a, b) => a.toLowerCase() === b.toLowerCase() }),
  rows: fc.array(fc.tuple(fc.integer({ min: 1, max: 3 }), fc.array(cell, { maxLength: 8 })), { maxLength: 25 }),
});
const workbook: fc.Arbitrary<WorkbookSpec> = fc.record({
  sheets: fc.array(fc.option(sheet, { nil: null, freq: 6 }), { minLength: 1, maxLength: 3 }),
  date1904: fc.boolean(),
  sharedStrings: fc.boolean(),
});

interface SheetSpec { titleRows: number; firstColumn: number; names: string[]; rows: Array<[number, Cell[]]> }
interface WorkbookSpec { sheets: Array<SheetSpec | null>; date1904: boolean; sharedStrings: boolean }

/** Write the workbook: the in-memory writer (shared strings) or the streaming one (t="str" text, no rich text). */
async function writeWorkbook(spec: WorkbookSpec, formulasAsValues = false): Promise<string> {
  const path = `${dir}/${uniqueName('.xlsx')}`;
  const fill = (ws: ExcelJS.Worksheet, s: WorkbookSpec['sheets'][number], streaming: boolean) => {
    if (s === null) return;
    let r = 1;
    for (let k = 0; k < s.titleRows; k++) {
      if (k === 0) ws.getRow(r).getCell(1).value = 'Applicants of the invented program';
      ws.getRow(r).commit();
      r++;
    }
    const header = ws.getRow(r);
    s.names.forEach((n, c) => { header.getCell(s.firstColumn + c).value = n; });
    header.commit();
    for (const [step, cells] of s.rows) {
      r += step;
      const row = ws.getRow(r);
      cells.forEach((v, c) => {
        if (v === undefined) return;
        let value = v.value;
        if (streaming && value !== null && typeof value === 'object' && 'richText' in value) value = value.richText.map((p) => p.text).join('');
        if (formulasAsValues && value !== null && typeof value === 'object' && 'formula' in value && value.result !== undefined) value = value.result as ExcelJS.CellValue;
        const target = row.getCell(s.firstColumn + c);
        target.value = value;
        if (v.numFmt !== undefined) target.numFmt = v.numFmt;
      });
      row.commit();
    }
  };
  if (spec.sharedStrings) {
    const wb = new ExcelJS.Workbook();
    wb.properties.date1904 = spec.date1904;
    spec.sheets.forEach((s, i) => fill(wb.addWorksheet(`Sheet ${i + 1}`), s, false));
    await wb.xlsx.writeFile(path);
  } else {
    const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: path, useSharedStrings: false, useStyles: true });
    spec.sheets.forEach((s, i) => {
      const ws = wb.addWorksheet(`Sheet ${i + 1}`);
      fill(ws, s, true);
      ws.commit();
    });
    await wb.commit();
  }
  return path;
}

describe('the narrow reader gives the tables the exceljs reader gives', () => {
  it('on random workbooks written by exceljs (numbers, dates, text, rich text, booleans, errors, formulas, sparse rows and columns, title rows, empty and several sheets, 1900 and 1904 dates)', async () => {
    let compared = 0;
    let tables = 0;
    let oracleFailed = 0;
    await fc.assert(fc.asyncProperty(workbook, async (spec) => {
      const path = await writeWorkbook(spec);
      const twin = await writeWorkbook(spec, true);
      for (let i = 0; i < spec.sheets.length; i++) {
        const name = `Sheet ${i + 1}`;
        const s = spec.sheets[i]!;
        const headerRows: Array<number | undefined> = [undefined];
        if (s !== null) headerRows.push(s.titleRows + 1);
        for (const headerRow of headerRows) {
          const ours = await tableOf(path, name, 'narrow', headerRow);
          const theirs = await tableOf(twin, name, 'exceljs', headerRow);
          if ('message' in theirs && /could not be found|could not be read/.test(theirs.message)) {
            // exceljs's own limits (e.g. it names sheets by part number, so it loses a sheet of
            // its streaming writer when an earlier one is empty): nothing to compare with.
            oracleFailed++;
            continue;
          }
          expect(ours).toEqual(theirs);
          expect(await tableOf(twin, name, 'narrow', headerRow)).toEqual(theirs);
          compared++;
          if ('ok' in ours && ours.ok) tables++;
        }
      }
    }), { numRuns: Number(process.env.XLSX_FUZZ_RUNS ?? 40), seed: Number(process.env.XLSX_FUZZ_SEED ?? 1904), endOnFailure: true });
    // The property compared real tables, not only refusals.
    expect(tables).toBeGreaterThan(compared / 3);
    expect(oracleFailed).toBeLessThan(compared / 5);
  }, 300_000);

  it('through readTable: the same table, notes and file facts as before', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Applicants');
    ws.addRow(['Winter credit, invented applicants']);
    ws.addRow([]);
    ws.addRow(['ID', 'INCOME', 'APPLIED', 'NOTE']);
    ws.getColumn(3).numFmt = 'yyyy-mm-dd';
    for (let i = 0; i < 50; i++) ws.addRow([`A-${String(i).padStart(4, '0')}`, i % 7 === 0 ? '$1,200' : 1000 + i * 13.5, new Date(Date.UTC(2025, 0, 1 + i)), i % 9 === 0 ? 'called' : null]);
    ws.addRow([]);
    ws.addRow(['A-9999', 5, new Date(Date.UTC(2025, 5, 1)), null, 'stray']);
    const path = `${dir}/${uniqueName('.xlsx')}`;
    await wb.xlsx.writeFile(path);
    const got = await readTable(path);
    if (!got.ok) throw new Error(got.problems[0]!.message);
    const theirs = await tableOf(path, 'Applicants', 'exceljs', undefined, `in sheet Applicants of ${path.split('/').pop()}`);
    if (!('ok' in theirs) || !theirs.ok) throw new Error('the oracle refused the workbook');
    expect({ headerRow: got.value.headerRow, rowCount: got.value.rowCount, rowNumbers: got.value.rowNumbers, columns: got.value.columns, notes: got.value.notes }).toEqual(theirs.value);
    expect(got.value.rowNumbers[0]).toBe(4);
    expect(got.value.columns[2]!.kinds[0]).toBe(CellKind.Date);
    expect(got.value.columns[2]!.numbers[0]).toBe(Date.UTC(2025, 0, 1) / 86_400_000);
  });
});

// ---- hand-written sheets -------------------------------------------------------------------

const NS = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"';
const REL = 'http://schemas.openxmlformats.org/officeDocument/2006/relationships';

function parts(sheetXml: string, extra: { sharedStrings?: string; styles?: string; workbookPr?: string } = {}) {
  const enc = (s: string) => new Uint8Array(Buffer.from(s, 'utf8'));
  const rels = [`<Relationship Id="rId1" Type="${REL}/worksheet" Target="worksheets/sheet1.xml"/>`];
  if (extra.sharedStrings !== undefined) rels.push(`<Relationship Id="rId2" Type="${REL}/sharedStrings" Target="sharedStrings.xml"/>`);
  if (extra.styles !== undefined) rels.push(`<Relationship Id="rId3" Type="${REL}/styles" Target="styles.xml"/>`);
  const list = [
    { name: '[Content_Types].xml', data: enc('<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"/>') },
    { name: '_rels/.rels', data: enc(`<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="${REL}/officeDocument" Target="xl/workbook.xml"/></Relationships>`) },
    { name: 'xl/workbook.xml', data: enc(`<?xml version="1.0" encoding="UTF-8"?><workbook ${NS} xmlns:r="${REL}">${extra.workbookPr ?? ''}<sheets><sheet name="Data" sheetId="1" r:id="rId1"/></sheets></workbook>`) },
    { name: 'xl/_rels/workbook.xml.rels', data: enc(`<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">${rels.join('')}</Relationships>`) },
    { name: 'xl/worksheets/sheet1.xml', data: enc(`<?xml version="1.0" encoding="UTF-8"?>\n<worksheet ${NS}>${sheetXml}</worksheet>`), deflate: true },
  ];
  if (extra.sharedStrings !== undefined) list.push({ name: 'xl/sharedStrings.xml', data: enc(`<?xml version="1.0" encoding="UTF-8"?><sst ${NS}>${extra.sharedStrings}</sst>`) });
  if (extra.styles !== undefined) list.push({ name: 'xl/styles.xml', data: enc(`<?xml version="1.0" encoding="UTF-8"?><styleSheet ${NS}>${extra.styles}</styleSheet>`) });
  return writeFile(dir, uniqueName('.xlsx'), makeZip(list));
}

async function read(path: string) {
  const got = await readTable(path);
  if (!got.ok) throw new Error(got.problems.map((p) => p.message).join(' | '));
  return got.value;
}

const STYLES = '<numFmts count="1"><numFmt numFmtId="164" formatCode="dd/mm/yyyy;[Red]&quot;neg&quot;"/></numFmts>'
  + '<cellXfs count="4"><xf numFmtId="0"/><xf numFmtId="14" applyNumberFormat="1"/><xf numFmtId="164"/><xf numFmtId="4"/></cellXfs>';

describe('numbers read from the bytes', () => {
  it('floatAt and intAt give what parseFloat and parseInt give (the reference), -0 included', () => {
    const digits = fc.string({ unit: fc.constantFrom('0', '1', '2', '3', '4', '5', '6', '7', '8', '9'), minLength: 0, maxLength: 18 });
    const written = fc.tuple(fc.constantFrom('', '-', '+'), digits, fc.option(digits, { nil: undefined }), fc.constantFrom('', 'e5', 'E-3', ' '))
      .map(([sign, whole, fraction, tail]) => `${sign}${whole}${fraction === undefined ? '' : `.${fraction}`}${tail}`);
    fc.assert(fc.property(written, (t) => {
      const b = Buffer.from(`<v>${t}</v>`, 'latin1');
      expect(Object.is(floatAt(b, 3, 3 + t.length), Number.parseFloat(t))).toBe(true);
      expect(Object.is(intAt(b, 3, 3 + t.length), Number.parseInt(t, 10))).toBe(true);
    }), { numRuns: 5000, seed: 1990 });
  });
});

describe('hand-written sheets (ECMA-376 Part 1 §18.3.1)', () => {
  it('rows and cells without r attributes follow the previous ones (§18.3.1.73, §18.3.1.4: r is optional)', async () => {
    const path = parts('<sheetData><row><c t="inlineStr"><is><t>ID</t></is></c><c t="inlineStr"><is><t>INCOME</t></is></c></row>'
      + '<row><c t="inlineStr"><is><t>A1</t></is></c><c><v>1200</v></c></row>'
      + '<row r="5"><c r="B5"><v>7</v></c></row><row><c><v>3</v></c><c><v>4</v></c></row></sheetData>');
    const t = await read(path);
    expect(t.headerRow).toBe(1);
    expect([...t.rowNumbers]).toEqual([2, 5, 6]);
    expect(t.columns[0]!.texts).toEqual(['A1', undefined, undefined]);
    expect([...t.columns[0]!.numbers]).toEqual([Number.NaN, Number.NaN, 3]);
    expect([...t.columns[1]!.numbers]).toEqual([1200, 7, 4]);
    // exceljs cannot place such cells: its reader fails on the sheet.
    const theirs = await tableOf(path, 'Data', 'exceljs');
    expect('message' in theirs && theirs.message).toMatch(/could not be read/);
  });

  it('t="str" and t="inlineStr" text, rich runs joined and phonetic runs left out (§18.3.1.53, §18.4.4, §18.4.6), decoded once', async () => {
    const path = parts('<sheetData><row r="1"><c r="A1" t="str"><v>NAME</v></c><c r="B1" t="inlineStr"><is><t>CITY</t></is></c></row>'
      + '<row r="2"><c r="A2" t="str"><v>a &amp;lt; b</v></c><c r="B2" t="inlineStr"><is><r><t>Ky</t></r><r><rPr><b/></rPr><t xml:space="preserve">ōto </t></r><rPh sb="0" eb="2"><t>キョウト</t></rPh></is></c></row>'
      + '<row r="3"><c r="A3" t="str"><v><![CDATA[x<y & z]]></v></c><c r="B3" t="inlineStr"><is><t>line&#10;two</t></is></c></row></sheetData>');
    const t = await read(path);
    expect(t.columns[0]!.texts).toEqual(['a &lt; b', 'x<y & z']);
    expect(t.columns[1]!.texts).toEqual(['Kyōto ', 'line\ntwo']);
  });

  it('shared strings: plain, rich and phonetic items (§18.4.8 si)', async () => {
    const path = parts('<sheetData><row r="1"><c r="A1" t="s"><v>0</v></c></row><row r="2"><c r="A2" t="s"><v>1</v></c></row><row r="3"><c r="A3" t="s"><v>2</v></c></row><row r="4"><c r="A4" t="s"><v>9</v></c></row></sheetData>',
      { sharedStrings: '<si><t>CITY</t></si><si><r><t>Ky</t></r><r><t>ōto</t></r><rPh sb="0" eb="2"><t>キョウト</t></rPh></si><si><t>Ōsaka</t><rPh sb="0" eb="2"><t>オオサカ</t></rPh></si>' });
    const t = await read(path);
    expect(t.columns[0]!.texts).toEqual(['Kyōto', 'Ōsaka']);
    expect(t.rowCount).toBe(2); // the index beyond the table is an empty cell, as exceljs reads it
  });

  it('date styles: built-in id 14 and a custom code are dates, #,##0.00 is not; the 1900 and 1904 systems (§18.2.28 date1904)', async () => {
    const sheetXml = '<sheetData><row r="1"><c r="A1" t="inlineStr"><is><t>D14</t></is></c><c r="B1" t="inlineStr"><is><t>DCUSTOM</t></is></c><c r="C1" t="inlineStr"><is><t>AMOUNT</t></is></c><c r="D1" t="inlineStr"><is><t>PLAIN</t></is></c></row>'
      + '<row r="2"><c r="A2" s="1"><v>45292</v></c><c r="B2" s="2"><v>45292.5</v></c><c r="C2" s="3"><v>45292</v></c><c r="D2"><v>45292</v></c></row></sheetData>';
    const in1900 = await read(parts(sheetXml, { styles: STYLES }));
    // Serial 45292 is 2024-01-01 in the 1900 system (25569 is 1970-01-01): 19723 days since 1970.
    expect(in1900.columns.map((c) => c.kinds[0])).toEqual([CellKind.Date, CellKind.Date, CellKind.Number, CellKind.Number]);
    expect([...in1900.columns.map((c) => c.numbers[0])]).toEqual([19723, 19723.5, 45292, 45292]);
    const in1904 = await read(parts(sheetXml, { styles: STYLES, workbookPr: '<workbookPr date1904="1"/>' }));
    // The 1904 system counts from 1904-01-01: the same serial is 1462 days later.
    expect([...in1904.columns.map((c) => c.numbers[0])]).toEqual([19723 + 1462, 19723.5 + 1462, 45292, 45292]);
    const inTrue = await read(parts(sheetXml, { styles: STYLES, workbookPr: '<workbookPr date1904="true"/>' }));
    expect(inTrue.columns[0]!.numbers[0]).toBe(19723 + 1462);
  });

  it('date format codes: d, m, y, h, s outside quotes, brackets and escapes', () => {
    for (const code of ['yyyy-mm-dd', 'd-mmm', '[h]:mm:ss', 'mm:ss', '[$-409]mmmm d, yyyy', 'dd/mm/yyyy;[Red]"neg"']) expect(isDateFormatCode(code)).toBe(true);
    for (const code of ['0.00', '#,##0', '"Days:" 0', '[Red]0.0', '0.0\\h', '@', 'General', '0.00E+00', '#,##0 "km/h"']) expect(isDateFormatCode(code)).toBe(false);
  });

  it('booleans, errors, formulas with and without results, prefixed element names', async () => {
    const sheetXml = '<sheetData><row r="1"><c r="A1" t="inlineStr"><is><t>B</t></is></c><c r="B1" t="inlineStr"><is><t>E</t></is></c><c r="C1" t="inlineStr"><is><t>F</t></is></c></row>'
      + '<row r="2"><c r="A2" t="b"><v>1</v></c><c r="B2" t="e"><v>#DIV/0!</v></c><c r="C2"><f>1+1</f><v>2</v></c></row>'
      + '<row r="3"><c r="A3" t="b"><v>0</v></c><c r="B3" t="e"><v>#N/A</v></c><c r="C3"><f>A1</f></c></row></sheetData>';
    const prefixed = (await read(parts(sheetXml.replace(/<(\/?)(sheetData|row|c|v|f|is|t)\b/g, '<$1x:$2')))).columns;
    expect([...prefixed[0]!.kinds]).toEqual([CellKind.Bool, CellKind.Bool]);
    expect([...prefixed[0]!.numbers]).toEqual([1, 0]);
    expect(prefixed[1]!.texts).toEqual(['#DIV/0!', '#N/A']);
    expect([...prefixed[2]!.kinds]).toEqual([CellKind.Number, CellKind.NoResult]);
  });

  it('a sheet cut short inside an intact zip is refused as damaged', async () => {
    const whole = '<sheetData><row r="1"><c r="A1" t="inlineStr"><is><t>ID</t></is></c></row><row r="2"><c r="A2"><v>1</v></c></row></sheetData>';
    for (const cut of [whole.slice(0, 60), whole.slice(0, whole.length - 14), whole.slice(0, whole.indexOf('<v>') + 2)]) {
      const got = await readTable(parts(cut));
      expect(got.ok).toBe(false);
      if (!got.ok) expect(got.problems[0]!.message).toMatch(/could not be read|damaged/);
    }
  });
});
