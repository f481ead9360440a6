// Writes the invented data files of the sample programs (npx tsx scripts/make-sample-data.ts).
// The files are committed; this script documents and reproduces them. The generators in
// main/sample-data/ are pure and seeded; this script only turns their sheets into files
// (.xlsx through exceljs, .csv per RFC 4180 with CRLF line ends).
import { mkdirSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import ExcelJS from 'exceljs';
import { SAMPLE_PROGRAMS } from '../main/sample-data/samples.ts';
import type { SampleCell, SampleSheet } from '../main/sample-data/sample-sheet.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
/** Fixed document dates, so that a re-run writes the same workbook properties. */
const DOC_DATE = new Date(Date.UTC(2026, 0, 1));
const MAX_BYTES = 1024 * 1024;
const EXCEL_ERROR = /^#(?:N\/A|DIV\/0!|VALUE!|REF!|NAME\?|NUM!|NULL!)$/;

function csvField(v: SampleCell): string {
  if (v === null) return '';
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function toCsv(sheet: SampleSheet): string {
  const lines = [...sheet.titleRows.map((t) => csvField(t)), sheet.header.join(','), ...sheet.rows.map((r) => r.map(csvField).join(','))];
  return lines.join('\r\n') + '\r\n';
}

async function writeWorkbook(path: string, sheet: SampleSheet): Promise<void> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Fenceline sample generator (invented data)';
  wb.created = DOC_DATE;
  wb.modified = DOC_DATE;
  const ws = wb.addWorksheet(sheet.sheet ?? 'Sheet1');
  for (const title of sheet.titleRows) {
    const row = ws.addRow(title === '' ? [] : [title]);
    if (title !== '') row.font = { bold: true };
  }
  ws.addRow(sheet.header).font = { bold: true };
  // A text that is an Excel error code is written as the error value itself, as Excel stores it.
  const cell = (v: SampleCell) => (v === null ? undefined : typeof v === 'string' && EXCEL_ERROR.test(v) ? { error: v } : v);
  for (const r of sheet.rows) ws.addRow(r.map(cell));
  for (const [name, numFmt] of Object.entries(sheet.formats ?? {})) {
    const c = sheet.header.indexOf(name);
    if (c >= 0) ws.getColumn(c + 1).numFmt = numFmt;
  }
  sheet.header.forEach((h, c) => { ws.getColumn(c + 1).width = Math.max(10, h.length + 2); });
  await wb.xlsx.writeFile(path);
}

for (const sample of SAMPLE_PROGRAMS) {
  const files = sample.make();
  mkdirSync(join(root, 'sample-programs', files.folder), { recursive: true });
  for (const sheet of files.sheets) {
    const path = join(root, 'sample-programs', files.folder, sheet.file);
    if (sheet.file.endsWith('.csv')) writeFileSync(path, toCsv(sheet));
    else await writeWorkbook(path, sheet);
    const bytes = statSync(path).size;
    console.log(`${files.folder}/${sheet.file}: ${sheet.rows.length} rows, ${(bytes / 1024).toFixed(0)} KB`);
    if (bytes >= MAX_BYTES) throw new Error(`${files.folder}/${sheet.file} is ${bytes} bytes; keep sample files under 1 MB`);
  }
}
