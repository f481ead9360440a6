// Short names of criteria (main/rules/short-name.ts): the analyst's label when given, else the
// criterion in the variables' keys with the mathematical signs of ISO 80000-2 (≤, ≥, ≠, ×, ÷, −).
import { describe, expect, it } from 'vitest';
import { criterionShortName, distinctShortNames } from '../../main/rules/short-name.ts';
import type { Condition, Program } from '../../main/rules/types.ts';

const program: Program = {
  name: 'Invented test program',
  unit: 'household',
  variables: [
    { key: 'income', label: 'Annual household income', type: 'continuous', unit: 'USD', column: 'INCOME' },
    { key: 'size', label: 'People in household', type: 'discrete', column: 'SIZE' },
    { key: 'region', label: 'Region', type: 'discrete', column: 'REGION' },
  ],
  rule: { value: 'income', op: '<=', limit: 30000 },
  offer: { ifEligible: 1, ifIneligible: 0 },
} as Program;

const name = (c: Condition) => criterionShortName(c);
void program;

describe('a criterion’s short name', () => {
  it('is the analyst’s label when there is one', () => {
    expect(name({ value: 'income', op: '<=', limit: 30000, label: 'income test' })).toBe('income test');
  });
  it('writes a comparison with keys, signs and grouped numbers', () => {
    expect(name({ value: 'income', op: '<=', limit: 30000 })).toBe('income ≤ 30,000');
    expect(name({ value: 'income / size', op: '>', limit: 6000.5 })).toBe('income ÷ size > 6,000.5');
    expect(name({ value: '0.6 * income - 3 * size', op: '>=', limit: 45 })).toBe('0.6 × income − 3 × size ≥ 45');
    expect(name({ value: 'income', op: '!=', limit: 0 })).toBe('income ≠ 0');
  });
  it('keeps the parentheses the grammar needs', () => {
    expect(name({ value: '(income - 100) * size', op: '<', limit: 5 })).toBe('(income − 100) × size < 5');
  });
  it('names a limit that comes from a table by the variable it depends on', () => {
    expect(name({ value: 'income', op: '<=', limit: { by: 'size', table: { '1': 20000, '2': 25000 } } })).toBe('income ≤ limit by size');
  });
  it('writes membership and groups', () => {
    expect(name({ value: 'region', in: [1, 4, 7] })).toBe('region is 1, 4 or 7');
    expect(name({ not: { value: 'income', op: '<', limit: 10 } })).toBe('not (income < 10)');
    expect(name({ atLeast: 2, of: [{ value: 'income', op: '<', limit: 1 }, { value: 'size', op: '>', limit: 2 }, { value: 'region', in: [3] }] }))
      .toBe('at least 2 of (income < 1; size > 2; region is 3)');
  });
  it('makes repeated names distinct by their place', () => {
    expect(distinctShortNames(['a ≤ 1', 'b ≥ 2', 'a ≤ 1'])).toEqual(['a ≤ 1 (1)', 'b ≥ 2', 'a ≤ 1 (3)']);
  });
});
