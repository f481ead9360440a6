import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  evaluateExpression, exprFromSource, formatExpression, parseExpression, variablesIn,
  MAX_EXPRESSION_DEPTH, MAX_EXPRESSION_LENGTH,
} from '../../main/rules/expression.ts';
import type { ExprNode } from '../../main/rules/types.ts';
import { exprTree, stripSpans } from './arbitraries.ts';

function parsed(text: string): ExprNode {
  const r = parseExpression(text);
  if (!r.ok) throw new Error(`expected ${JSON.stringify(text)} to parse: ${r.errors[0]?.message}`);
  return r.node;
}

function evaluate(text: string, values: Record<string, number> = {}): number {
  return evaluateExpression(parsed(text), (k) => values[k] ?? NaN);
}

function firstError(text: string): { message: string; position: number } {
  const r = parseExpression(text);
  if (r.ok) throw new Error(`expected ${JSON.stringify(text)} to be refused`);
  return r.errors[0]!;
}

describe('numbers', () => {
  // Source: ECMA-262 (2022), §7.1.4.1.1 StringToNumber — our decimal literals must read exactly
  // as the standard's conversion reads the same digits (round to nearest double).
  it.each(['35000', '0.5', '1e3', '2.5E-3', '.5', '7.', '1e+2', '0.1', '123456789012345678901234567890'])('reads %s as Number() does', (text) => {
    const n = parsed(text);
    expect(n).toMatchObject({ kind: 'num', value: Number(text), start: 0, end: text.length });
  });
});

describe('precedence and associativity', () => {
  // Source: the usual conventions of arithmetic (ISO 80000-2:2019, item 2-9 on the order of
  // operations); expected values computed by hand.
  it.each([
    ['2 + 3 * 4', 14],
    ['(2 + 3) * 4', 20],
    ['10 - 4 - 3', 3],
    ['64 / 4 / 2', 8],
    ['2 * 3 / 4', 1.5],
    ['-2 * 3', -6],
    ['- - 2', 2],
    ['+3 - -3', 6],
    ['-(2 + 3) * 2', -10],
    ['min(3, 1, 2)', 1],
    ['max(3, 1, 2) - min(4, 5)', -1],
    ['35000 + 7000 * (5 - 3)', 49000],
    ['1e3 / 8', 125],
  ])('%s = %d', (text, expected) => {
    expect(evaluate(text)).toBe(expected);
  });

  it('builds left-nested trees for chains of the same level', () => {
    const n = stripSpans(parsed('a - b - c'));
    expect(n).toEqual({
      kind: 'bin', op: '-',
      left: { kind: 'bin', op: '-', left: { kind: 'var', key: 'a' }, right: { kind: 'var', key: 'b' } },
      right: { kind: 'var', key: 'c' },
    });
  });

  it('records spans, parentheses included', () => {
    const n = parsed('income / (size - 3)');
    expect(n).toMatchObject({ kind: 'bin', start: 0, end: 19, right: { kind: 'bin', start: 9, end: 19 } });
  });

  it('evaluates variables through the callback', () => {
    expect(evaluate('35000 + 7000 * (size - 3)', { size: 5 })).toBe(49000);
    expect(evaluate('income / size', { income: 12000, size: 4 })).toBe(3000);
  });

  it('follows IEEE 754 for division by zero (IEEE 754-2019, §7.3)', () => {
    expect(evaluate('1 / 0')).toBe(Infinity);
    expect(evaluate('-1 / 0')).toBe(-Infinity);
    expect(evaluate('0 / 0')).toBeNaN();
  });
});

describe('syntax errors carry a position and a plain sentence', () => {
  it.each([
    ['income +', 8, 'ends too early'],
    ['income + * 2', 9, "expected a number, a variable or '(' at position 10"],
    ['sqrt(income)', 0, "unknown function 'sqrt' at position 1: only min and max are available"],
    ['2 * (income + 3', 15, "')' missing for '(' at position 5"],
    ['income + 3)', 10, "')' at position 11 has no matching '('"],
    ['35,000', 0, "'35,000' at position 1: write numbers without thousands separators (35000)"],
    ['income <= 1,234,567', 7, 'comparisons belong'],
    ['1,234,567 - income', 0, 'without thousands separators (1234567)'],
    ['0,5 * income', 0, 'write decimals with a point (0.5)'],
    ['35 000', 3, 'write numbers without spaces'],
    ['income ^ 2', 7, 'powers are not available'],
    ['income ** 2', 7, 'powers are not available'],
    ['50%', 2, 'percentages as fractions'],
    ['$35000', 0, 'without currency signs'],
    ['income × 2', 7, 'write multiplication as *'],
    ['min(income)', 0, 'needs at least two arguments'],
    ['min()', 0, 'needs at least two arguments'],
    ['max + 1', 0, 'is a function'],
    ['', 0, 'the formula is empty'],
    ['   ', 0, 'the formula is empty'],
    ['2income', 1, 'put an operator between a number and a variable'],
    ['1.2.3', 3, 'one decimal point'],
    ['1e999', 0, 'too large'],
    ['income size', 7, "expected an operator (+ - * /) or the end"],
    ['min(a, b), c', 9, 'a comma only separates the arguments of min or max'],
    ['"income"', 0, 'without quotes'],
    ['income # 2', 7, 'cannot be used in a formula'],
  ])('%j → position %i, "%s"', (text, position, phrase) => {
    const e = firstError(text);
    expect(e.position).toBe(position);
    expect(e.message).toContain(phrase);
  });

  it('accepts commas between min/max arguments, even without spaces', () => {
    expect(evaluate('max(0,100)')).toBe(100);
    expect(evaluate('min(35000, max(1,2))')).toBe(2);
  });
});

describe('abuse guards', () => {
  it('refuses text over the length limit without scanning it', () => {
    const e = firstError('1+'.repeat(MAX_EXPRESSION_LENGTH));
    expect(e.message).toContain('the limit is 2,000');
  });

  it('refuses nesting deeper than the limit instead of overflowing the stack', () => {
    const ok = '('.repeat(MAX_EXPRESSION_DEPTH) + '1' + ')'.repeat(MAX_EXPRESSION_DEPTH);
    expect(evaluate(ok)).toBe(1);
    const deep = '('.repeat(MAX_EXPRESSION_DEPTH + 1) + '1' + ')'.repeat(MAX_EXPRESSION_DEPTH + 1);
    expect(firstError(deep).message).toContain(`nests more than ${MAX_EXPRESSION_DEPTH} levels`);
    expect(firstError('-'.repeat(500) + '1').message).toContain('nests more than');
    expect(firstError('min('.repeat(300) + '1').message).toContain('nests more than');
  });

  it('handles the longest allowed flat chain (no recursion per operator)', () => {
    const chain = Array.from({ length: 1000 }, () => '1').join('+');
    expect(chain.length).toBeLessThanOrEqual(MAX_EXPRESSION_LENGTH);
    expect(evaluate(chain)).toBe(1000);
  });

  it('never throws on arbitrary text', () => {
    const alphabet = fc.constantFrom(...'0123456789.,eE+-*/()minax_ sqrt%$^<>=\t'.split(''));
    fc.assert(fc.property(fc.oneof(fc.string(), fc.string({ unit: alphabet, maxLength: 40 })), (text) => {
      const r = parseExpression(text);
      if (!r.ok) {
        expect(r.errors.length).toBeGreaterThan(0);
        expect(r.errors[0]!.message.length).toBeGreaterThan(0);
        expect(r.errors[0]!.position).toBeGreaterThanOrEqual(0);
        expect(r.errors[0]!.position).toBeLessThanOrEqual(text.length);
      }
    }), { numRuns: 1500 });
  });
});

describe('exprFromSource', () => {
  it('turns a finite number into a num node', () => {
    const r = exprFromSource(21000);
    expect(r.ok && r.node).toMatchObject({ kind: 'num', value: 21000 });
  });
  it.each([NaN, Infinity, -Infinity])('refuses %d', (n) => {
    const r = exprFromSource(n);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]!.message).toContain('finite number');
  });
  it.each([true, null, undefined, {}, [1]])('refuses %j', (v) => {
    const r = exprFromSource(v as unknown as number);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]!.message).toContain('expected a number or a formula');
  });
  it('parses strings', () => {
    const r = exprFromSource('income / size');
    expect(r.ok && variablesIn(r.node)).toEqual(new Set(['income', 'size']));
  });
});

describe('variablesIn', () => {
  it('lists each key once, function names excluded', () => {
    expect(variablesIn(parsed('min(a, b * a) + max(c, 2) - -d / a'))).toEqual(new Set(['a', 'b', 'c', 'd']));
    expect(variablesIn(parsed('3 * (4 + 5)')).size).toBe(0);
  });
});

describe('formatExpression', () => {
  it.each([
    ['a - (b - c)', 'a - (b - c)'],
    ['(a - b) - c', 'a - b - c'],
    ['((a * b)) / c', 'a * b / c'],
    ['a / (b * c)', 'a / (b * c)'],
    ['a * (b + c)', 'a * (b + c)'],
    ['-(a + b)', '-(a + b)'],
    ['-(a * b)', '-(a * b)'],
    ['(-a) * b', '-a * b'],
    ['a - -b', 'a - -b'],
    ['+a', 'a'],
    ['min(a,b ,  c)', 'min(a, b, c)'],
    ['1e3', '1000'],
    ['35000 + 7000 * (size - 3)', '35000 + 7000 * (size - 3)'],
  ])('%s → %s', (text, expected) => {
    expect(formatExpression(parsed(text))).toBe(expected);
  });

  it('writes negative literals (from numbers in the file) so that their value survives', () => {
    const node: ExprNode = { kind: 'bin', op: '-', left: { kind: 'var', key: 'a', start: 0, end: 0 }, right: { kind: 'num', value: -5, start: 0, end: 0 }, start: 0, end: 0 };
    const text = formatExpression(node);
    expect(text).toBe('a - -5');
    expect(evaluate(text, { a: 1 })).toBe(6);
  });

  const tree = exprTree(['a', 'b', 'income', 'size']);

  it('round-trips: parse(format(n)) has the same structure as n (property)', () => {
    fc.assert(fc.property(tree, (n) => {
      expect(stripSpans(parsed(formatExpression(n)))).toEqual(stripSpans(n));
    }), { numRuns: 1000 });
  });

  it('evaluating the re-parsed text gives the original value (property)', () => {
    const values = fc.record({ a: fc.double(), b: fc.double(), income: fc.double(), size: fc.integer({ min: -3, max: 9 }) });
    fc.assert(fc.property(tree, values, (n, v) => {
      const valueOf = (k: string): number => v[k as keyof typeof v];
      expect(Object.is(evaluateExpression(parsed(formatExpression(n)), valueOf), evaluateExpression(n, valueOf))).toBe(true);
    }), { numRuns: 1000 });
  });
});
