// Naming places in the agency's files the way an analyst sees them:
// `applicants.xlsx › Applicants › row 14 › HH_INCOME`. Pure.

import type { RawTable } from './types.ts';

/** Spreadsheet column letters for a 0-based column index: 0 → A, 25 → Z, 26 → AA. */
export function columnLetter(index: number): string {
  let n = index + 1;
  let out = '';
  while (n > 0) {
    const r = (n - 1) % 26;
    out = String.fromCharCode(65 + r) + out;
    n = Math.floor((n - 1) / 26);
  }
  return out;
}

/** `file › sheet › row N › column`, leaving out the parts not given. */
export function placePath(fileName: string, sheet: string | null, row?: number, column?: string): string {
  const parts = [fileName];
  if (sheet !== null && sheet !== '') parts.push(sheet);
  if (row !== undefined) parts.push(`row ${row}`);
  if (column !== undefined) parts.push(column);
  return parts.join(' › ');
}

export function tablePlace(table: RawTable, row?: number, column?: string): string {
  return placePath(table.source.fileName, table.source.sheet, row, column);
}

/** "in sheet Applicants" for workbooks, "in applicants.csv" for CSV files. */
export function whereTable(table: RawTable): string {
  return table.source.sheet !== null
    ? `in sheet ${table.source.sheet} of ${table.source.fileName}`
    : `in ${table.source.fileName}`;
}

/** Up to `max` spreadsheet row numbers, written "12, 40, 41 and 3 more". */
export function listRows(rows: readonly number[], total: number, max = 5): string {
  const shown = rows.slice(0, max).join(', ');
  return total > max ? `${shown} and ${total - max} more` : shown;
}
