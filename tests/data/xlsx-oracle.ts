// The oracle of the workbook reader's differential tests: reading one sheet through exceljs's
// streaming WorkbookReader (exceljs 4.4), row by row into a TableBuilder, with the classifier
// of exceljs cell values. This was Fenceline's reader before main/data/read-xlsx.ts replaced it
// with the narrow reader of main/data/xlsx/; the tests require both to give the same table.

import { createReadStream } from 'node:fs';
import ExcelJS from 'exceljs';
import type { Problem } from '../../main/rules/types.ts';
import { classifyText } from '../../main/data/read-xlsx.ts';
import type { Classify, TableBuilder } from '../../main/data/table-builder.ts';
import { CellKind } from '../../main/data/types.ts';

const MS_PER_DAY = 86_400_000;
/** Cell classifier for exceljs cell values (ECMA-376 Part 1 §18.3.1.4 cell types). */
export const classifyXlsxValue: Classify = (raw, out, wantText) => {
  out.raw = undefined;
  if (raw === null || raw === undefined) {
    out.kind = CellKind.Blank;
    out.value = Number.NaN;
    out.text = undefined;
    return;
  }
  if (typeof raw === 'number') {
    if (Number.isFinite(raw)) {
      out.kind = CellKind.Number;
      out.value = raw;
      out.text = wantText ? String(raw) : undefined;
    } else {
      out.kind = CellKind.Error;
      out.value = Number.NaN;
      out.text = '#NUM!';
    }
    return;
  }
  if (typeof raw === 'string') {
    classifyText(raw, out, wantText);
    return;
  }
  if (typeof raw === 'boolean') {
    out.kind = CellKind.Bool;
    out.value = raw ? 1 : 0;
    out.text = wantText ? (raw ? 'TRUE' : 'FALSE') : undefined;
    return;
  }
  if (raw instanceof Date) {
    const ms = raw.getTime();
    if (Number.isFinite(ms)) {
      // exceljs turns a date-formatted serial into a Date (serial 25569 = 1970-01-01).
      out.kind = CellKind.Date;
      out.value = ms / MS_PER_DAY;
      out.text = wantText ? raw.toISOString().slice(0, 10) : undefined;
    } else {
      out.kind = CellKind.Error;
      out.value = Number.NaN;
      out.text = '#VALUE!';
    }
    return;
  }
  if (typeof raw === 'object') {
    const v = raw as Record<string, unknown>;
    if (typeof v.error === 'string') {
      out.kind = CellKind.Error;
      out.value = Number.NaN;
      out.text = v.error;
      return;
    }
    if ('formula' in v || 'sharedFormula' in v) {
      const result = v.result;
      if (result === undefined || result === null) {
        out.kind = CellKind.NoResult;
        out.value = Number.NaN;
        out.text = wantText ? '' : undefined;
        return;
      }
      if (typeof result === 'number' && Number.isNaN(result)) {
        // exceljs reads a formula's saved error (#N/A ...) as NaN.
        out.kind = CellKind.Error;
        out.value = Number.NaN;
        out.text = '#N/A';
        return;
      }
      classifyXlsxValue(result, out, wantText);
      return;
    }
    if (Array.isArray(v.richText)) {
      const text = (v.richText as Array<{ text?: unknown }>).map((r) => (typeof r.text === 'string' ? r.text : '')).join('');
      classifyText(text, out, wantText);
      return;
    }
    if (typeof v.text === 'string') {
      classifyText(v.text, out, wantText);
      return;
    }
  }
  classifyText(String(raw), out, wantText);
};

export interface XlsxReadOptions {
  signal?: AbortSignal;
  onRow?: (rowNumber: number) => void;
}

/** Feed the rows of sheet `sheetName` to the builder. Returns a problem, or null when done. */
export async function readXlsxRows(
  path: string,
  sheetName: string,
  builder: TableBuilder,
  place: (row?: number) => string,
  opts: XlsxReadOptions,
): Promise<Problem | null> {
  const file = createReadStream(path);
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(file, {
    worksheets: 'emit',
    sharedStrings: 'cache',
    // Styles are needed to tell date-formatted numbers from plain ones.
    styles: 'cache',
    hyperlinks: 'ignore',
    entries: 'ignore',
  });
  let found = false;
  let count = 0;
  try {
    for await (const worksheet of reader) {
      const name = (worksheet as unknown as { name?: unknown }).name;
      // Every sheet is read to its end: exceljs removes the temporary copy of a sheet (made when
      // the sheet comes before the shared strings in the zip) once the loop moves on, and a
      // sheet left unread would then fail to open it.
      if (name !== sheetName || found) {
        for await (const _row of worksheet) { /* drained */ }
        continue;
      }
      found = true;
      for await (const row of worksheet) {
        if (builder.failed !== null || opts.signal?.aborted) continue;
        builder.addRow(row.number, row.values as unknown[], 1);
        count++;
        if ((count & 1023) === 0) opts.onRow?.(row.number);
      }
      if (builder.failed !== null) return builder.failed;
      if (opts.signal?.aborted) return null;
    }
  } catch {
    return { path: place(), message: 'The sheet could not be read: the workbook is damaged or written in a way Fenceline does not understand. Open it in Excel, save it again as .xlsx, and try again.' };
  } finally {
    file.destroy();
  }
  if (!found) {
    return { path: place(), message: `Sheet ${sheetName} could not be found inside the workbook file (it is stored in an unusual way). Open the workbook in Excel, save it again as .xlsx, and try again.` };
  }
  return null;
}
