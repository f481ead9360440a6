// Document → workbook (exceljs): a first sheet "About" with the title block, provenance lines, the
// small-cell legend and a list of the sheets; then one sheet per table, numbers stored as numbers
// with the same number format the memo prints (excelNumberFormat), hidden counts stored as their
// mark ("≤10", "—") and never as a value, footnotes as cell notes. Dates come from the document and
// ZIP entry times are fixed (zip-dates.ts).

import ExcelJS from 'exceljs';
import type { Document, Table } from '../model/document.ts';
import {
  DEFAULT_NUMBER_FORMAT, assertRenderable, captionNumbers, cellText, excelNumberFormat, numberedFootnotes, runsText,
  tableLegend, tables,
} from '../model/format.ts';
import type { RenderOptions } from './options.ts';
import { setZipEntryDates } from './zip-dates.ts';
import { neutralizeText } from '../../output/cell-safety.ts';

/** Excel refuses sheet names over 31 characters or with any of : \ / ? * [ ] (ECMA-376 Part 1, §18.2.19). */
export function sheetNameFor(wanted: string, taken: Set<string>): string {
  const clean = wanted.replace(/[:\\/?*[\]]/g, ' ').replace(/\s+/g, ' ').trim().replace(/^'+|'+$/g, '') || 'Table';
  let base = clean.slice(0, 31).trim();
  let name = base;
  for (let k = 2; taken.has(name.toLowerCase()); k++) {
    const suffix = ` (${k})`;
    base = clean.slice(0, 31 - suffix.length).trim();
    name = base + suffix;
  }
  taken.add(name.toLowerCase());
  return name;
}

function tableSheet(wb: ExcelJS.Workbook, doc: Document, t: Table, name: string, label: string, fnText: Map<string, string>): void {
  const ws = wb.addWorksheet(name, { views: [{ state: 'frozen', ySplit: 3 }] });
  ws.getCell(1, 1).value = `${label}. ${t.caption}`;
  ws.getCell(1, 1).font = { bold: true, size: 12 };
  const headerRow = ws.getRow(3);
  t.columns.forEach((c, i) => {
    const cell = headerRow.getCell(i + 1);
    cell.value = c.header;
    cell.font = { bold: true };
    cell.alignment = { horizontal: c.align, vertical: 'top', wrapText: true };
    cell.fill = { type: 'pattern', pattern: 'solid', fgColor: { argb: 'FFECECEC' } };
    cell.border = { bottom: { style: 'medium', color: { argb: 'FF1A1A1A' } } };
  });
  const widths = t.columns.map((c) => Math.max(8, c.header.length + 2));
  t.rows.forEach((row, r) => {
    const xrow = ws.getRow(4 + r);
    row.cells.forEach((c, i) => {
      const col = t.columns[i]!;
      const cell = xrow.getCell(i + 1);
      switch (c.kind) {
        case 'number':
          cell.value = c.value;
          cell.numFmt = excelNumberFormat(c.format ?? col.format ?? DEFAULT_NUMBER_FORMAT);
          break;
        case 'text': cell.value = c.text; break;
        case 'suppressed': cell.value = cellText(c, col, doc.suppression); break;
        case 'empty': break;
      }
      if ((c.kind === 'text' || c.kind === 'number') && c.footnote && fnText.has(c.footnote)) cell.note = fnText.get(c.footnote)!;
      cell.alignment = { horizontal: col.align, vertical: 'top' };
      if (row.emphasis === 'total') {
        cell.font = { bold: true };
        cell.border = { top: { style: 'thin', color: { argb: 'FF1A1A1A' } } };
      }
      widths[i] = Math.max(widths[i]!, Math.min(60, cellText(c, col, doc.suppression).length + 2));
    });
  });
  widths.forEach((w, i) => { ws.getColumn(i + 1).width = w; });
  let y = 4 + t.rows.length + 1;
  for (const n of t.notes ?? []) { ws.getCell(y++, 1).value = runsText(n, doc.suppression); }
  for (const line of tableLegend(t, doc.suppression)) { ws.getCell(y++, 1).value = line; }
}

export async function renderXlsx(doc: Document, _opts: RenderOptions = {}): Promise<Buffer> {
  assertRenderable(doc);
  const tb = doc.title;
  const created = new Date(tb.createdAt);
  if (Number.isNaN(created.getTime())) throw new Error(`The memo's creation date "${tb.createdAt}" is not an ISO date.`);
  const wb = new ExcelJS.Workbook();
  wb.creator = tb.author ?? 'Fenceline';
  wb.lastModifiedBy = tb.author ?? 'Fenceline';
  wb.created = created;
  wb.modified = created;
  wb.title = tb.title;
  if (tb.subtitle) wb.subject = tb.subtitle;

  const fnText = new Map<string, string>();
  for (const n of numberedFootnotes(doc)) fnText.set(n.id, `${n.number}. ${runsText(n.body, doc.suppression)}`);

  const taken = new Set<string>(['about']);
  const captions = captionNumbers(doc);
  const list = tables(doc).map((t) => ({ t, name: sheetNameFor(t.sheetName ?? t.caption, taken), label: captions.get(t.id) ?? 'Table' }));

  const about = wb.addWorksheet('About');
  const lines: Array<[string, Partial<ExcelJS.Font>?]> = [
    [tb.title, { bold: true, size: 14 }],
    ...(tb.subtitle ? [[tb.subtitle] as [string]] : []),
    [tb.dateLine, { bold: true }],
    [''],
    ['Provenance', { bold: true }],
    ...tb.provenance.map((p) => [p] as [string]),
    [''],
    ['Small counts', { bold: true }],
    [doc.suppression.smallLegend],
    ...(doc.suppression.derivedLegend ? [[doc.suppression.derivedLegend] as [string]] : []),
    [''],
    ['Sheets', { bold: true }],
  ];
  let y = 1;
  for (const [text, font] of lines) {
    const cell = about.getCell(y++, 1);
    cell.value = text;
    if (font) cell.font = font;
  }
  for (const { t, name, label } of list) {
    about.getCell(y, 1).value = name;
    about.getCell(y, 2).value = `${label}. ${t.caption}`;
    y++;
  }
  const notes = numberedFootnotes(doc);
  if (notes.length) {
    y++;
    about.getCell(y++, 1).value = 'Notes';
    about.getCell(y - 1, 1).font = { bold: true };
    for (const n of notes) about.getCell(y++, 1).value = fnText.get(n.id)!;
  }
  about.getColumn(1).width = 40;
  about.getColumn(2).width = 80;

  for (const { t, name, label } of list) tableSheet(wb, doc, t, name, label, fnText);

  // Text that a spreadsheet would take for a formula is written as text (OWASP, "CSV Injection").
  wb.eachSheet((ws) => ws.eachRow((row) => row.eachCell((cell) => { if (typeof cell.value === 'string') cell.value = neutralizeText(cell.value); })));
  const out = Buffer.from(await wb.xlsx.writeBuffer());
  return setZipEntryDates(out, tb.createdAt);
}
