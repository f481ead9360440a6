import { describe, expect, it } from 'vitest';
import { assignProblems, isWithin, programFieldPaths } from '../../app/lib/problems.ts';
import { validateProgram } from '../../main/rules/validate.ts';
import { sampleStudy } from './helpers.ts';

describe('isWithin respects path boundaries', () => {
  it.each([
    ['program.rule.all[0].limit', 'program.rule.all[0]', true],
    ['program.rule.all[0]', 'program.rule.all[0]', true],
    ['program.rule.all[10]', 'program.rule.all[1]', false],
    ['program.variables[0].keyword', 'program.variables[0].key', false],
    ['program.rule.all[0].limit.table.2', 'program.rule.all[0].limit', true],
  ])('%s within %s: %s', (path, prefix, expected) => expect(isWithin(path, prefix)).toBe(expected));
});

describe('every problem of the validator lands next to a field the Rule screen shows', () => {
  it('assigns each broken field of the sample program to that field', () => {
    const program = structuredClone(sampleStudy().program) as unknown as Record<string, any>;
    program.variables[0].key = '2income';                       // not an identifier
    program.rule.all[1].any[0].limit = 'sixty';                 // unknown variable in a limit
    program.rule.all[0].limit.table['2'] = '28000 +';           // broken expression in a table entry
    program.offer.ifEligible = 1.5;                             // not a probability
    const checked = validateProgram(program, 'program');
    expect(checked.ok).toBe(false);
    if (checked.ok) return;
    const assigned = assignProblems(checked.problems, programFieldPaths(program as never));
    expect(assigned.unclaimed).toEqual([]);
    const fieldOf = (needle: RegExp) => [...assigned.byField].find(([, ps]) => ps.some((p) => needle.test(p.message)))?.[0];
    expect(fieldOf(/sixty/)).toBe('program.rule.all[1].any[0].limit');
    expect(fieldOf(/28000/)).toBe('program.rule.all[0].limit.table["2"]'); // beside its row of the table
    expect([...assigned.byField.keys()]).toContain('program.offer.ifEligible');
    expect([...assigned.byField.keys()].some((k) => k.startsWith('program.variables[0]'))).toBe(true);
  });
  it('leaves a problem no field claims at the top of the screen rather than dropping it', () => {
    const a = assignProblems([{ path: 'elsewhere', message: 'x' }, { path: 'program.name', message: 'y' }], ['program.name']);
    expect(a.unclaimed.map((p) => p.message)).toEqual(['x']);
    expect(a.byField.get('program.name')?.map((p) => p.message)).toEqual(['y']);
  });
});
