// Finding a study's column among a table's headers, forgiving case and surrounding spaces,
// and saying which header is closest when there is none. Pure.

import { closestName } from './similar.ts';
import { whereTable } from './locate.ts';
import { CellKind, type RawColumn, type RawTable } from './types.ts';

export interface FoundColumn {
  index: number;
  /** True when the match needed case or space forgiveness (worth a note). */
  loose: boolean;
}

export function findColumn(table: RawTable, name: string): FoundColumn | null {
  const exact = table.columns.findIndex((c) => c.name === name);
  if (exact >= 0) return { index: exact, loose: false };
  const wanted = name.trim().toLowerCase();
  const loose = table.columns.findIndex((c) => c.name.trim().toLowerCase() === wanted);
  return loose >= 0 ? { index: loose, loose: true } : null;
}

/** "No column HH_INCOM in sheet Applicants of applicants.xlsx; did you mean HH_INCOME?" */
export function missingColumnMessage(name: string, table: RawTable, others: readonly RawTable[] = []): string {
  const where = whereTable(table);
  const near = closestName(name, table.columns.map((c) => c.name));
  if (near !== null) return `No column ${name} ${where}; did you mean ${near}?`;
  for (const other of others) {
    const nearOther = closestName(name, other.columns.map((c) => c.name));
    if (nearOther !== null) return `No column ${name} ${where} or the joined files; did you mean ${nearOther} (${whereTable(other)})?`;
  }
  const names = table.columns.map((c) => c.name);
  const shown = names.slice(0, 12).join(', ') + (names.length > 12 ? ` and ${names.length - 12} more` : '');
  return `No column ${name} ${where}${others.length > 0 ? ' or the joined files' : ''}. Its columns are: ${shown}. Check the spelling in the study file.`;
}

/** How a cell reads as an ID or a category label, as the analyst sees it. */
export function displayText(column: RawColumn, row: number): string {
  const text = column.texts?.[row];
  if (text !== undefined) return text.trim();
  const kind = column.kinds[row];
  const value = column.numbers[row]!;
  if (kind === CellKind.Bool) return value === 1 ? 'TRUE' : 'FALSE';
  if (kind === CellKind.Date) return new Date(Math.round(value * 86_400_000)).toISOString().slice(0, 10);
  return Number.isNaN(value) ? '' : String(value);
}

/**
 * The key a cell links by, or null when blank or an error. Whole numbers written with leading
 * zeros ("00102") link to the same number (102): one file often stores IDs as text and another
 * as numbers. Digit strings beyond double precision keep their text.
 */
export function linkKey(column: RawColumn, row: number): string | null {
  const kind = column.kinds[row];
  if (kind === CellKind.Blank || kind === CellKind.Error || kind === CellKind.NoResult) return null;
  const text = column.texts?.[row];
  if (kind === CellKind.Number && text !== undefined) {
    const t = text.trim();
    return /^[+-]?\d{1,15}$/.test(t) ? String(Number(t)) : t;
  }
  if (kind === CellKind.Text || text !== undefined) return (text ?? '').trim();
  return displayText(column, row);
}
