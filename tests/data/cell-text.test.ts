import { describe, expect, it } from 'vitest';
import { decimalCommaColumn, decimalCommaNumber, formattedNumber, isoDateToDays, newParsedCell, parseCellText } from '../../main/data/cell-text.ts';
import { CellKind, type RawColumn } from '../../main/data/types.ts';

const parse = (text: string) => ({ ...parseCellText(text, newParsedCell()) });

/**
 * Days since 1970-01-01 by the formula of POSIX.1-2017 (XBD §4.16 "Seconds Since the Epoch"):
 * tm_yday + (tm_year-70)*365 + (tm_year-69)/4 - (tm_year-1)/100 + (tm_year+299)/400, integer
 * divisions, tm_year = year - 1900 — an outside check on the ISO date reader.
 */
function posixDays(year: number, month: number, day: number): number {
  const leap = (y: number) => (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  const monthDays = [31, leap(year) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
  let yday = day - 1;
  for (let m = 0; m < month - 1; m++) yday += monthDays[m]!;
  const y = year - 1900;
  return yday + (y - 70) * 365 + Math.floor((y - 69) / 4) - Math.floor((y - 1) / 100) + Math.floor((y + 299) / 400);
}

describe('text that is a number', () => {
  it('reads plain numbers without a note-worthy kind', () => {
    expect(parse('12.5')).toMatchObject({ kind: CellKind.Number, value: 12.5, keepText: false });
    expect(parse('-3')).toMatchObject({ kind: CellKind.Number, value: -3 });
    expect(parse('1e3')).toMatchObject({ kind: CellKind.Number, value: 1000 });
    expect(parse('.5')).toMatchObject({ kind: CellKind.Number, value: 0.5 });
  });

  it('keeps the written form of IDs with leading zeros or too many digits', () => {
    expect(parse('00102')).toMatchObject({ kind: CellKind.Number, value: 102, keepText: true });
    expect(parse('12345678901234567890')).toMatchObject({ kind: CellKind.Number, keepText: true });
  });

  it('reads thousands separators, currency signs and accounting negatives as text numbers', () => {
    expect(parse('$1,234.50')).toMatchObject({ kind: CellKind.TextNumber, value: 1234.5 });
    expect(parse('1 234')).toMatchObject({ kind: CellKind.TextNumber, value: 1234 });
    expect(parse('1\u00a0234,5')).toMatchObject({ kind: CellKind.TextNumber, value: 1234.5 });
    expect(parse('(12)')).toMatchObject({ kind: CellKind.TextNumber, value: -12 });
    expect(parse('($1,000)')).toMatchObject({ kind: CellKind.TextNumber, value: -1000 });
    expect(parse('-$5')).toMatchObject({ kind: CellKind.TextNumber, value: -5 });
    expect(parse('$-5.25')).toMatchObject({ kind: CellKind.TextNumber, value: -5.25 });
    expect(parse('12 €')).toMatchObject({ kind: CellKind.TextNumber, value: 12 });
    expect(parse('1,234,567')).toMatchObject({ kind: CellKind.TextNumber, value: 1234567 });
  });

  it('reads a decimal comma where it cannot be a thousands comma, and percentages as their number', () => {
    expect(parse('1,23')).toMatchObject({ kind: CellKind.TextNumber, value: 1.23, keepText: true }); // not a thousands group
    expect(parse('1.234,50')).toMatchObject({ kind: CellKind.TextNumber, value: 1234.5 }); // European decimal comma
    expect(parse('-0,5')).toMatchObject({ kind: CellKind.TextNumber, value: -0.5 });
    expect(parse('12%')).toMatchObject({ kind: CellKind.TextNumber, value: 12, keepText: true });
    expect(parse('12,5 %')).toMatchObject({ kind: CellKind.TextNumber, value: 12.5 });
    // Ambiguous forms keep their first reading, and their text so a decimal-comma column can read them again.
    expect(parse('1.234')).toMatchObject({ kind: CellKind.Number, value: 1.234, keepText: true });
    expect(parse('1,234')).toMatchObject({ kind: CellKind.TextNumber, value: 1234, keepText: true });
  });

  it('does not guess at malformed numbers', () => {
    expect(parse('1,2,3')).toMatchObject({ kind: CellKind.Text });
    expect(parse('1.23.4')).toMatchObject({ kind: CellKind.Text });
    expect(parse('12%%')).toMatchObject({ kind: CellKind.Text });
    expect(parse('(-12)')).toMatchObject({ kind: CellKind.Text });
    expect(parse('A-0102')).toMatchObject({ kind: CellKind.Text, keepText: true });
    expect(formattedNumber('$')).toBeNaN();
  });

  it('reads blanks, booleans and Excel error values', () => {
    expect(parse('   ')).toMatchObject({ kind: CellKind.Blank });
    expect(parse('')).toMatchObject({ kind: CellKind.Blank });
    expect(parse('TRUE')).toMatchObject({ kind: CellKind.Bool, value: 1 });
    expect(parse('false')).toMatchObject({ kind: CellKind.Bool, value: 0 });
    // The seven classic error values of ECMA-376 Part 1 §18.17.4.4 (spreadsheet error values).
    for (const e of ['#NULL!', '#DIV/0!', '#VALUE!', '#REF!', '#NAME?', '#NUM!', '#N/A']) {
      expect(parse(e)).toMatchObject({ kind: CellKind.Error, keepText: true });
    }
    expect(parse('#hashtag')).toMatchObject({ kind: CellKind.Text });
  });
});

describe('ISO 8601 dates as days since 1970-01-01', () => {
  it('agrees with the POSIX epoch formula', () => {
    for (const [y, m, d] of [[1970, 1, 1], [2000, 2, 29], [2024, 3, 1], [1969, 12, 31], [1900, 3, 1], [2100, 12, 31]] as const) {
      const text = `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
      expect(isoDateToDays(text)).toBe(posixDays(y, m, d));
      expect(parse(text)).toMatchObject({ kind: CellKind.Date, value: posixDays(y, m, d) });
    }
  });

  it('adds the time of day as a fraction and applies a zone offset', () => {
    expect(isoDateToDays('2024-03-01T12:00')).toBeCloseTo(posixDays(2024, 3, 1) + 0.5, 12);
    expect(isoDateToDays('2024-03-01T12:00:00+02:00')).toBeCloseTo(posixDays(2024, 3, 1) + 10 / 24, 12);
  });

  it('refuses days that do not exist', () => {
    expect(isoDateToDays('2023-02-29')).toBeNaN();
    expect(isoDateToDays('2024-13-01')).toBeNaN();
    expect(parse('2023-02-30')).toMatchObject({ kind: CellKind.Text });
  });
});

describe('a column written with decimal commas (decimalCommaColumn)', () => {
  const column = (cells: string[]): RawColumn => {
    const kinds = new Uint8Array(cells.length), numbers = new Float64Array(cells.length);
    const texts: Array<string | undefined> = [];
    cells.forEach((c, r) => { const p = parse(c); kinds[r] = p.kind; numbers[r] = p.value; texts.push(p.keepText ? c : undefined); });
    return { name: 'X', letter: 'A', kinds, numbers, texts } as unknown as RawColumn;
  };
  it('reads the ambiguous cells with the comma once the column shows it uses one', () => {
    const c = column(['1.234,5', '987,25', '1.234', '12', '2.000.000']);
    expect(decimalCommaColumn(c, false)).toMatchObject({ written: 2, example: '1.234,5' });
    expect(Array.from(c.numbers)).toEqual([1234.5, 987.25, 1234, 12, 2000000]);
  });
  it('leaves a column that also has a decimal point as it was', () => {
    const c = column(['1,5', '2.75', '1.234']);
    expect(decimalCommaColumn(c, false)).toBeNull();
    expect(Array.from(c.numbers)).toEqual([1.5, 2.75, 1.234]);
    // unless the study says the decimal mark is a comma
    const forced = column(['1.234', '1,234', '5']);
    expect(decimalCommaColumn(forced, true)).toMatchObject({ changed: 2 });
    expect(Array.from(forced.numbers)).toEqual([1234, 1.234, 5]);
  });
  it('reads numbers with space groups and percent signs', () => {
    expect(decimalCommaNumber('1 234,5')).toBe(1234.5);
    expect(decimalCommaNumber('\u2212 3,25 %')).toBe(-3.25);
    expect(decimalCommaNumber('1.23.4')).toBeNaN();
  });
});
