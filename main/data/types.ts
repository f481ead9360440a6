// Shapes of an imported table (main/data). Columns, not row objects (docs/architecture.md,
// "Data in memory"): each column is a Float64Array of numbers (NaN where the cell is not a
// number), a Uint8Array of cell kinds, and the cell text only where the text carries more than
// the number (IDs such as "A-0102" or "00102", text categories, error codes).

/** What a cell held. Codes are stored per cell in `RawColumn.kinds`. */
export const CellKind = {
  /** Empty, or only spaces. */
  Blank: 0,
  /** A number (an Excel number, a formula's saved numeric result, or plain numeric CSV text). */
  Number: 1,
  /** Text written as a number with separators or a currency sign ("$1,234.50", "1 234", "(12)"). */
  TextNumber: 2,
  /** A date (Excel date serial or ISO text); the number is days since 1970-01-01. */
  Date: 3,
  /** TRUE / FALSE; the number is 1 / 0. */
  Bool: 4,
  /** Other text; the number is NaN. */
  Text: 5,
  /** An Excel error value (#N/A, #DIV/0!, #VALUE! ...); the text holds the code. */
  Error: 6,
  /** A formula the workbook saved without a result (the file was never recalculated). */
  NoResult: 7,
} as const;
export type CellKindCode = (typeof CellKind)[keyof typeof CellKind];

export interface RawColumn {
  /** Header text as written, without surrounding spaces. */
  name: string;
  /** Spreadsheet column letter (A, B, ..., AA) — also given for CSV files. */
  letter: string;
  /** NaN where the cell is not a number. Length = RawTable.rowCount. */
  numbers: Float64Array;
  /** One CellKind code per row. */
  kinds: Uint8Array;
  /** Cell text where it is needed (Text, Error, TextNumber, dates from text, numbers whose
   *  written form differs from the number, e.g. "00102"); null when no cell needs it. */
  texts: Array<string | undefined> | null;
}

export interface TableNote {
  code: string;
  message: string;
}

export interface TableSource {
  /** The path as given to readTable. */
  path: string;
  /** The file's base name, e.g. applicants.xlsx. */
  fileName: string;
  format: 'xlsx' | 'csv';
  /** Sheet read (null for CSV files). */
  sheet: string | null;
  /** All sheets of the workbook in tab order (empty for CSV files). */
  sheets: string[];
  /** Lower-case hex SHA-256 of the file bytes. */
  sha256: string;
  bytes: number;
}

export interface RawTable {
  source: TableSource;
  /** Spreadsheet row (1-based) holding the column names. */
  headerRow: number;
  /** Number of data rows kept (rows below the header that have at least one value). */
  rowCount: number;
  /** Spreadsheet row (1-based, counting title rows and the header) of each data row. */
  rowNumbers: Int32Array;
  columns: RawColumn[];
  notes: TableNote[];
}

export interface ImportProgress {
  stage: 'import';
  done: number;
  total: number;
}

export interface ReadTableOptions {
  /** Sheet name (default: the first sheet with data). Ignored for CSV files. */
  sheet?: string;
  /** Spreadsheet row (1-based) holding the column names; default: found automatically. */
  headerRow?: number;
  onProgress?: (p: ImportProgress) => void;
  signal?: AbortSignal;
  /** Refuse workbooks that would unpack to more than this many bytes (default 2 GiB). */
  maxUncompressedBytes?: number;
}

export const DEFAULT_MAX_UNCOMPRESSED_BYTES = 2 * 1024 ** 3;
