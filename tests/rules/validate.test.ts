// Validation of programs. The expected paths and phrases follow the study file format
// (docs/study-format.md: "every problem ... is reported with its JSON path and a sentence");
// each bad program below breaks one rule of that format.
import { describe, it, expect } from 'vitest';
import { validateProgram, MAX_CONDITION_DEPTH } from '../../main/rules/validate.ts';
import { closest, editDistance } from '../../main/rules/json-read.ts';
import type { Problem } from '../../main/rules/types.ts';
import { EXAMPLE_PROGRAM, exampleCopy } from './example-program.ts';

function problemsOf(input: unknown): Problem[] {
  const r = validateProgram(input);
  if (r.ok) throw new Error('expected the program to be refused');
  return r.problems;
}

function expectProblem(input: unknown, path: string, phrase: string): void {
  const problems = problemsOf(input);
  const hit = problems.find((p) => p.path === path && p.message.includes(phrase));
  if (hit === undefined) {
    throw new Error(`no problem at ${path} containing ${JSON.stringify(phrase)}; got:\n${problems.map((p) => `  ${p.path}: ${p.message}`).join('\n')}`);
  }
}

function expectValid(input: unknown): void {
  const r = validateProgram(input);
  if (!r.ok) throw new Error(`expected valid; got:\n${r.problems.map((p) => `  ${p.path}: ${p.message}`).join('\n')}`);
}

/** The example with a change applied. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function changed(edit: (p: any) => void): unknown {
  const p = exampleCopy();
  edit(p);
  return p;
}

describe('the example program of the study format', () => {
  it('validates cleanly', () => {
    const r = validateProgram(exampleCopy());
    expect(r).toEqual({ ok: true, value: EXAMPLE_PROGRAM });
  });

  it('returns a fresh copy with numbers and text exactly as given', () => {
    const input = changed((p) => { p.rule.all[0].limit.else = ' 35000+7000*(size-3) '; p.variables[0].scale = 1e4; });
    const r = validateProgram(input);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value).not.toBe(input);
    expect(r.value).toEqual(input);
    expect((r.value.rule as { all: Array<{ limit: { else: string } }> }).all[0]!.limit.else).toBe(' 35000+7000*(size-3) ');
    (input as { name: string }).name = 'changed afterwards';
    expect(r.value.name).toBe(EXAMPLE_PROGRAM.name);
  });

  it('uses the base path given', () => {
    const r = validateProgram(changed((p) => { delete p.offer; }), 'study.program');
    expect(!r.ok && r.problems[0]!.path).toBe('study.program.offer');
    const top = validateProgram(changed((p) => { delete p.offer; }), '');
    expect(!top.ok && top.problems[0]!.path).toBe('offer');
  });

  it('reports a repeated faulty formula at each place it occurs', () => {
    const bad = { value: 'income / (size', op: '<=', limit: 1 };
    const problems = problemsOf(changed((p) => { p.rule.all[1].any = [bad, bad, { ...bad }]; }));
    expect(problems.map((q) => q.path)).toEqual([0, 1, 2].map((i) => `program.rule.all[1].any[${i}].value`));
    expect(new Set(problems.map((q) => q.message)).size).toBe(1);
  });
});

describe('bad programs: each problem has its path and a plain sentence', () => {
  const cases: Array<[string, unknown, string, string]> = [
    ['not an object', 42, 'program', 'must be an object'],
    ['a list instead of an object', [], 'program', 'found a list'],
    ['missing name', changed((p) => { delete p.name; }), 'program.name', 'missing its "name"'],
    ['variables of the wrong type', changed((p) => { p.variables = 'income'; }), 'program.variables', 'must be a list'],
    ['no variables at all', changed((p) => { p.variables = []; }), 'program.variables', 'no variables are declared'],
    ['unknown field in a comparison (typo)', changed((p) => { p.rule.all[1].any[0].limt = 65; delete p.rule.all[1].any[0].limit; }),
      'program.rule.all[1].any[0].limt', 'did you mean "limit"?'],
    ['unknown field in the program', changed((p) => { p.rulez = {}; }), 'program.rulez', 'did you mean "rule"?'],
    ['variable key not an identifier', changed((p) => { p.variables[2].key = 'oldest age'; }), 'program.variables[2].key', 'e.g. "oldest_age"'],
    ['variable key equal to a function name', changed((p) => { p.variables[2].key = 'max'; }), 'program.variables[2].key', 'name of a formula function'],
    ['duplicate variable keys', changed((p) => { p.variables[2].key = 'size'; }), 'program.variables[2].key', 'already the key of program.variables[1]'],
    ['variable type misspelled', changed((p) => { p.variables[0].type = 'continous'; }), 'program.variables[0].type', 'did you mean "continuous"?'],
    ['variable type from another vocabulary', changed((p) => { p.variables[1].type = 'categorical'; }), 'program.variables[1].type', 'did you mean "discrete"?'],
    ['scale not positive', changed((p) => { p.variables[0].scale = 0; }), 'program.variables[0].scale', 'must be a positive number'],
    ['scale in quotes', changed((p) => { p.variables[0].scale = '10000'; }), 'program.variables[0].scale', 'without quotes'],
    ['scale on a discrete variable', changed((p) => { p.variables[1].scale = 1; }), 'program.variables[1].scale', 'only to continuous variables'],
    ['range reversed', changed((p) => { p.variables[2].range = [110, 18]; }), 'program.variables[2].range', 'start with the smaller number'],
    ['range not a pair', changed((p) => { p.variables[2].range = [18]; }), 'program.variables[2].range', 'two numbers'],
    ['values on a continuous variable', changed((p) => { p.variables[2].values = [1, 2]; }), 'program.variables[2].values', 'applies to discrete variables'],
    ['duplicate declared value', changed((p) => { p.variables[1].values = [1, 2, 2]; }), 'program.variables[1].values[2]', 'already declared'],
    ['label that reads as another number', changed((p) => { p.variables[1].values = [{ value: 1, label: '2' }, 2]; }), 'program.variables[1].values[0].label', 'reads as the number 2'],
    ['unknown variable in an expression', changed((p) => { p.rule.all[1].any[1].value = 'incme / size'; }),
      'program.rule.all[1].any[1].value', '"incme" (at position 1 in "incme / size") is not a declared variable: did you mean "income"?'],
    ['syntax error in an expression', changed((p) => { p.rule.all[1].any[1].value = 'income / (size'; }),
      'program.rule.all[1].any[1].value', "')' missing for '(' at position 10"],
    ['thousands separator in a limit', changed((p) => { p.rule.all[1].any[1].limit = '6,000'; }),
      'program.rule.all[1].any[1].limit', 'without thousands separators (6000)'],
    ['expression of the wrong type', changed((p) => { p.rule.all[1].any[0].limit = true; }), 'program.rule.all[1].any[0].limit', 'expected a number or a formula in quotes'],
    ['membership on a continuous variable', changed((p) => { p.rule.all[1].any[0] = { value: 'age', in: [65, 66] }; }),
      'program.rule.all[1].any[0].value', '"age" is continuous'],
    ['membership on an expression', changed((p) => { p.rule.all[1].any[0] = { value: 'size + 1', in: [2] }; }),
      'program.rule.all[1].any[0].value', 'not a formula'],
    ['empty membership list', changed((p) => { p.rule.all[1].any[0] = { value: 'size', in: [] }; }), 'program.rule.all[1].any[0].in', 'empty list'],
    ['membership value not declared', changed((p) => { p.variables[1].values = [1, 2, 3]; p.rule.all[1].any[0] = { value: 'size', in: [1, 9] }; }),
      'program.rule.all[1].any[0].in[1]', '9 is not one of the values declared for "size"'],
    ['lookup by a continuous variable', changed((p) => { p.rule.all[0].limit.by = 'age'; }), 'program.rule.all[0].limit.by', '"age" is continuous'],
    ['lookup by an unknown variable', changed((p) => { p.rule.all[0].limit.by = 'sise'; }), 'program.rule.all[0].limit.by', 'did you mean "size"?'],
    ['empty lookup table', changed((p) => { p.rule.all[0].limit.table = {}; }), 'program.rule.all[0].limit.table', 'the table is empty'],
    ['table key that is not a value', changed((p) => { p.rule.all[0].limit.table.one = 21000; }),
      'program.rule.all[0].limit.table["one"]', 'is not a value of "size"'],
    ['table key outside the declared values', changed((p) => { p.variables[1].values = [1, 2, 3]; p.rule.all[0].limit.table['4'] = 1; }),
      'program.rule.all[0].limit.table["4"]', '4 is not one of the values declared for "size"'],
    ['two table keys meaning the same value', changed((p) => { p.rule.all[0].limit.table['1.0'] = 21000; }),
      'program.rule.all[0].limit.table["1.0"]', 'table keys "1" and "1.0" both mean 1'],
    ['a label and a number meaning the same value', changed((p) => {
      p.variables[1].values = [{ value: 1, label: 'single' }, 2, 3];
      p.rule.all[0].limit.table.single = 21000;
    }), 'program.rule.all[0].limit.table["single"]', 'both mean 1'],
    ['lookup without an entry for a declared value and no else', changed((p) => {
      p.variables[1].values = [1, 2, 3, 4, 5];
      delete p.rule.all[0].limit.else;
    }), 'program.rule.all[0].limit', 'no limit for size 4, 5'],
    ['atLeast not a whole number', changed((p) => { p.rule = { atLeast: 1.5, of: p.rule.all }; }), 'program.rule.atLeast', 'whole number'],
    ['atLeast zero', changed((p) => { p.rule = { atLeast: 0, of: p.rule.all }; }), 'program.rule.atLeast', '1 or more'],
    ['atLeast larger than its list', changed((p) => { p.rule = { atLeast: 3, of: p.rule.all }; }), 'program.rule.atLeast', 'could never hold'],
    ['empty all', changed((p) => { p.rule = { all: [] }; }), 'program.rule.all', 'empty list'],
    ['empty any', changed((p) => { p.rule.all[1].any = []; }), 'program.rule.all[1].any', 'empty list'],
    ['all and any together', changed((p) => { p.rule = { all: p.rule.all, any: p.rule.all }; }), 'program.rule', 'mixes "all" and "any"'],
    ['condition with no form', changed((p) => { p.rule.all[1] = { label: 'age test' }; }), 'program.rule.all[1]', 'none of the known forms'],
    ['condition with only a value', changed((p) => { p.rule.all[1] = { value: 'age' }; }), 'program.rule.all[1]', 'needs an "op" and a "limit"'],
    ['operator =<', changed((p) => { p.rule.all[0].op = '=<'; }), 'program.rule.all[0].op', 'did you mean "<="?'],
    ['operator =', changed((p) => { p.rule.all[1].any[0].op = '='; }), 'program.rule.all[1].any[0].op', 'did you mean "=="?'],
    ['operator in words', changed((p) => { p.rule.all[1].any[0].op = 'gte'; }), 'program.rule.all[1].any[0].op', 'did you mean ">="?'],
    ['offer probability above 1', changed((p) => { p.offer.ifEligible = 60; }), 'program.offer.ifEligible', 'for 60% write 0.6'],
    ['offer probability as text', changed((p) => { p.offer.ifEligible = '60%'; }), 'program.offer.ifEligible', '0.6 for 60%'],
    ['offer probability negative', changed((p) => { p.offer.ifIneligible = -0.1; }), 'program.offer.ifIneligible', 'a number from 0 to 1'],
    ['offer that does not depend on the formula', changed((p) => { p.offer = { ifEligible: 0.5, ifIneligible: 0.5 }; }),
      'program.offer', 'would not depend on the formula'],
    ['division by a constant zero', changed((p) => { p.rule.all[1].any[1].value = 'income / (3 - 3)'; }),
      'program.rule.all[1].any[1].value', 'which is always 0'],
    ['division by an expression that is always zero', changed((p) => { p.rule.all[1].any[1].value = 'income / (2 * size - size - size)'; }),
      'program.rule.all[1].any[1].value', 'which is always 0'],
    ['division by a discrete expression that can be zero', changed((p) => {
      p.variables[1].values = [1, 2, 3, 4];
      p.rule.all[1].any[1].value = 'income / (size - 3)';
    }), 'program.rule.all[1].any[1].value', '"(size - 3)" can be 0 when size is 3'],
    ['division by a continuous expression that can be zero', changed((p) => {
      p.variables[2].range = [18, 110];
      p.rule.all[1].any[0].value = '1000 / (age - 65)';
    }), 'program.rule.all[1].any[0].value', 'can be 0 when age is in its declared range [18, 110]'],
    ['division by a non-linear expression that can be zero', changed((p) => {
      p.variables[2].range = [-2, 2];
      p.rule.all[1].any[0].value = '1000 / (age * age - 1)';
    }), 'program.rule.all[1].any[0].value', 'can divide by zero'],
    ['comparison that uses no variable', changed((p) => { p.rule.all[1].any[0] = { value: 3, op: '<', limit: '2 + 2' }; }),
      'program.rule.all[1].any[0]', 'uses no variable'],
    ['not with a list', changed((p) => { p.rule = { not: p.rule.all }; }), 'program.rule.not', 'found a list'],
    ['label not text', changed((p) => { p.rule.all[1].label = 7; }), 'program.rule.all[1].label', 'must be text'],
    ['offer missing', changed((p) => { delete p.offer; }), 'program.offer', 'missing its "offer"'],
  ];

  it('covers at least 20 distinct bad programs', () => {
    expect(new Set(cases.map((c) => c[0])).size).toBe(cases.length);
    expect(cases.length).toBeGreaterThanOrEqual(20);
  });

  it.each(cases)('%s', (_name, input, path, phrase) => {
    expectProblem(input, path, phrase);
  });

  it('reports every problem at once', () => {
    const problems = problemsOf(changed((p) => {
      p.variables[0].type = 'continous';
      p.rule.all[0].op = '=<';
      p.offer.ifEligible = 2;
    }));
    expect(problems.map((p) => p.path)).toEqual(['program.variables[0].type', 'program.rule.all[0].op', 'program.offer.ifEligible']);
  });

  it('nests a condition deeper than the limit → one problem at the deepest path', () => {
    let rule: unknown = { value: 'age', op: '>=', limit: 65 };
    for (let i = 0; i < MAX_CONDITION_DEPTH + 5; i += 1) rule = { not: rule };
    const problems = problemsOf(changed((p) => { p.rule = rule; }));
    expect(problems).toHaveLength(1);
    expect(problems[0]!.path).toBe(`program.rule${'.not'.repeat(MAX_CONDITION_DEPTH)}`);
    expect(problems[0]!.message).toContain(`nested more than ${MAX_CONDITION_DEPTH} levels`);
  });
});

describe('programs that must be accepted', () => {
  it('accepts divisions that cannot be zero over the declared domains', () => {
    expectValid(changed((p) => { p.variables[2].range = [66, 110]; p.rule.all[1].any[0].value = '1000 / (age - 65)'; }));
    expectValid(changed((p) => { p.variables[1].values = [1, 2, 3, 4]; p.rule.all[1].any[1].value = 'income / (size - 2.5)'; }));
    expectValid(changed((p) => { p.variables[2].range = [0.5, 3]; p.rule.all[1].any[0].value = '1000 / (age * age + 0.1)'; }));
    // Plain interval arithmetic gives [−2, 10] for age² − age + 1 on [0, 3] (Moore 1966, §3.1,
    // the dependency effect); bisection proves the true minimum 0.75 > 0.
    expectValid(changed((p) => { p.variables[2].range = [0, 3]; p.rule.all[1].any[0].value = '1000 / (age * age - age + 1)'; }));
    // No declared domain: nothing can be said, so nothing is reported.
    expectValid(changed((p) => { p.rule.all[1].any[1].value = 'income / (size - 3)'; }));
  });

  it('checks a lookup\'s else only for the values the table does not cover', () => {
    // size = 3 is in the table, so the else never divides by size − 3.
    expectValid(changed((p) => {
      p.variables[1].values = [1, 2, 3, 4, 5];
      p.rule.all[0].limit.else = '35000 + 7000 / (size - 3)';
    }));
    expectProblem(changed((p) => {
      p.variables[1].values = [1, 2, 3, 4, 5];
      p.rule.all[0].limit.else = '35000 + 7000 / (size - 4)';
    }), 'program.rule.all[0].limit.else', 'can be 0 when size is 4');
  });

  it('accepts labels as table keys and in membership lists', () => {
    expectValid(changed((p) => {
      p.variables[1].values = [{ value: 1, label: 'single' }, { value: 2, label: 'couple' }, 3];
      p.rule.all[0].limit.table = { single: 21000, couple: 28000, '3': 35000 };
      p.rule.all[1].any.push({ value: 'size', in: ['couple', 3] });
    }));
  });

  it('accepts every condition form', () => {
    expectValid(changed((p) => {
      p.rule = {
        atLeast: 2,
        label: 'two of three',
        of: [
          { not: { value: 'age', op: '<', limit: 18 } },
          { value: 'size', in: [1, 4, 7] },
          { any: [{ value: 'min(income, 50000) - max(age, 0)', op: '!=', limit: '-1e3' }] },
        ],
      };
      p.offer = { ifEligible: 0.6, ifIneligible: 0 };
    }));
  });

  it('accepts a lookup without else when every declared value has an entry', () => {
    expectValid(changed((p) => { p.variables[1].values = [1, 2, 3]; delete p.rule.all[0].limit.else; }));
  });
});

describe('never throws, whatever the input', () => {
  const cyclic = exampleCopy();
  cyclic.rule.all.push(cyclic.rule);
  const cyclicVariables = exampleCopy();
  cyclicVariables.variables.push(cyclicVariables.variables);
  const throwingGetter = exampleCopy();
  Object.defineProperty(throwingGetter, 'offer', { enumerable: true, get() { throw new Error('boom'); } });
  const proxy = new Proxy({}, { ownKeys() { throw new Error('boom'); }, getPrototypeOf() { return Object.prototype; } });
  const nullPrototype = Object.assign(Object.create(null) as object, exampleCopy());

  const inputs: Array<[string, unknown]> = [
    ['undefined', undefined], ['null', null], ['a string', 'program.json'], ['a function', () => 1],
    ['a symbol', Symbol('x')], ['a bigint', 10n], ['a Date', new Date(0)], ['a Map', new Map([['name', 'x']])],
    ['a class instance', new (class Program { name = 'x'; })()],
    ['a cyclic rule', cyclic], ['a cyclic variables list', cyclicVariables],
    ['a throwing getter', throwingGetter], ['a hostile proxy', proxy],
    ['__proto__ keys from JSON', JSON.parse('{"__proto__": {"name": "x"}, "name": "n", "variables": [{"__proto__": 1}], "rule": {"__proto__": []}, "offer": {}}')],
    ['a sparse giant list', changed((p) => { p.variables = new Array(2 ** 31); })],
    ['a giant all', changed((p) => { p.rule = { all: new Array(1e7) }; })],
    ['many unknown fields', Object.fromEntries(Array.from({ length: 5000 }, (_, i) => [`field${i}`, i]))],
  ];

  it.each(inputs)('%s', (_name, input) => {
    const r = validateProgram(input);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problems.length).toBeGreaterThan(0);
      expect(r.problems.length).toBeLessThanOrEqual(201);
      for (const p of r.problems) {
        expect(p.path.startsWith('program')).toBe(true);
        expect(p.message.length).toBeGreaterThan(10);
      }
    }
  });

  it('accepts a valid program built on null-prototype objects', () => {
    expectValid(nullPrototype);
  });

  it('refuses a program whose rule contains itself, with the nesting message', () => {
    expectProblem(cyclic, `program.rule${'.all[2]'.repeat(MAX_CONDITION_DEPTH)}`, 'or a condition contains itself');
  });

  it('says "…and N more" when there are too many problems', () => {
    const problems = problemsOf(Object.fromEntries(Array.from({ length: 5000 }, (_, i) => [`field${i}`, i])));
    expect(problems.at(-1)!.message).toMatch(/and \d+ more problems/);
  });
});

describe('suggestions (optimal string alignment distance; Damerau 1964)', () => {
  it('counts edits, a transposition as one', () => {
    expect(editDistance('limt', 'limit')).toBe(1);
    expect(editDistance('kitten', 'sitting')).toBe(3); // Levenshtein (1966)'s classic example
    expect(editDistance('ab', 'ba')).toBe(1);
    expect(editDistance('', 'abc')).toBe(3);
  });
  it('suggests only close words', () => {
    expect(closest('limt', ['value', 'op', 'limit'])).toBe('limit');
    expect(closest('IFELIGIBLE', ['ifEligible', 'ifIneligible'])).toBe('ifEligible');
    expect(closest('zzz', ['value', 'op', 'limit'])).toBeUndefined();
  });
});
