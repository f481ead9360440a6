// Robustness of validation on thousands of random inputs (fast-check; Claessen & Hughes,
// "QuickCheck", ICFP 2000): every input is either accepted or refused with at least one
// located, worded problem; nothing throws and nothing hangs.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { validateProgram } from '../../main/rules/validate.ts';
import { evaluateExpression, exprFromSource, formatExpression, parseExpression } from '../../main/rules/expression.ts';
import type { Condition, ExprNode, Program } from '../../main/rules/types.ts';
import { exampleCopy } from './example-program.ts';
import { mutatedProgram, structuredProgram } from './arbitraries.ts';

/** Per-input time allowed before we call it a hang (generous: the typical input takes well under 1 ms). */
const HANG_MS = 500;

function checkOutcome(input: unknown): boolean {
  const started = performance.now();
  const r = validateProgram(input);
  expect(performance.now() - started).toBeLessThan(HANG_MS);
  if (r.ok) {
    // What is accepted re-validates, and the copy keeps the data as given.
    expect(validateProgram(r.value).ok).toBe(true);
    // (compared as text: JSON has no −0, which a literal may legitimately hold)
    expect(JSON.stringify(JSON.parse(JSON.stringify(r.value)))).toBe(JSON.stringify(r.value));
    return true;
  }
  expect(r.problems.length).toBeGreaterThan(0);
  for (const p of r.problems) {
    expect(typeof p.path).toBe('string');
    expect(typeof p.message).toBe('string');
    expect(p.path.length + p.message.length).toBeGreaterThan(0);
    expect(p.message.trim().length).toBeGreaterThan(0);
    expect(p.path.startsWith('program')).toBe(true);
  }
  return false;
}

function comparisonsOf(c: Condition): Array<Extract<Condition, { op: string }>> {
  if ('all' in c) return c.all.flatMap(comparisonsOf);
  if ('any' in c) return c.any.flatMap(comparisonsOf);
  if ('atLeast' in c) return c.of.flatMap(comparisonsOf);
  if ('not' in c) return comparisonsOf(c.not);
  if ('in' in c) return [];
  return [c];
}

describe('validateProgram on random inputs', () => {
  it('structured programs: accepted, or refused with located problems', () => {
    let accepted = 0;
    fc.assert(fc.property(structuredProgram, (p) => { if (checkOutcome(p)) accepted += 1; }), { numRuns: 2000 });
    // Guards against a generator that only produces rejects (the property would then be vacuous).
    expect(accepted).toBeGreaterThan(500);
  });

  it('mutations of valid programs (dropped fields, wrong types, renamed keys, random text)', () => {
    let refused = 0;
    fc.assert(fc.property(mutatedProgram(structuredProgram), (p) => { if (!checkOutcome(p)) refused += 1; }), { numRuns: 2000 });
    expect(refused).toBeGreaterThan(1000);
  });

  it('mutations of the example program', () => {
    fc.assert(fc.property(mutatedProgram(fc.constant(exampleCopy())), (p) => { checkOutcome(p); }), { numRuns: 1500 });
  });

  it('arbitrary values, including exotic objects (null prototypes, Maps, Dates, sparse arrays, typed arrays)', () => {
    const exotic = fc.anything({
      maxDepth: 3, withNullPrototype: true, withMap: true, withSet: true, withDate: true, withBigInt: true,
      withTypedArray: true, withSparseArray: true, withBoxedValues: true, withObjectString: true,
    });
    fc.assert(fc.property(exotic, (v) => { checkOutcome(v); }), { numRuns: 1000 });
    // The same values in every slot of a program's shape.
    fc.assert(fc.property(exotic, exotic, exotic, exotic, (name, variables, rule, offer) => {
      checkOutcome({ name, variables, rule, offer });
    }), { numRuns: 500 });
  });

  it('random expression strings in every expression slot', () => {
    const alphabet = fc.constantFrom(...'0123456789 .,eE+-*/()minaxincomesizeage_%$'.split(''));
    const text = fc.oneof(fc.string({ unit: alphabet, maxLength: 30 }), fc.string({ maxLength: 20 }));
    fc.assert(fc.property(text, fc.constantFrom(0, 1, 2, 3), (s, slot) => {
      const p = exampleCopy();
      if (slot === 0) p.rule.all[1].any[1].value = s;
      if (slot === 1) p.rule.all[1].any[1].limit = s;
      if (slot === 2) p.rule.all[0].limit.else = s;
      if (slot === 3) p.rule.all[0].limit.table['2'] = s;
      const accepted = checkOutcome(p);
      // A formula is accepted exactly when it parses and names only declared variables.
      const parsed = parseExpression(s);
      if (!parsed.ok) expect(accepted).toBe(false);
    }), { numRuns: 2000 });
  });
});

describe('expressions of accepted programs', () => {
  it('evaluate the same after format and re-parse (property)', () => {
    const values = fc.dictionary(fc.constantFrom('x0', 'x1', 'x2', 'd0', 'd1'), fc.double(), { minKeys: 5 });
    fc.assert(fc.property(structuredProgram, values, (input, v) => {
      const r = validateProgram(input);
      if (!r.ok) return;
      const program: Program = r.value;
      for (const c of comparisonsOf(program.rule)) {
        for (const src of [c.value, typeof c.limit === 'object' ? c.limit.else ?? 0 : c.limit]) {
          const first = exprFromSource(src);
          expect(first.ok).toBe(true);
          if (!first.ok) continue;
          const again = parseExpression(formatExpression(first.node));
          expect(again.ok).toBe(true);
          if (!again.ok) continue;
          const valueOf = (k: string): number => v[k] ?? 0;
          const a = evaluateExpression(first.node as ExprNode, valueOf);
          const b = evaluateExpression(again.node, valueOf);
          expect(Object.is(a, b)).toBe(true);
        }
      }
    }), { numRuns: 500 });
  });
});
