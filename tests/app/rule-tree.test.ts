import { describe, expect, it } from 'vitest';
import type { Comparison, Condition, LookupLimit } from '../../main/contract/program.ts';
import {
  addChild, childPath, childrenOf, conditionKind, limitKind, newComparison, removeChild, setGroupKind, setLimitKind,
} from '../../app/lib/rule-tree.ts';
import { lowerValidatedProgram } from '../../main/rules/compile.ts';
import { validateProgram } from '../../main/rules/validate.ts';
import { sampleStudy } from './helpers.ts';

function leafPaths(c: Condition, path: string, out: string[] = []): string[] {
  const kind = conditionKind(c);
  if (kind === 'compare' || kind === 'member') out.push(path);
  childrenOf(c).forEach((child, i) => leafPaths(child, childPath(path, c, i), out));
  return out;
}

describe('the Rule screen names criteria with the compiler\'s paths', () => {
  it('gives every leaf the JSON path the compiled program gives its atom', () => {
    const program = sampleStudy().program;
    const compiled = lowerValidatedProgram(program);
    expect(leafPaths(program.rule, 'program.rule')).toEqual(compiled.atoms.map((a) => a.path));
  });
});

describe('form edits keep the program valid and the members in place', () => {
  it('changes a group between all, any and at least k without losing members', () => {
    const { program } = sampleStudy();
    const inner = (program.rule as { all: Condition[] }).all[1]!;
    setGroupKind(inner, 'atLeast', 2);
    expect(inner).toEqual({ atLeast: 2, of: childrenOf(inner) });
    expect(childrenOf(inner)).toHaveLength(2);
    setGroupKind(inner, 'all');
    expect(conditionKind(inner)).toBe('all');
    expect(validateProgram(program).ok).toBe(true);
  });
  it('at least k never asks for more members than the group has after a removal', () => {
    const g: Condition = { atLeast: 2, of: [{ value: 'a', op: '<', limit: 1 }, { value: 'b', op: '<', limit: 1 }] };
    removeChild(g, 0);
    expect(g).toMatchObject({ atLeast: 1 });
  });
  it('turns a number limit into a table by the discrete variable with empty rows, never inventing limits', () => {
    const { program } = sampleStudy();
    program.variables[1]!.values = [1, 2, 3];
    const age = ((program.rule as { all: Condition[] }).all[1] as { any: Comparison[] }).any[0]!;
    setLimitKind(age, 'table', program);
    expect(limitKind(age)).toBe('table');
    expect(age.limit).toEqual({ by: 'size', table: { 1: '', 2: '', 3: '' } } satisfies LookupLimit);
    expect(validateProgram(program).ok).toBe(false);
    const number = ((program.rule as { all: Condition[] }).all[0] as Comparison);
    number.limit = 65;
    setLimitKind(number, 'expression', program);
    expect(number.limit).toBe('65');
    expect(limitKind(number)).toBe('number');
  });
  it('adds a new criterion on a continuous variable, refused until its limit is typed', () => {
    const { program } = sampleStudy();
    const c = newComparison(program);
    addChild(program.rule, c);
    expect(validateProgram(program).ok).toBe(false);
    c.limit = 30000;
    expect(validateProgram(program).ok).toBe(true);
  });
});
