// Shapes shared by the sample-program generators: a sheet as plain values (title lines, a header,
// rows), the defects planted in it on purpose, and the random draws every generator needs. Pure:
// the generators return values; scripts/make-sample-data.ts writes them to files.

import type { Rng } from '../design/random.ts';

/** One cell as the generator writes it: a number, a text, or nothing (a blank cell). */
export type SampleCell = string | number | null;

export interface SampleSheet {
  /** File name inside the sample's folder, e.g. applicants.xlsx or outcomes.csv. */
  file: string;
  /** Sheet name for a workbook; null for a CSV file. */
  sheet: string | null;
  /** Lines written above the header (titles, notes; '' = an empty row). */
  titleRows: string[];
  header: string[];
  rows: SampleCell[][];
  /** Excel number formats by column name (e.g. a date format on a column of date serials). */
  formats?: Record<string, string>;
}

/** The files of one sample program, as the generator makes them. */
export interface SampleFiles {
  /** Folder name under sample-programs/. */
  folder: string;
  sheets: SampleSheet[];
}

/** A row spoilt on purpose, and the words Fenceline's exclusion reason must contain. */
export interface PlantedDefect {
  /** The file it is in. */
  file: string;
  /** Row number as the user sees it in the spreadsheet (title rows and header counted). */
  sheetRow: number;
  /** What was done to the row, in words. */
  what: string;
  /** The exclusion reason the study should report for it (exact text). */
  reason: string;
}

/** Spreadsheet row (1-based) of data row `index` (0-based) of a sheet. */
export function sheetRowOf(sheet: Pick<SampleSheet, 'titleRows'>, index: number): number {
  return sheet.titleRows.length + 1 + index + 1;
}

/** Standard normal draw by Box–Muller (G. E. P. Box and M. E. Muller, Ann. Math. Statist. 29:610–611, 1958). */
export function normal(rng: Rng): number {
  return Math.sqrt(-2 * Math.log(1 - rng.next())) * Math.cos(2 * Math.PI * rng.next());
}

/** Round to `digits` decimals (the resolution at which an agency records the value). */
export function roundTo(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}

/** A unit ID such as A-00042. */
export function unitId(prefix: string, i: number, width = 5): string {
  return `${prefix}${String(i).padStart(width, '0')}`;
}

/** Column index of `name` in the sheet's header (throws on a typo in a generator). */
export function col(sheet: Pick<SampleSheet, 'header'>, name: string): number {
  const i = sheet.header.indexOf(name);
  if (i < 0) throw new Error(`generator: no column ${name}`);
  return i;
}
