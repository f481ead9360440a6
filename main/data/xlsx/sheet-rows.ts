// A narrow reader of a worksheet part (ECMA-376 Part 1 §18.3.1: sheetData §18.3.1.80, row
// §18.3.1.73, c §18.3.1.4 with attributes r, s, t, children f §18.3.1.40, v §18.3.1.96,
// is §18.3.1.53 / t / r runs), fed chunk by chunk from the inflated part and handing each
// finished row to a callback. Everything else in the part (columns, merges, page setup) is
// skipped. `r` attributes are optional (a row or cell without one follows the previous one).
//
// Cell values are resolved as exceljs 4.4's streaming reader resolves them, so that the rest of
// the data layer sees the same values it saw before (checked by tests/data/xlsx-reader.test.ts
// against exceljs): numbers with a date style become dates (1900 or 1904 system, times kept to
// the millisecond); a shared string index out of range is an empty cell. Where exceljs does not
// follow the standard this reader does: a formula's saved value (v) is read like any value of
// its type t (exceljs drops a saved 0, FALSE or empty text, calling the cell "no result", and
// reads saved booleans and errors as numbers); inline rich text keeps every run; phonetic runs
// are left out; text is decoded once; rows and cells without `r` follow the previous ones; t="d"
// (an ISO 8601 date, §18.18.11) is read as the date it spells.

import { bytesAre, decodeText, find, floatAt, intAt, leafString, leafText, LT, XmlDamage } from './xml-bytes.ts';
import { ChunkedXmlReader } from './xml-chunks.ts';

/** What a cell holds once read. */
export const SheetValue = {
  /** No value (no v/is/f, or a shared string index out of range): exceljs's "null" cell. */
  None: 0,
  Number: 1,
  /** A number in a date style; `num` is milliseconds since 1970-01-01 (NaN if beyond the Date range). */
  Date: 2,
  String: 3,
  Bool: 4,
  /** An error value; `text` holds its code. */
  Error: 5,
  /** A formula saved without a result. */
  NoResult: 6,
} as const;
export type SheetValueCode = (typeof SheetValue)[keyof typeof SheetValue];

export interface SheetCell {
  type: SheetValueCode;
  num: number;
  text: string;
}

const MAX_COLUMNS = 16_384; // XFD, ECMA-376 Part 1 §18.3.1.4 (ST_CellRef) and Excel's limit
const MAX_ROW = 2 ** 31 - 1;
const MS_PER_DAY = 86_400_000;
/** Serial 25569 is 1970-01-01 in the 1900 system; the 1904 system counts 1462 days fewer. */
const UNIX_EPOCH_SERIAL = 25_569;
const DATE_1904_OFFSET = 1_462;
/** ECMAScript time values are limited to ±8.64e15 ms (ECMA-262 §21.4.1.1). */
const MAX_TIME = 8.64e15;

// Cell types (ST_CellType, §18.18.11).
const T_NUMBER = 0;
const T_SHARED = 1;
const T_STR = 2;
const T_INLINE = 3;
const T_BOOL = 4;
const T_ERROR = 5;
const T_DATE_ISO = 6;

export type RowSink = (rowNumber: number, cells: readonly SheetCell[]) => void;

export class SheetRowParser extends ChunkedXmlReader {
  private readonly pool: SheetCell[] = [];
  private readonly view: SheetCell[] = [];
  private rowOpen = false;
  private rowNumber = 0;
  private rowLength = 0;
  private cellOpen = false;
  private column = -1;
  private cellType = T_NUMBER;
  private cellDateStyle = false;
  private hasFormula = false;
  private hasValue = false;
  private valueNum = Number.NaN;
  private valueInt = Number.NaN;
  private valueText: string | null = null;
  private inInline = false;
  private inlineSeen = false;
  private inPhonetic = 0;
  private inlineText = '';
  private inSheetData = false;
  private sawSheetData = false;

  constructor(
    private readonly shared: ReadonlyArray<string | null>,
    private readonly dateStyles: Uint8Array,
    private readonly date1904: boolean,
    private readonly sink: RowSink,
  ) {
    super();
  }

  /** Throws XmlDamage when the part ended inside a row or never held sheetData. */
  finish(): void {
    this.checkEnded('the sheet');
    if (this.rowOpen || this.inSheetData || !this.sawSheetData) throw new XmlDamage('the sheet ends early');
  }

  protected endTag(b: Buffer, s: number, e: number): void {
    const len = e - s;
    if (len === 1 && b[s] === 99 /* c */) this.endCell();
    else if (len === 3 && b[s] === 114 && b[s + 1] === 111 && b[s + 2] === 119 /* row */) this.endRow();
    else if (len === 2 && b[s] === 105 && b[s + 1] === 115 /* is */) this.inInline = false;
    else if (len === 3 && bytesAre(b, s, e, 'rPh')) this.inPhonetic = Math.max(0, this.inPhonetic - 1);
    else if (len === 9 && bytesAre(b, s, e, 'sheetData')) {
      if (this.rowOpen) throw new XmlDamage('sheetData ends inside a row');
      this.inSheetData = false;
    }
  }

  protected startTag(b: Buffer, s: number, ne: number): number {
    const tag = this.tag;
    const len = ne - s;
    const c0 = b[s]!;
    if (len === 1 && c0 === 99 /* c */) {
      if (!this.rowOpen) throw new XmlDamage('a cell outside a row');
      this.startCell(b);
      if (tag.selfClosing) this.endCell();
    } else if (len === 1 && c0 === 118 /* v */) {
      if (this.cellOpen) {
        if (tag.selfClosing) {
          this.readValue(b, 0, 0);
        } else {
          const leaf = leafText(b, tag.end, this.leaf);
          if (leaf.next < 0) return -1;
          if (leaf.text !== null) {
            const text = leaf.text;
            this.hasValue = true;
            this.valueText = text;
            this.valueNum = Number.parseFloat(text);
            this.valueInt = Number.parseInt(text, 10);
          } else {
            this.readValue(b, leaf.start, leaf.end);
          }
          return leaf.next;
        }
      }
    } else if (len === 3 && c0 === 114 && b[s + 1] === 111 && b[s + 2] === 119 /* row */) {
      if (this.rowOpen) throw new XmlDamage('a row inside a row');
      this.startRow(b);
      if (tag.selfClosing) this.endRow();
    } else if (len === 1 && c0 === 102 /* f */) {
      if (this.cellOpen) this.hasFormula = true;
      // Skip the formula text (markup-free); its end tag is read next.
      if (!tag.selfClosing) return find(b, LT, tag.end + 1);
    } else if (len === 2 && c0 === 105 && b[s + 1] === 115 /* is */) {
      if (this.cellOpen) {
        this.hasValue = true;
        this.inlineSeen = true;
        this.inlineText = '';
        this.inInline = !tag.selfClosing;
      }
    } else if (len === 1 && c0 === 116 /* t */) {
      if (!tag.selfClosing) {
        const leaf = leafText(b, tag.end, this.leaf);
        if (leaf.next < 0) return -1;
        if (this.inInline && this.inPhonetic === 0) this.inlineText += leafString(b, leaf);
        return leaf.next;
      }
    } else if (len === 3 && bytesAre(b, s, ne, 'rPh')) {
      if (!tag.selfClosing) this.inPhonetic++;
    } else if (len === 9 && bytesAre(b, s, ne, 'sheetData')) {
      this.sawSheetData = true;
      this.inSheetData = !tag.selfClosing;
    }
    return tag.end + 1;
  }

  private readValue(b: Buffer, start: number, end: number): void {
    this.hasValue = true;
    const t = this.cellType;
    if (t === T_STR || t === T_INLINE || t === T_ERROR || t === T_DATE_ISO) {
      this.valueText = decodeText(b, start, end);
      this.valueNum = Number.NaN;
      this.valueInt = Number.NaN;
    } else {
      this.valueText = null;
      this.valueNum = floatAt(b, start, end);
      this.valueInt = t === T_SHARED || t === T_BOOL ? intAt(b, start, end) : Number.NaN;
    }
  }

  private startRow(b: Buffer): void {
    const tag = this.tag;
    let number = this.rowNumber + 1;
    if (tag.rStart >= 0) {
      number = intAt(b, tag.rStart, tag.rEnd);
      if (!(number >= 1 && number <= MAX_ROW)) throw new XmlDamage('a row number out of range');
    }
    this.rowNumber = number;
    this.rowOpen = true;
    this.rowLength = 0;
    this.column = -1;
  }

  private startCell(b: Buffer): void {
    const tag = this.tag;
    let column = -1;
    if (tag.rStart >= 0) {
      for (let i = tag.rStart; i < tag.rEnd; i++) {
        const ch = b[i]!;
        if (ch < 65 || ch > 90) break;
        column = (column < 0 ? 0 : (column + 1) * 26) + (ch - 65);
        if (column >= MAX_COLUMNS) throw new XmlDamage('a column beyond XFD');
      }
    }
    if (column < 0) column = this.column + 1;
    if (column >= MAX_COLUMNS) throw new XmlDamage('a column beyond XFD');
    this.column = column;
    let type = T_NUMBER;
    if (tag.tStart >= 0) {
      const len = tag.tEnd - tag.tStart;
      const ch = b[tag.tStart];
      if (len === 1) type = ch === 115 ? T_SHARED : ch === 98 ? T_BOOL : ch === 101 ? T_ERROR : ch === 100 ? T_DATE_ISO : T_NUMBER;
      else if (len === 3 && bytesAre(b, tag.tStart, tag.tEnd, 'str')) type = T_STR;
      else if (len === 9 && bytesAre(b, tag.tStart, tag.tEnd, 'inlineStr')) type = T_INLINE;
    }
    this.cellType = type;
    let style = 0;
    if (tag.sStart >= 0) style = intAt(b, tag.sStart, tag.sEnd);
    this.cellDateStyle = style >= 0 && style < this.dateStyles.length && this.dateStyles[style] === 1;
    this.cellOpen = true;
    this.hasFormula = false;
    this.hasValue = false;
    this.valueText = null;
    this.inInline = false;
    this.inlineSeen = false;
    this.inPhonetic = 0;
  }

  private endCell(): void {
    if (!this.cellOpen) return;
    this.cellOpen = false;
    this.inInline = false;
    if (!this.hasFormula && !this.hasValue) return;
    const column = this.column;
    while (this.pool.length <= column) this.pool.push({ type: SheetValue.None, num: Number.NaN, text: '' });
    const cell = this.pool[column]!;
    for (let k = this.rowLength; k < column; k++) this.pool[k]!.type = SheetValue.None;
    this.resolve(cell);
    if (cell.type === SheetValue.None) {
      if (column >= this.rowLength) return;
    } else if (column >= this.rowLength) {
      this.rowLength = column + 1;
    }
  }

  private resolve(cell: SheetCell): void {
    const t = this.cellType;
    const text = this.inlineSeen ? this.inlineText : this.valueText;
    if (!this.hasValue) {
      // A formula without a saved value: the workbook was never recalculated.
      cell.type = SheetValue.NoResult;
      return;
    }
    switch (t) {
      case T_SHARED: {
        const s = this.valueInt >= 0 ? this.shared[this.valueInt] : undefined;
        if (s === undefined || s === null) cell.type = SheetValue.None;
        else {
          cell.type = SheetValue.String;
          cell.text = s;
        }
        return;
      }
      case T_STR:
      case T_INLINE:
      case T_DATE_ISO:
        cell.type = SheetValue.String;
        cell.text = text ?? '';
        return;
      case T_ERROR:
        cell.type = SheetValue.Error;
        cell.text = text ?? '';
        return;
      case T_BOOL:
        cell.type = SheetValue.Bool;
        cell.num = this.valueInt !== 0 ? 1 : 0;
        return;
      default: {
        const v = this.valueNum;
        if (this.cellDateStyle) {
          // exceljs: new Date(Math.round((serial - 25569 + (date1904 ? 1462 : 0)) * 86400000)).
          const ms = Math.round((v - UNIX_EPOCH_SERIAL + (this.date1904 ? DATE_1904_OFFSET : 0)) * MS_PER_DAY);
          cell.type = SheetValue.Date;
          cell.num = Math.abs(ms) <= MAX_TIME ? ms + 0 : Number.NaN;
        } else {
          cell.type = SheetValue.Number;
          cell.num = v;
        }
      }
    }
  }

  private endRow(): void {
    if (!this.rowOpen) return;
    if (this.cellOpen) throw new XmlDamage('a row ends inside a cell');
    this.rowOpen = false;
    const view = this.view;
    view.length = 0;
    for (let k = 0; k < this.rowLength; k++) view.push(this.pool[k]!);
    this.sink(this.rowNumber, view);
  }
}
