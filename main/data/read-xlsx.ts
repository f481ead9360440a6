// Reading one sheet of an .xlsx workbook (ECMA-376 Part 1) row by row into a TableBuilder, with
// the narrow readers of main/data/xlsx/ over node:zlib's streaming inflate of the zip parts.
// The package was already checked by zip-check.ts. The parts are found through the workbook's
// relationships (ECMA-376 Part 2 §9.3): the shared string table (§18.4), the styles (§18.8,
// to know which numbers are dates), workbookPr date1904 (§18.2.28) and the sheet itself.
// tests/data/xlsx-oracle.ts keeps the exceljs streaming reader this replaced, as the oracle of
// the differential tests.

import type { Problem } from '../rules/types.ts';
import { newParsedCell, parseCellText } from './cell-text.ts';
import type { Classify, TableBuilder } from './table-builder.ts';
import { CellKind } from './types.ts';
import { SharedStringsParser } from './xlsx/shared-strings.ts';
import { SheetRowParser, SheetValue, type SheetCell } from './xlsx/sheet-rows.ts';
import { dateStylesOf, usesDate1904 } from './xlsx/styles.ts';
import { XmlDamage } from './xlsx/xml-bytes.ts';
import { partText, streamPart } from './xlsx/zip-part.ts';
import { ZipRefusal, type SheetInfo, type WorkbookInfo, type ZipEntry } from './zip-check.ts';

const MS_PER_DAY = 86_400_000;
const parsed = newParsedCell();

/** A text cell: parsed as people write numbers, dates and booleans (cell-text.ts). */
export function classifyText(text: string, out: Parameters<Classify>[1], wantText: boolean): void {
  parseCellText(text, parsed);
  out.kind = parsed.kind;
  out.value = parsed.value;
  out.raw = text;
  out.text = parsed.keepText || wantText ? text : undefined;
}

function setError(out: Parameters<Classify>[1], code: string): void {
  out.kind = CellKind.Error;
  out.value = Number.NaN;
  out.text = code;
}

/** Cell classifier for the cells of sheet-rows.ts (ECMA-376 Part 1 §18.3.1.4 cell types). */
export const classifySheetCell: Classify = (raw, out, wantText) => {
  out.raw = undefined;
  const cell = raw as SheetCell | undefined;
  switch (cell === undefined || cell === null ? SheetValue.None : cell.type) {
    case SheetValue.Number: {
      const v = cell!.num;
      if (Number.isFinite(v)) {
        out.kind = CellKind.Number;
        out.value = v;
        out.text = wantText ? String(v) : undefined;
      } else setError(out, '#NUM!');
      return;
    }
    case SheetValue.String:
      classifyText(cell!.text, out, wantText);
      return;
    case SheetValue.Date: {
      const ms = cell!.num;
      if (Number.isNaN(ms)) {
        setError(out, '#VALUE!');
        return;
      }
      // A date-formatted serial, as days since 1970-01-01 (serial 25569 in the 1900 system).
      out.kind = CellKind.Date;
      out.value = ms / MS_PER_DAY;
      out.text = wantText ? new Date(ms).toISOString().slice(0, 10) : undefined;
      return;
    }
    case SheetValue.Bool:
      out.kind = CellKind.Bool;
      out.value = cell!.num;
      out.text = wantText ? (cell!.num === 1 ? 'TRUE' : 'FALSE') : undefined;
      return;
    case SheetValue.Error:
      setError(out, cell!.text);
      return;
    case SheetValue.NoResult:
      out.kind = CellKind.NoResult;
      out.value = Number.NaN;
      out.text = wantText ? '' : undefined;
      return;
    default:
      out.kind = CellKind.Blank;
      out.value = Number.NaN;
      out.text = undefined;
  }
};

export interface XlsxReadOptions {
  signal?: AbortSignal;
  /** Progress: bytes of the sheet's XML read so far, of `total`. */
  onBytes?: (done: number, total: number) => void;
}

const UNREADABLE = 'The sheet could not be read: the workbook is damaged or written in a way Fenceline does not understand. Open it in Excel, save it again as .xlsx, and try again.';

/** Relationship targets of the workbook part by type ending (ECMA-376 Part 2 §9.3.2; Part 1 §12.3). */
function relatedPart(relsXml: string, typeEnding: string): string | null {
  for (const m of relsXml.matchAll(/<(?:\w+:)?Relationship\b([^>]*)>/g)) {
    const type = /\bType\s*=\s*["']([^"']*)["']/.exec(m[1]!)?.[1];
    const target = /\bTarget\s*=\s*["']([^"']*)["']/.exec(m[1]!)?.[1];
    if (type !== undefined && target !== undefined && type.endsWith(typeEnding)) {
      return target.startsWith('/') ? target.slice(1) : `xl/${target.replace(/^\.\//, '')}`;
    }
  }
  return null;
}

class Stop extends Error {}

/** Feed the rows of `sheet` to the builder. Returns a problem, or null when done (or cancelled). */
export async function readXlsxRows(
  path: string,
  workbook: WorkbookInfo,
  sheet: SheetInfo,
  builder: TableBuilder,
  place: (row?: number) => string,
  opts: XlsxReadOptions,
): Promise<Problem | null> {
  const { signal } = opts;
  const byName = new Map<string, ZipEntry>(workbook.entries.map((e) => [e.name, e]));
  const sheetEntry = sheet.part === null ? undefined : byName.get(sheet.part);
  if (sheetEntry === undefined) {
    return { path: place(), message: `Sheet ${sheet.name} could not be found inside the workbook file (it is stored in an unusual way). Open the workbook in Excel, save it again as .xlsx, and try again.` };
  }
  try {
    const book = byName.get('xl/workbook.xml');
    const rels = byName.get('xl/_rels/workbook.xml.rels');
    const date1904 = book === undefined ? false : usesDate1904(await partText(path, book, signal));
    const relsXml = rels === undefined ? '' : await partText(path, rels, signal);
    const stylesEntry = byName.get(relatedPart(relsXml, '/styles') ?? 'xl/styles.xml');
    const dateStyles = stylesEntry === undefined ? new Uint8Array(0) : dateStylesOf(await partText(path, stylesEntry, signal));
    let shared: Array<string | null> = [];
    const sstEntry = byName.get(relatedPart(relsXml, '/sharedStrings') ?? 'xl/sharedStrings.xml');
    if (sstEntry !== undefined) {
      const sst = new SharedStringsParser();
      await streamPart(path, sstEntry, (chunk) => sst.feed(chunk), signal);
      shared = sst.finish();
    }
    const rows = new SheetRowParser(shared, dateStyles, date1904, (rowNumber, cells) => {
      builder.addRow(rowNumber, cells, 0);
      if (builder.failed !== null) throw new Stop();
    });
    let done = 0;
    await streamPart(path, sheetEntry, (chunk) => {
      rows.feed(chunk);
      done += chunk.length;
      opts.onBytes?.(done, sheetEntry.uncompressedSize);
      if (signal?.aborted) throw new Stop();
    }, signal);
    rows.finish();
  } catch (err) {
    if (err instanceof Stop || signal?.aborted) return builder.failed;
    if (err instanceof ZipRefusal) return { path: place(), message: err.message };
    if (err instanceof XmlDamage) return { path: place(), message: UNREADABLE };
    throw err;
  }
  return null;
}
