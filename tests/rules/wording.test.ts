// Plain-language wording. The expected sentences are written by hand from the meanings in the
// study file format (docs/study-format.md); number formatting follows the English convention of
// comma thousands separators (Chicago Manual of Style, 17th ed., §9.54), and the minus and
// multiplication signs are those of ISO 80000-2:2019 (items 2-9.2, 2-9.4).
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { describeCondition, describeOffer, describeProgram, describeExpression, formatAmount, formatPercent } from '../../main/rules/wording.ts';
import { validateProgram } from '../../main/rules/validate.ts';
import type { Condition, Program } from '../../main/rules/types.ts';
import { EXAMPLE_PROGRAM, exampleCopy } from './example-program.ts';
import { structuredProgram } from './arbitraries.ts';

describe('the example program', () => {
  it('reads as one full sentence plus the offer', () => {
    expect(describeProgram(EXAMPLE_PROGRAM)).toBe(
      'A household is eligible if its annual household income (USD) is at most the limit by people in household ' +
      '(1: 21,000; 2: 28,000; 3: 35,000; otherwise 35,000 + 7,000 × (people in household − 3)), ' +
      'and either its age of oldest member is at least 65, or its annual household income ÷ people in household is at most 6,000. ' +
      'Eligible households are always offered the benefit; the others are never offered.',
    );
  });

  it('uses declared value labels in lookups, sorted by value', () => {
    const p: Program = exampleCopy();
    p.variables[1]!.values = [{ value: 2, label: 'couple' }, { value: 1, label: 'single' }, 3];
    (p.rule as { all: Array<{ limit: unknown }> }).all[0]!.limit = { by: 'size', table: { '3': 35000, couple: 28000, '1': 21000 } };
    const lookup = (p.rule as { all: Condition[] }).all[0]!;
    expect(describeCondition(lookup, p)).toBe(
      'its annual household income (USD) is at most the limit by people in household (single: 21,000; couple: 28,000; 3: 35,000)',
    );
  });
});

describe('offers', () => {
  it('words a lottery among the eligible', () => {
    expect(describeOffer({ ifEligible: 0.6, ifIneligible: 0 }, 'household')).toBe(
      'Eligible households are offered the benefit with probability 60% (a lottery); the others are never offered.',
    );
  });
  it('words partial offers on both sides and plural nouns', () => {
    expect(describeOffer({ ifEligible: 0.125, ifIneligible: 0.05 }, 'family')).toBe(
      'Eligible families are offered the benefit with probability 12.5% (a lottery); the others are offered it with probability 5%.',
    );
    expect(describeOffer({ ifEligible: 0, ifIneligible: 1 }, 'person')).toBe(
      'Eligible people are never offered the benefit; the others are always offered.',
    );
    expect(describeOffer({ ifEligible: 1, ifIneligible: 0 })).toBe('Eligible units are always offered the benefit; the others are never offered.');
  });
});

describe('conditions', () => {
  const p: Program = {
    name: 'Test',
    unit: 'applicant',
    variables: [
      { key: 'score', label: 'Points score', type: 'continuous', column: 'S' },
      { key: 'age', label: 'Age', type: 'continuous', column: 'A', unit: 'years' },
      { key: 'region', label: 'Region', type: 'discrete', column: 'R', values: [{ value: 1, label: 'North' }, { value: 4, label: 'East' }, 7] },
      { key: 'hh', label: 'HH members', type: 'discrete', column: 'H' },
    ],
    rule: { value: 'score', op: '>', limit: 10 },
    offer: { ifEligible: 1, ifIneligible: 0 },
  };
  const cmp = (value: string, op: '<' | '<=' | '>' | '>=' | '==' | '!=', limit: number | string): Condition => ({ value, op, limit });

  it.each([
    [cmp('score', '<=', 1234567.5), 'its points score is at most 1,234,567.5'],
    [cmp('score', '<', 10), 'its points score is below 10'],
    [cmp('score', '>=', 10), 'its points score is at least 10'],
    [cmp('score', '>', 10), 'its points score is above 10'],
    [cmp('score', '==', 10), 'its points score equals 10'],
    [cmp('score', '!=', -3), 'its points score is not −3'],
    [cmp('age', '>=', 65), 'its age (years) is at least 65'],
    [cmp('region', '==', 4), 'its region equals East'],
    [cmp('hh', '>', 2), 'its HH members is above 2'],
    [cmp('2 * score - age', '>=', 'min(age, 40)'), '2 × points score − age is at least the smaller of age and 40'],
    [cmp('max(score, age, 3) + 1', '<', 'score / (age - 1)'), '(the largest of points score, age and 3) + 1 is below points score ÷ (age − 1)'],
    [cmp('-(score + 1)', '<', '-score'), '−(points score + 1) is below −points score'],
    [{ value: 'region', in: [1, '4', 7] }, 'its region is North, East or 7'],
    [{ value: 'region', in: ['North'] }, 'its region is North'],
    [{ all: [cmp('score', '>', 1), cmp('age', '<', 2), cmp('score', '<', 3)] }, 'its points score is above 1, its age (years) is below 2, and its points score is below 3'],
    [{ any: [cmp('score', '>', 1), cmp('age', '<', 2), cmp('score', '<', 3)] }, 'at least one of: its points score is above 1; its age (years) is below 2; its points score is below 3'],
    [{ atLeast: 2, of: [cmp('score', '>', 1), cmp('age', '<', 2), cmp('score', '<', 3)] }, 'at least 2 of these: its points score is above 1; its age (years) is below 2; its points score is below 3'],
    [{ not: cmp('score', '>', 1) }, 'it is not the case that its points score is above 1'],
    [{ not: { any: [cmp('score', '>', 1), cmp('age', '<', 2)] } }, 'it is not the case that (either its points score is above 1, or its age (years) is below 2)'],
    [{ all: [{ any: [cmp('score', '>', 1), cmp('age', '<', 2)] }, cmp('score', '<', 3)] },
      '(either its points score is above 1, or its age (years) is below 2), and its points score is below 3'],
    [{ value: 'score', op: '>', limit: 10, label: 'points test' }, 'its points score is above 10 (“points test”)'],
  ] as Array<[Condition, string]>)('%j', (c, expected) => {
    expect(describeCondition(c, p)).toBe(expected);
  });

  it('opens with the right article', () => {
    expect(describeProgram(p)).toBe('An applicant is eligible if its points score is above 10. Eligible applicants are always offered the benefit; the others are never offered.');
    expect(describeProgram({ ...p, unit: 'user' })).toMatch(/^A user is eligible/);
    expect(describeProgram({ ...p, unit: undefined })).toMatch(/^A unit is eligible/);
  });
});

describe('numbers', () => {
  it.each([
    [21000, '21,000'], [1234567.5, '1,234,567.5'], [999, '999'], [0.5, '0.5'], [-35000, '−35,000'], [1e21, '1e+21'], [1e-7, '1e-7'], [0, '0'],
  ])('formatAmount(%d) = %s', (n, s) => {
    expect(formatAmount(n)).toBe(s);
  });
  it.each([[0.6, '60%'], [1 / 3, '33.33%'], [0.0001, '0.01%'], [0.00001, '0.001%'], [0.999999, '99.9999%'], [0.99999999, '99.999999%'], [1, '100%']])('formatPercent(%d) = %s', (p, s) => {
    expect(formatPercent(p)).toBe(s);
  });
  it('words expressions with labels and signs', () => {
    expect(describeExpression('35000 + 7000 * (size - 3)', EXAMPLE_PROGRAM)).toBe('35,000 + 7,000 × (people in household − 3)');
  });
});

describe('totality', () => {
  it('words every valid program without throwing, deterministically (property)', () => {
    fc.assert(fc.property(structuredProgram, (input) => {
      const r = validateProgram(input);
      if (!r.ok) return;
      const text = describeProgram(r.value);
      expect(text).toMatch(/ is eligible if .+\. Eligible .+\.$/);
      expect(text).not.toContain('undefined');
      expect(text).not.toContain('NaN');
      expect(describeProgram(r.value)).toBe(text);
    }), { numRuns: 300 });
  });
});
