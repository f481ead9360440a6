// Turning a stream of spreadsheet rows into typed columns. The readers (CSV, xlsx) classify
// each cell into a CellScratch and hand whole rows to `TableBuilder.addRow`; the builder finds
// the header, grows one Float64Array / Uint8Array per column and keeps text only where needed.
// No per-row objects survive: rows are copied into the column arrays and dropped.

import type { Problem } from '../rules/types.ts';
import { findHeaderRow, type ScannedRow } from './header.ts';
import { columnLetter, listRows } from './locate.ts';
import { CellKind, type CellKindCode, type RawColumn, type TableNote } from './types.ts';

export interface CellScratch {
  kind: CellKindCode;
  value: number;
  /** Text kept with the cell (see RawColumn.texts), or the display text when asked for. */
  text: string | undefined;
  /** The cell's text as written, when it was text (used only for examples in notes). */
  raw?: string | undefined;
}

/** Writes the classification of `raw` into `out`; with `wantText`, `out.text` is always the display text. */
export type Classify = (raw: unknown, out: CellScratch, wantText: boolean) => void;

const BLANK: CellScratch = Object.freeze({ kind: CellKind.Blank, value: Number.NaN, text: undefined });

/** Rows scanned for the header when `headerRow` is not given. */
export const HEADER_SCAN_ROWS = 100;
const MAX_ROWS_LISTED = 1000;

class ColumnBuilder {
  numbers = new Float64Array(1024);
  kinds = new Uint8Array(1024);
  texts: Array<string | undefined> | null = null;
  textNumbers = 0;
  textNumberExample = '';
  dates = 0;
  filled = 0;

  constructor(readonly name: string, readonly letter: string) {}

  push(at: number, cell: CellScratch, rawText: string | undefined): void {
    if (at >= this.numbers.length) {
      const size = this.numbers.length * 2;
      const numbers = new Float64Array(size);
      numbers.set(this.numbers);
      this.numbers = numbers;
      const kinds = new Uint8Array(size);
      kinds.set(this.kinds);
      this.kinds = kinds;
    }
    this.numbers[at] = cell.value;
    this.kinds[at] = cell.kind;
    if (cell.kind !== CellKind.Blank) this.filled++;
    if (cell.kind === CellKind.TextNumber) {
      if (this.textNumbers === 0) this.textNumberExample = rawText ?? '';
      this.textNumbers++;
    } else if (cell.kind === CellKind.Date) {
      this.dates++;
    }
    if (cell.text !== undefined) {
      if (this.texts === null) this.texts = new Array<string | undefined>(at).fill(undefined);
      while (this.texts.length < at) this.texts.push(undefined);
      this.texts.push(cell.text);
    }
  }

  finish(length: number): RawColumn {
    let texts = this.texts;
    if (texts !== null) while (texts.length < length) texts.push(undefined);
    if (texts !== null && texts.length > length) texts = texts.slice(0, length);
    return {
      name: this.name,
      letter: this.letter,
      numbers: this.numbers.slice(0, length),
      kinds: this.kinds.slice(0, length),
      texts,
    };
  }
}

export interface BuiltTable {
  headerRow: number;
  rowCount: number;
  rowNumbers: Int32Array;
  columns: RawColumn[];
  notes: TableNote[];
}

export class TableBuilder {
  private readonly scratch: CellScratch = { kind: CellKind.Blank, value: Number.NaN, text: undefined };
  private scanned: ScannedRow[] = [];
  private scannedRaw: Array<{ rowNumber: number; cells: CellScratch[] }> = [];
  private columns: ColumnBuilder[] | null = null;
  private rowScratch: CellScratch[] = [];
  private width = 0;
  private headerRowNumber = 0;
  private rowNumbers = new Int32Array(1024);
  private rowCount = 0;
  private lastRowNumber = 0;
  private pendingBlank: number[] = [];
  private pendingBlankCount = 0;
  private blankSkipped: number[] = [];
  private blankSkippedCount = 0;
  private beyondRows: number[] = [];
  private beyondCount = 0;
  private problem: Problem | null = null;
  /** Any non-blank cell seen at all (to tell an empty sheet from one without a header). */
  sawValue = false;

  constructor(
    private readonly classify: Classify,
    private readonly place: (row?: number, column?: string) => string,
    private readonly where: string,
    private readonly headerRowOption: number | undefined,
  ) {}

  /** A problem that makes the table unusable (the caller stops reading), or null. */
  get failed(): Problem | null {
    return this.problem;
  }

  /** Add one spreadsheet row; `cells[offset + c]` is column c (0-based). */
  addRow(rowNumber: number, cells: ArrayLike<unknown>, offset: number): void {
    if (this.problem !== null) return;
    if (this.columns === null) {
      this.seekHeader(rowNumber, cells, offset);
      return;
    }
    this.addDataRow(rowNumber, cells, offset);
  }

  private seekHeader(rowNumber: number, cells: ArrayLike<unknown>, offset: number): void {
    const wanted = this.headerRowOption;
    if (wanted !== undefined && rowNumber < wanted) {
      for (let c = offset; c < cells.length; c++) {
        this.classify(cells[c], this.scratch, false);
        if (this.scratch.kind !== CellKind.Blank) this.sawValue = true;
      }
      return;
    }
    const kinds: CellKindCode[] = [];
    const texts: string[] = [];
    const raw: CellScratch[] = [];
    let any = false;
    for (let c = offset; c < cells.length; c++) {
      const cell: CellScratch = { kind: CellKind.Blank, value: Number.NaN, text: undefined };
      // Once for the display text (header names), once for what a data cell keeps.
      this.classify(cells[c], cell, true);
      if (cell.kind !== CellKind.Blank) any = true;
      kinds.push(cell.kind);
      texts.push(cell.text ?? '');
      this.classify(cells[c], cell, false);
      raw.push(cell);
    }
    if (any) this.sawValue = true;
    if (wanted !== undefined) {
      if (rowNumber > wanted || !any) {
        this.problem = {
          path: this.place(wanted),
          message: `Row ${wanted} ${this.where} is empty, so it cannot hold the column names. Give the number of the row that has the column names.`,
        };
        return;
      }
      this.startData(rowNumber, texts, kinds);
      return;
    }
    if (!any) return;
    this.scanned.push({ rowNumber, kinds, texts });
    this.scannedRaw.push({ rowNumber, cells: raw });
    if (this.scanned.length >= HEADER_SCAN_ROWS) this.decideHeader();
  }

  private decideHeader(): void {
    const at = findHeaderRow(this.scanned);
    if (at === null) {
      this.problem = {
        path: this.place(),
        message: `Could not tell which row holds the column names ${this.where}: none of the first ${this.scanned.length} filled rows is a row of names above rows of data. Give the header row number (the row with the column names).`,
      };
      return;
    }
    const header = this.scanned[at]!;
    const rest = this.scannedRaw.slice(at + 1);
    this.scanned = [];
    this.scannedRaw = [];
    this.startData(header.rowNumber, header.texts, header.kinds);
    if (this.problem !== null) return;
    for (const row of rest) {
      if (row.cells.slice(this.width).some((c) => c.kind !== CellKind.Blank)) this.noteBeyond(row.rowNumber);
      this.addDataCells(row.rowNumber, row.cells);
    }
  }

  private startData(rowNumber: number, texts: readonly string[], kinds: readonly CellKindCode[]): void {
    let width = 0;
    for (let c = kinds.length - 1; c >= 0; c--) {
      if (kinds[c] !== CellKind.Blank) {
        width = c + 1;
        break;
      }
    }
    const names = texts.slice(0, width).map((t, c) => (kinds[c] === CellKind.Blank ? '' : t.trim()));
    const byName = new Map<string, number[]>();
    names.forEach((name, c) => {
      if (name === '') return;
      const key = name.toLowerCase();
      const list = byName.get(key) ?? [];
      list.push(c);
      byName.set(key, list);
    });
    const duplicates = [...byName.values()].filter((cols) => cols.length > 1);
    if (duplicates.length > 0) {
      const said = duplicates
        .map((cols) => `columns ${cols.map(columnLetter).join(' and ')} are both named ${names[cols[0]!]}`)
        .join('; ');
      this.problem = {
        path: this.place(rowNumber),
        message: `Two columns share a name in the header row (row ${rowNumber}) ${this.where}: ${said}. Rename them so each column has its own name.`,
      };
      return;
    }
    this.headerRowNumber = rowNumber;
    this.width = width;
    this.lastRowNumber = rowNumber;
    this.columns = names.map((name, c) => new ColumnBuilder(name, columnLetter(c)));
    this.rowScratch = names.map(() => ({ kind: CellKind.Blank, value: Number.NaN, text: undefined }));
  }

  private addDataRow(rowNumber: number, cells: ArrayLike<unknown>, offset: number): void {
    // One reused scratch row: a million-row import allocates no cell objects.
    const row = this.rowScratch;
    for (let c = 0; c < this.width; c++) {
      this.classify(offset + c < cells.length ? cells[offset + c] : undefined, row[c]!, false);
    }
    let beyond = false;
    for (let c = offset + this.width; c < cells.length; c++) {
      this.classify(cells[c], this.scratch, false);
      if (this.scratch.kind !== CellKind.Blank) {
        beyond = true;
        break;
      }
    }
    if (beyond) this.noteBeyond(rowNumber);
    this.addDataCells(rowNumber, row);
  }

  private noteBeyond(rowNumber: number): void {
    if (this.beyondRows.length < MAX_ROWS_LISTED) this.beyondRows.push(rowNumber);
    this.beyondCount++;
  }

  private addDataCells(rowNumber: number, row: readonly CellScratch[]): void {
    const columns = this.columns!;
    // Rows the file skips entirely (no <row> element) are blank rows too.
    for (let r = this.lastRowNumber + 1; r < rowNumber; r++) this.noteBlank(r);
    this.lastRowNumber = rowNumber;
    let any = false;
    for (let c = 0; c < this.width; c++) if ((row[c] ?? BLANK).kind !== CellKind.Blank) any = true;
    if (!any) {
      this.noteBlank(rowNumber);
      return;
    }
    this.sawValue = true;
    // Blank rows between data rows are reported; blank rows after the last one are not rows.
    this.blankSkippedCount += this.pendingBlankCount;
    for (const r of this.pendingBlank) if (this.blankSkipped.length < MAX_ROWS_LISTED) this.blankSkipped.push(r);
    this.pendingBlank = [];
    this.pendingBlankCount = 0;
    const at = this.rowCount;
    if (at >= this.rowNumbers.length) {
      const grown = new Int32Array(this.rowNumbers.length * 2);
      grown.set(this.rowNumbers);
      this.rowNumbers = grown;
    }
    this.rowNumbers[at] = rowNumber;
    for (let c = 0; c < this.width; c++) {
      // Rows held while looking for the header may be shorter than the header.
      const cell = row[c] ?? BLANK;
      columns[c]!.push(at, cell, cell.raw);
    }
    this.rowCount++;
  }

  private noteBlank(rowNumber: number): void {
    this.pendingBlankCount++;
    if (this.pendingBlank.length < MAX_ROWS_LISTED) this.pendingBlank.push(rowNumber);
  }

  /** Called after the last row. */
  finish(): { ok: true; value: BuiltTable } | { ok: false; problems: Problem[] } {
    if (this.problem === null && this.columns === null) {
      if (!this.sawValue) {
        return { ok: false, problems: [{ path: this.place(), message: `There is nothing ${this.where}: it is empty. Choose the sheet or file that holds the data.` }] };
      }
      if (this.headerRowOption !== undefined) {
        const wanted = this.headerRowOption;
        return { ok: false, problems: [{ path: this.place(wanted), message: `Row ${wanted} ${this.where} is empty or beyond the last row, so it cannot hold the column names. Give the number of the row that has the column names.` }] };
      }
      this.decideHeader();
    }
    if (this.problem !== null) return { ok: false, problems: [this.problem] };
    const builders = this.columns!;
    if (this.rowCount === 0) {
      return {
        ok: false,
        problems: [{ path: this.place(this.headerRowNumber), message: `The column names are in row ${this.headerRowNumber} ${this.where}, but there are no rows of data below them. Check that this is the right sheet or file.` }],
      };
    }
    const notes: TableNote[] = [];
    const unnamedWithData = builders.filter((b) => b.name === '' && b.filled > 0).map((b) => b.letter);
    if (unnamedWithData.length > 0) {
      const cols = unnamedWithData.join(', ');
      return {
        ok: false,
        problems: [{
          path: this.place(this.headerRowNumber),
          message: `Column${unnamedWithData.length > 1 ? 's' : ''} ${cols} ${this.where} ${unnamedWithData.length > 1 ? 'have' : 'has'} values but no name in the header row (row ${this.headerRowNumber}). Type a name in the header row for ${unnamedWithData.length > 1 ? 'each' : 'it'}, or delete the column.`,
        }],
      };
    }
    const unnamedEmpty = builders.filter((b) => b.name === '').map((b) => b.letter);
    if (unnamedEmpty.length > 0) {
      notes.push({ code: 'empty-unnamed-columns', message: `Column${unnamedEmpty.length > 1 ? 's' : ''} ${unnamedEmpty.join(', ')} ${this.where} ${unnamedEmpty.length > 1 ? 'have' : 'has'} no name and no values; left out.` });
    }
    for (const b of builders) {
      if (b.textNumbers > 0) {
        notes.push({ code: 'text-numbers', message: `${b.name}: ${b.textNumbers} number${b.textNumbers > 1 ? 's' : ''} written as text (such as "${b.textNumberExample}") ${b.textNumbers > 1 ? 'were' : 'was'} read as ${b.textNumbers > 1 ? 'numbers' : 'a number'}.` });
      }
      if (b.dates > 0) {
        notes.push({ code: 'dates', message: `${b.name}: ${b.dates} date${b.dates > 1 ? 's' : ''} ${b.dates > 1 ? 'were' : 'was'} read as the number of days since 1970-01-01.` });
      }
    }
    if (this.blankSkippedCount > 0) {
      notes.push({ code: 'blank-rows', message: `${this.blankSkippedCount} empty row${this.blankSkippedCount > 1 ? 's' : ''} inside the table ${this.where} ${this.blankSkippedCount > 1 ? 'were' : 'was'} skipped (row${this.blankSkippedCount > 1 ? 's' : ''} ${listRows(this.blankSkipped, this.blankSkippedCount)}).` });
    }
    if (this.beyondCount > 0) {
      const last = columnLetter(this.width - 1);
      notes.push({ code: 'values-beyond-header', message: `${this.beyondCount} row${this.beyondCount > 1 ? 's have' : ' has'} values to the right of the last named column (${last}) ${this.where}; those values were not read (row${this.beyondCount > 1 ? 's' : ''} ${listRows(this.beyondRows, this.beyondCount)}). Give those columns a name in the header row to use them.` });
    }
    const columns = builders.filter((b) => b.name !== '').map((b) => b.finish(this.rowCount));
    return {
      ok: true,
      value: {
        headerRow: this.headerRowNumber,
        rowCount: this.rowCount,
        rowNumbers: this.rowNumbers.slice(0, this.rowCount),
        columns,
        notes,
      },
    };
  }
}
