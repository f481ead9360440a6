// Number text and spreadsheet formats shared by the renderers. The number styles are common
// practice (thousands separators, fixed decimals, "< 0.001" for small p-values); the spreadsheet
// codes follow ECMA-376 Part 1, §18.8.31 (numFmt) and are read back by exceljs in render.test.ts.

import { describe, expect, it } from 'vitest';
import type { Document } from '../../main/report/model/document.ts';
import { checkDocument, excelNumberFormat, footnoteNumbers, formatNumber, superscriptDigits } from '../../main/report/model/format.ts';
import { sampleDocument } from './sample-document.ts';

describe('formatNumber', () => {
  it('writes counts, estimates, shares and p-values', () => {
    expect(formatNumber(1234567, { style: 'integer' })).toBe('1,234,567');
    expect(formatNumber(-35.2, { style: 'decimal', decimals: 1 })).toBe('-35.2');
    expect(formatNumber(-35.2, { style: 'decimal', decimals: 1, unit: 'USD' })).toBe('-35.2 USD');
    expect(formatNumber(0.256, { style: 'percent' })).toBe('25.6%');
    expect(formatNumber(0.094, { style: 'pvalue' })).toBe('0.094');
    expect(formatNumber(0.0004, { style: 'pvalue' })).toBe('< 0.001');
    expect(formatNumber(12.5, { style: 'decimal', decimals: 1, signed: true })).toBe('+12.5');
    expect(formatNumber(0, { style: 'decimal', decimals: 1, signed: true })).toBe('0.0');
  });
  it('drops the sign of a value that rounds to zero', () => {
    expect(formatNumber(-0.004, { style: 'decimal', decimals: 2 })).toBe('0.00');
  });
  it('parses back with Number() (ASCII minus, no unit)', () => {
    for (const v of [-1234.5, -0.5, 7, 1e6 + 0.25]) {
      expect(Number(formatNumber(v, { style: 'decimal', decimals: 2 }).replace(/,/g, ''))).toBeCloseTo(v, 2);
    }
  });
  it('says so when a value is missing or unbounded', () => {
    expect(formatNumber(Number.NaN, { style: 'decimal' })).toBe('not available');
    expect(formatNumber(Number.POSITIVE_INFINITY, { style: 'decimal' })).toBe('unbounded');
  });
});

describe('excelNumberFormat', () => {
  it('matches the text formats', () => {
    expect(excelNumberFormat({ style: 'integer' })).toBe('#,##0');
    expect(excelNumberFormat({ style: 'decimal', decimals: 1 })).toBe('#,##0.0');
    expect(excelNumberFormat({ style: 'percent', decimals: 1 })).toBe('0.0%');
    expect(excelNumberFormat({ style: 'decimal', decimals: 2, unit: 'USD' })).toBe('#,##0.00" USD"');
  });
});

describe('document checks', () => {
  it('numbers footnotes in order of first reference', () => {
    const { doc } = sampleDocument();
    expect([...footnoteNumbers(doc).entries()]).toEqual([['fn-ci', 1], ['fn-hc1', 2]]);
    expect(superscriptDigits(12)).toBe('¹²');
  });
  it('finds rows of the wrong width, unknown footnotes and sections nested too deep', () => {
    const { doc } = sampleDocument();
    const bad: Document = JSON.parse(JSON.stringify(doc));
    const t = bad.sections[2]!.blocks.find((b) => b.kind === 'table')!;
    if (t.kind === 'table') t.rows[0]!.cells.pop();
    bad.sections[0]!.blocks.push({ kind: 'paragraph', runs: [{ kind: 'text', text: 'x', footnote: 'nope' }] });
    bad.sections[1]!.sections![0]!.sections = [{ id: 'a', heading: 'A', blocks: [], sections: [{ id: 'b', heading: 'B', blocks: [] }] }];
    const problems = checkDocument(bad);
    expect(problems.some((p) => /row 1 has 1 cells for 2 columns/.test(p))).toBe(true);
    expect(problems.some((p) => /footnote "nope"/.test(p))).toBe(true);
    expect(problems.some((p) => /deeper than 3/.test(p))).toBe(true);
  });
});
