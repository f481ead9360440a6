// The JSON Schema of the program object (JSON Schema draft 2020-12, json-schema.org) compiled by
// Ajv, an independent validator: it must accept every program validateProgram accepts.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import Ajv2020 from 'ajv/dist/2020.js';
import schema from '../../main/rules/program.schema.json' with { type: 'json' };
import { validateProgram } from '../../main/rules/validate.ts';
import { EXAMPLE_PROGRAM, exampleCopy } from './example-program.ts';
import { mutatedProgram, structuredProgram } from './arbitraries.ts';

const ajv = new Ajv2020({ allErrors: true, strict: true });
const check = ajv.compile(schema);

describe('program.schema.json', () => {
  it('compiles under Ajv strict mode', () => {
    expect(typeof check).toBe('function');
  });

  it('accepts the example program and the valid programs used in the tests', () => {
    const valid: unknown[] = [
      EXAMPLE_PROGRAM,
      { ...exampleCopy(), offer: { ifEligible: 0.6, ifIneligible: 0 } },
      (() => {
        const p = exampleCopy();
        p.variables[1].values = [{ value: 1, label: 'single' }, { value: 2, label: 'couple' }, 3];
        p.variables[2].range = [18, 110];
        p.rule = {
          atLeast: 2, label: 'two of three',
          of: [
            { not: { value: 'age', op: '<', limit: 18 } },
            { value: 'size', in: ['couple', 3] },
            { any: [{ value: 'min(income, 50000) - max(age, 0)', op: '!=', limit: '-1e3' }] },
          ],
        };
        return p;
      })(),
    ];
    for (const p of valid) {
      expect(validateProgram(p).ok).toBe(true);
      expect(check(p), JSON.stringify(check.errors)).toBe(true);
    }
  });

  it.each([
    ['a missing offer', (p: any) => { delete p.offer; }],
    ['an unknown field', (p: any) => { p.rule.all[0].limt = 1; }],
    ['a bad operator', (p: any) => { p.rule.all[0].op = '=<'; }],
    ['a probability above 1', (p: any) => { p.offer.ifEligible = 2; }],
    ['a scale on a discrete variable', (p: any) => { p.variables[1].scale = 1; }],
    ['values on a continuous variable', (p: any) => { p.variables[0].values = [1]; }],
    ['a key that is not an identifier', (p: any) => { p.variables[0].key = 'annual income'; }],
    ['a key named max', (p: any) => { p.variables[0].key = 'max'; }],
    ['all and any together', (p: any) => { p.rule.any = p.rule.all; }],
    ['an empty table', (p: any) => { p.rule.all[0].limit.table = {}; }],
    ['atLeast 0', (p: any) => { p.rule = { atLeast: 0, of: p.rule.all }; }],
  ])('refuses %s (structural problems are visible to the schema too)', (_name, edit) => {
    const p = exampleCopy();
    edit(p);
    expect(check(p)).toBe(false);
    expect(validateProgram(p).ok).toBe(false);
  });

  it('accepts whatever validateProgram accepts (property)', () => {
    let accepted = 0;
    fc.assert(fc.property(fc.oneof(structuredProgram, mutatedProgram(structuredProgram)), (p) => {
      if (!validateProgram(p).ok) return;
      accepted += 1;
      expect(check(p), JSON.stringify(check.errors)).toBe(true);
    }), { numRuns: 1500 });
    expect(accepted).toBeGreaterThan(300);
  });
});
