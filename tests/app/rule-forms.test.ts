// The Rule screen's forms from a blank study: rule first, data later; no silent limits; every
// problem in form words, beside a field the screen shows.

import { describe, expect, it } from 'vitest';
import { checkProgram } from '../../main/api/program.ts';
import type { Comparison, Program } from '../../main/contract/program.ts';
import { blankProgram, blankStudy, keyFromLabel, tidyProgram } from '../../app/lib/draft.ts';
import { assignProblems, programFieldPaths, shownCount } from '../../app/lib/problems.ts';
import { addChild, limitKind, newComparison, newGroup, setLimitKind } from '../../app/lib/rule-tree.ts';
import { sampleStudy } from './helpers.ts';

const check = async (p: Program) => {
  const r = await checkProgram({ program: tidyProgram(p) });
  if (!r.ok) throw new Error('program.check refused');
  return r.value;
};
/** Words of the study file that must not reach the forms. */
const FILE_WORDS = /[{}[\]]|"(all|any|of|in|limit|value|ifEligible|ifIneligible|atLeast|by|else|key|label|column)"|program\.|study file|e\.g\./;

/** The from-scratch study of issue 11, built the way the forms build it, with one step left undone at a time. */
function scratchProgram(): Program {
  const p = blankProgram();
  p.name = 'Household energy grant';
  p.variables = [
    { key: keyFromLabel('Annual income'), label: 'Annual income', type: 'continuous', column: '' },
    { key: keyFromLabel('Household size'), label: 'Household size', type: 'discrete', column: '' },
    { key: keyFromLabel('Age'), label: 'Age', type: 'continuous', column: '' },
  ];
  const first = (p.rule as { all: Comparison[] }).all[0]!;
  first.value = 'annual_income';
  setLimitKind(first, 'table', p);
  return p;
}

describe('rule first, data later', () => {
  it('a variable whose column is not chosen is not a problem of the rule', async () => {
    const p = sampleStudy().program;
    const unmapped = { ...p, variables: p.variables.map((v) => ({ ...v, column: '' })) };
    const c = await check(unmapped);
    expect(c.problems).toEqual([]);
    expect(c.valid).toBe(true);
    expect(c.reading).toMatch(/at least 65/);
  });
  it('labels make short names usable in calculations, unique among the others', () => {
    expect(keyFromLabel('Annual income (USD)')).toBe('annual_income');
    expect(keyFromLabel('Household size')).toBe('household_size');
    expect(keyFromLabel('2nd earner')).toBe('v_2nd_earner');
    expect(keyFromLabel('Age', ['age'])).toBe('age_2');
    expect(keyFromLabel('Max')).toBe('max_value');
    expect(keyFromLabel('  ')).toBe('');
  });
});

describe('no silent defaults', () => {
  it('a new criterion has no limit; the rule cannot be valid until one is typed', async () => {
    const p = scratchProgram();
    const c = newComparison(p);
    expect(c.limit).toBe('');
    expect(limitKind(c)).toBe('number'); // shown in the number field, waiting for its number
    expect(c.value).toBe('age'); // the first continuous variable not compared yet
    (p.rule as { all: unknown[] }).all.push(c);
    const r = await check(p);
    expect(r.valid).toBe(false);
    expect(r.problems).toContainEqual({ path: 'program.rule.all[1].limit', message: expect.stringMatching(/^Type a limit/) });
  });
  it('a new group starts with one incomplete criterion, reported as such', async () => {
    const p = scratchProgram();
    addChild(p.rule, newGroup('any', p));
    const r = await check(p);
    expect(r.problems).toContainEqual({ path: 'program.rule.all[1].any[0].limit', message: expect.stringMatching(/^Type a limit/) });
  });
  it('a new table has no limits in it: one empty row per listed value, each to fill', async () => {
    const p = scratchProgram();
    p.variables[1]!.values = [1, 2, 3];
    const first = (p.rule as { all: Comparison[] }).all[0]!;
    setLimitKind(first, 'table', p);
    expect(first.limit).toEqual({ by: 'household_size', table: { 1: '', 2: '', 3: '' } });
    const r = await check(p);
    expect(r.problems.map((x) => x.path)).toEqual(['program.rule.all[0].limit.table["1"]', 'program.rule.all[0].limit.table["2"]', 'program.rule.all[0].limit.table["3"]']);
    expect(r.problems.every((x) => /^Type a limit/.test(x.message))).toBe(true);
  });
});

describe('every problem in form words, beside a field the screen shows', () => {
  const drafts: Array<[string, () => Program]> = [
    ['a blank study', () => blankStudy().program],
    ['variables without a rule', () => { const p = scratchProgram(); p.rule = { all: [] }; return p; }],
    ['an empty table', scratchProgram],
    ['a table with a row for an undeclared value', () => { const p = scratchProgram(); p.variables[1]!.values = [1, 2]; ((p.rule as { all: Comparison[] }).all[0]!.limit as { table: Record<string, unknown> }).table = { 1: 100, 3: 200 }; return p; }],
    ['a limit that is a word', () => { const p = scratchProgram(); (p.rule as { all: Comparison[] }).all[0]!.limit = 'sixty'; return p; }],
    ['an offer typed as a percent', () => { const p = scratchProgram(); p.offer = { ifEligible: 60, ifIneligible: '' as unknown as number }; return p; }],
    ['equal chances', () => { const p = scratchProgram(); p.offer = { ifEligible: 1, ifIneligible: 1 }; return p; }],
    ['a duplicate short name and a bad one', () => { const p = scratchProgram(); p.variables[2]!.key = 'annual_income'; p.variables[1]!.key = '2x'; return p; }],
    ['values typed wrong', () => { const p = scratchProgram(); p.variables[1]!.values = [1, 1, 'two' as unknown as number]; return p; }],
    ['an empty group and "at least" too high', () => { const p = scratchProgram(); addChild(p.rule, { any: [] }); addChild(p.rule, { atLeast: 3, of: [newComparison(p)] }); return p; }],
    ['a "one of" test with nothing listed', () => { const p = scratchProgram(); addChild(p.rule, { value: 'household_size', in: [] }); return p; }],
    ['a scale that is not a number', () => { const p = scratchProgram(); p.variables[0]!.scale = 'ten' as unknown as number; return p; }],
  ];
  for (const [name, make] of drafts) {
    it(name, async () => {
      const p = make();
      const r = await check(p);
      expect(r.valid).toBe(false);
      for (const problem of r.problems) expect(problem.message, problem.path).not.toMatch(FILE_WORDS);
      const assigned = assignProblems(r.problems, programFieldPaths(tidyProgram(p)));
      expect(assigned.unclaimed, 'problems no field claims').toEqual([]);
      expect(shownCount(assigned)).toBe(r.problems.length);
    });
  }
});
