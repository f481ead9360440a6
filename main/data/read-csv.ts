// Reading CSV text (RFC 4180) through csv-parse's streaming parser, row by row into a
// TableBuilder. Quoted fields, doubled quotes, embedded commas and line breaks, CRLF or LF and
// a UTF-8 byte-order mark are csv-parse's job; this module turns its errors into plain words.

import { createReadStream } from 'node:fs';
import { parse, CsvError } from 'csv-parse';
import type { Problem } from '../rules/types.ts';
import { newParsedCell, parseCellText } from './cell-text.ts';
import type { Classify, TableBuilder } from './table-builder.ts';

/** Longest single record accepted; beyond it the file is almost surely not CSV (or a quote is unclosed). */
const MAX_RECORD_BYTES = 16 * 1024 * 1024;

const parsed = newParsedCell();

/** Cell classifier for CSV fields (always strings). */
export const classifyCsvField: Classify = (raw, out, wantText) => {
  const text = typeof raw === 'string' ? raw : '';
  parseCellText(text, parsed);
  out.kind = parsed.kind;
  out.value = parsed.value;
  out.raw = text;
  // Kept as written: RFC 4180 §2 rule 4, spaces are part of a field.
  out.text = parsed.keepText || wantText ? text : undefined;
};

export interface CsvReadOptions {
  delimiter: string;
  encoding: 'utf8' | 'latin1';
  signal?: AbortSignal;
  onBytes?: (bytesRead: number) => void;
}

/** Feed every record of the file to the builder. Returns a problem, or null when all rows were read. */
export async function readCsvRows(
  path: string,
  builder: TableBuilder,
  place: (row?: number) => string,
  opts: CsvReadOptions,
): Promise<Problem | null> {
  const file = createReadStream(path);
  let bytesRead = 0;
  file.on('data', (chunk) => {
    bytesRead += chunk.length;
    opts.onBytes?.(bytesRead);
  });
  const parser = parse({
    bom: true,
    delimiter: opts.delimiter,
    encoding: opts.encoding,
    relax_column_count: true,
    // Lenient where RFC 4180 §2 rule 5 is strict: a stray quote inside an unquoted field
    // (`5" pipe`) is kept as a character, as spreadsheet programs do.
    relax_quotes: true,
    skip_empty_lines: false,
    max_record_size: MAX_RECORD_BYTES,
  });
  file.on('error', (err) => parser.destroy(err));
  file.pipe(parser);
  let row = 0;
  try {
    for await (const record of parser as AsyncIterable<string[]>) {
      row++;
      builder.addRow(row, record, 0);
      if (builder.failed !== null) return builder.failed;
      if ((row & 1023) === 0 && opts.signal?.aborted) return null;
    }
    return null;
  } catch (err) {
    if (err instanceof CsvError) {
      const line = typeof (err as { lines?: unknown }).lines === 'number' ? (err as unknown as { lines: number }).lines : row + 1;
      return { path: place(), message: csvErrorMessage(err.code, line) };
    }
    const code = (err as { code?: unknown }).code;
    if (code === 'ABORT_ERR') return null;
    return { path: place(), message: 'The file could not be read to the end (it may be damaged or still being copied). Ask for the file again or save it again.' };
  } finally {
    file.destroy();
    parser.destroy();
  }
}

function csvErrorMessage(code: string, line: number): string {
  switch (code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return `A value in quotes that starts near line ${line} is never closed (a closing " is missing), so the rows after it cannot be told apart. Fix the quotes, or open the file in Excel and save it again as CSV.`;
    case 'CSV_INVALID_CLOSING_QUOTE':
      return `On line ${line} a value in quotes is followed by other characters before the next comma. Inside quotes, write a quote mark as two ("") — or open the file in Excel and save it again as CSV.`;
    case 'CSV_MAX_RECORD_SIZE':
      return `Line ${line} holds a value longer than ${MAX_RECORD_BYTES / 1024 / 1024} MB; the file is probably not a CSV table, or a quote is left open. Check the file.`;
    default:
      return `The file is not a readable CSV table near line ${line}. Open it in Excel and save it again as CSV (comma separated).`;
  }
}
