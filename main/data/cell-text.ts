// Reading one cell's text as the value an analyst means: a plain number, a number written
// with thousands separators or a currency sign, a number written the European way (decimal
// comma, point or space groups: "1.234,5"), a percentage ("12,5 %"), a date in ISO 8601 form,
// TRUE/FALSE, an Excel error value, or text. Pure; no Node modules.

import { CellKind, type CellKindCode, type RawColumn } from './types.ts';

/** Scratch result, reused between calls so that a million-row import allocates nothing per cell. */
export interface ParsedCell {
  kind: CellKindCode;
  value: number;
  /** True when the written text must be kept beside the number (IDs like "00102", text). */
  keepText: boolean;
}

export function newParsedCell(): ParsedCell {
  return { kind: CellKind.Blank, value: Number.NaN, keepText: false };
}

const PLAIN_NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
// Excel's error values (the ones a cell can hold; ECMA-376 Part 1 §18.17.4.4 lists the classic
// seven, newer Excel adds #SPILL!, #CALC!, #FIELD!, #BLOCKED!, #CONNECT!, #BUSY!, #UNKNOWN!).
const EXCEL_ERROR = /^#(?:NULL!|DIV\/0!|VALUE!|REF!|NAME\?|NUM!|N\/A|GETTING_DATA|SPILL!|CALC!|FIELD!|BLOCKED!|CONNECT!|BUSY!|UNKNOWN!)$/i;
// ISO 8601 calendar date, optionally with a time of day (ISO 8601-1:2019 §5.2.2, §5.3).
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2}(?:\.\d+)?))?(Z|[+-]\d{2}:?\d{2})?)?$/;
const CURRENCY = /[$€£¥₹]/g;
const COMMA_GROUPED = /^\d{1,3}(?:,\d{3})+(?:\.\d+)?$/;
// Groups separated by a space, no-break space, narrow no-break space or thin space; then the
// decimal mark may be a point or a comma (as in "1 234,50").
const SPACE_GROUPED = /^\d{1,3}(?:[ \u00a0\u202f\u2009]\d{3})+(?:[.,]\d+)?$/;
const PLAIN_DIGITS = /^(?:\d+(?:\.\d*)?|\.\d+)$/;
// A decimal comma that cannot be a thousands comma: point groups before it ("1.234,5"), or not
// exactly three digits after it ("12,5", "0,25", "3,1416").
const DECIMAL_COMMA = /^(?:\d{1,3}(?:\.\d{3})+,\d+|\d+,(?:\d{1,2}|\d{4,}))$/;
// Forms that read differently with a decimal point and with a decimal comma: "1.234", "1,234",
// "12.345.678" (a point read as grouping only in a decimal-comma column).
const AMBIGUOUS_GROUPS = /^[+-]?\d{1,3}(?:[.,]\d{3})+$/;
// Any number with a decimal comma and point or space groups, for a column known to use them.
const COMMA_NUMBER = /^(?:\d{1,3}(?:[. \u00a0\u202f\u2009]\d{3})+|\d+)(?:,\d+)?$/;
const PERCENT = /\s*%$/;
const MS_PER_DAY = 86_400_000;

/** Days since 1970-01-01 of an ISO date (time of day as a fraction), or NaN if not a real date. */
export function isoDateToDays(text: string): number {
  const m = ISO_DATE.exec(text);
  if (!m) return Number.NaN;
  const year = Number(m[1]);
  const month = Number(m[2]);
  const day = Number(m[3]);
  const hour = m[4] === undefined ? 0 : Number(m[4]);
  const minute = m[5] === undefined ? 0 : Number(m[5]);
  const second = m[6] === undefined ? 0 : Number(m[6]);
  if (month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 || second >= 61) return Number.NaN;
  const ms = Date.UTC(year, month - 1, day, hour, minute, 0) + second * 1000;
  // Reject 2023-02-30 and the like: the calendar must give back the same day.
  const check = new Date(Date.UTC(year, month - 1, day));
  if (check.getUTCFullYear() !== year || check.getUTCMonth() !== month - 1 || check.getUTCDate() !== day) return Number.NaN;
  let offsetMinutes = 0;
  const zone = m[7];
  if (zone !== undefined && zone !== 'Z') {
    const sign = zone.startsWith('-') ? -1 : 1;
    const digits = zone.slice(1).replace(':', '');
    offsetMinutes = sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2, 4)));
  }
  return (ms - offsetMinutes * 60_000) / MS_PER_DAY;
}

/**
 * A number written for people rather than machines: "$1,234.50", "1 234", "(12)", "-€5",
 * "12 $". Returns NaN when the text is not such a number. European decimal commas with point
 * grouping ("1.234,50") are not read: they cannot be told apart from "1.234" reliably.
 */
export function formattedNumber(text: string): number {
  let s = text.trim();
  let negative = false;
  if (s.startsWith('(') && s.endsWith(')')) {
    // Accounting style: parentheses mean a negative amount.
    negative = true;
    s = s.slice(1, -1).trim();
  }
  let hadCurrency = false;
  const withoutCurrency = s.replace(CURRENCY, '');
  if (withoutCurrency !== s) {
    hadCurrency = true;
    s = withoutCurrency.trim();
  }
  if (s.startsWith('-') || s.startsWith('\u2212')) {
    if (negative) return Number.NaN;
    negative = true;
    s = s.slice(1).trim();
  } else if (s.startsWith('+')) {
    s = s.slice(1).trim();
  }
  // A currency sign may also stand after the sign ("-$5", handled above by removing all signs).
  let hadPercent = false;
  if (!hadCurrency && PERCENT.test(s)) { hadPercent = true; s = s.replace(PERCENT, ''); }
  let body: string;
  if (COMMA_GROUPED.test(s)) body = s.replace(/,/g, '');
  else if (DECIMAL_COMMA.test(s)) body = s.replace(/\./g, '').replace(',', '.');
  else if (hadPercent && PLAIN_DIGITS.test(s)) body = s;
  else if (SPACE_GROUPED.test(s)) body = s.replace(/[ \u00a0\u202f\u2009]/g, '').replace(',', '.');
  else if ((hadCurrency || negative) && PLAIN_DIGITS.test(s)) body = s;
  else return Number.NaN;
  const value = Number(body);
  if (!Number.isFinite(value)) return Number.NaN;
  return negative ? -value : value;
}

/** Classify one cell's text into `out`. */
export function parseCellText(raw: string, out: ParsedCell): ParsedCell {
  const text = raw.trim();
  out.keepText = false;
  if (text === '') {
    out.kind = CellKind.Blank;
    out.value = Number.NaN;
    return out;
  }
  if (PLAIN_NUMBER.test(text)) {
    out.kind = CellKind.Number;
    out.value = Number(text);
    // Keep the written form where the number loses it: leading zeros ("00102") and digit
    // strings beyond double precision (account numbers), both typical of IDs.
    out.keepText = /^[+-]?0\d/.test(text) || /\d{16,}/.test(text) || AMBIGUOUS_GROUPS.test(text);
    return out;
  }
  if (text.charCodeAt(0) === 35 /* # */ && EXCEL_ERROR.test(text)) {
    out.kind = CellKind.Error;
    out.value = Number.NaN;
    out.keepText = true;
    return out;
  }
  const upper = text.length <= 5 ? text.toUpperCase() : '';
  if (upper === 'TRUE' || upper === 'FALSE') {
    out.kind = CellKind.Bool;
    out.value = upper === 'TRUE' ? 1 : 0;
    return out;
  }
  const c0 = text.charCodeAt(0);
  if (c0 >= 48 && c0 <= 57 && text.length >= 10 && text.charCodeAt(4) === 45 /* - */) {
    const days = isoDateToDays(text);
    if (!Number.isNaN(days)) {
      out.kind = CellKind.Date;
      out.value = days;
      return out;
    }
  }
  const formatted = formattedNumber(text);
  if (!Number.isNaN(formatted)) {
    out.kind = CellKind.TextNumber;
    out.value = formatted;
    // Kept so a column written with decimal commas can be told apart and read again (decimalCommaColumn).
    out.keepText = text.includes(',') || text.includes('%');
    return out;
  }
  out.kind = CellKind.Text;
  out.value = Number.NaN;
  out.keepText = true;
  return out;
}

/** A number written with a decimal comma and point or space groups ("1.234,5", "1 234", "12,5 %"), or NaN. */
export function decimalCommaNumber(text: string): number {
  let s = text.trim();
  let negative = false;
  if (s.startsWith('-') || s.startsWith('\u2212')) { negative = true; s = s.slice(1).trim(); } else if (s.startsWith('+')) s = s.slice(1).trim();
  s = s.replace(PERCENT, '');
  if (!COMMA_NUMBER.test(s)) return Number.NaN;
  const value = Number(s.replace(/[. \u00a0\u202f\u2009]/g, '').replace(',', '.'));
  return Number.isFinite(value) ? (negative ? -value : value) : Number.NaN;
}

export interface DecimalCommaReading {
  /** Cells whose value changed when read with the decimal comma ("1.234" → 1234, "1,5" stays 1.5). */
  changed: number;
  /** Cells written with a decimal comma or a percent sign, and one of them as written. */
  written: number;
  example: string;
  percent: boolean;
}

/**
 * A column written the European way: it has cells that can only be decimal commas ("12,5",
 * "1.234,5") and none that can only be decimal points (a fraction written "12.5" or "1,234.5"),
 * or the study says so (`"decimal": ","` under data). Its ambiguous cells ("1.234") are then read
 * with the decimal comma too, in place. Returns what was read, or null when the column is not such
 * a column.
 */
export function decimalCommaColumn(column: RawColumn, forced: boolean): DecimalCommaReading | null {
  const texts = column.texts;
  let comma = 0, point = 0, percent = 0;
  let example = '';
  for (let r = 0; r < column.kinds.length; r++) {
    const k = column.kinds[r];
    const t = texts?.[r]?.trim();
    if (k === CellKind.Number && t === undefined) { if (!Number.isInteger(column.numbers[r]!)) point++; continue; }
    if (t === undefined || (k !== CellKind.Number && k !== CellKind.TextNumber)) continue;
    const body = t.replace(/^[+\-\u2212]/, '').replace(PERCENT, '');
    if (t.endsWith('%')) percent++;
    if (DECIMAL_COMMA.test(body)) { comma++; if (!example) example = t; } else if (/\d,\d{3}\.\d/.test(body)) point++;
  }
  if (!forced && (comma === 0 || point > 0)) return null;
  let changed = 0;
  for (let r = 0; r < column.kinds.length; r++) {
    const t = texts?.[r];
    const k = column.kinds[r];
    if (t === undefined || (k !== CellKind.Number && k !== CellKind.TextNumber && k !== CellKind.Text)) continue;
    const v = decimalCommaNumber(t);
    if (Number.isNaN(v)) continue;
    if (v !== column.numbers[r] || k === CellKind.Text) changed++;
    column.numbers[r] = v;
    column.kinds[r] = CellKind.TextNumber;
  }
  if (comma === 0 && changed === 0) return null;
  return { changed, written: comma, example: example || (texts?.find((t) => t !== undefined) ?? ''), percent: percent > 0 };
}
