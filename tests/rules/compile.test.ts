import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { atomColumns, atomKey, verdicts, verdictsFromAtoms } from '../../main/rules/atoms.ts';
import { compileProgram, lowerValidatedProgram } from '../../main/rules/compile.ts';
import { evalColumn, gradColumn, intervalColumns } from '../../main/rules/evaluate-columns.ts';
import { compilePoint } from '../../main/rules/evaluate-scalar.ts';
import { evaluateExpression, formatExpression } from '../../main/rules/expression.ts';
import type { Atom, CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';
import type { ExprNode, Program } from '../../main/rules/types.ts';
import { exprTree } from './arbitraries.ts';
import { exampleCopy } from './example-program.ts';

const VARS = [
  { key: 'x', label: 'x', type: 'continuous' as const, column: 'X' },
  { key: 'y', label: 'y', type: 'continuous' as const, column: 'Y' },
  { key: 'k', label: 'k', type: 'discrete' as const, column: 'K' },
];

/** Lower `expr >= 0` without validation (random expressions may divide by zero on purpose). */
function lowerExpr(expr: string): CompiledProgram {
  return lowerValidatedProgram({ name: 't', variables: VARS, rule: { value: expr, op: '>=', limit: 0 }, offer: { ifEligible: 1, ifIneligible: 0 } });
}

/** Compile one comparison `expr >= 0` over x, y (continuous) and k (discrete). */
function compileExpr(expr: string): CompiledProgram {
  const r = compileProgram({ name: 't', variables: VARS, rule: { value: expr, op: '>=', limit: 0 }, offer: { ifEligible: 1, ifIneligible: 0 } });
  if (!r.ok) throw new Error(`${expr}: ${JSON.stringify(r.problems)}`);
  return r.value;
}
const marginOf = (p: CompiledProgram) => {
  const a = p.atoms[0]!;
  if (a.kind !== 'compare') throw new Error('not a comparison');
  return a.margin;
};
const cols = (rows: Array<[number, number, number]>): DesignColumns => ({
  n: rows.length,
  continuous: [Float64Array.from(rows, (r) => r[0]), Float64Array.from(rows, (r) => r[1])],
  discrete: [Float64Array.from(rows, (r) => r[2])],
});

describe('atoms and their linearity once discrete inputs are fixed', () => {
  it.each([
    ['x', true],
    ['x / k', true],
    ['x * k - 3 * y', true],
    ['min(k, 3) * x + max(k, 1)', true],
    ['(x + y) / (k + 1)', true],
    ['x * y', false],
    ['x / y', false],
    ['min(x, 5)', false],
    ['max(x, y) - 2', false],
    ['-(x - 2 * (y + k))', true],
  ])('%s: linear = %s', (expr, linear) => {
    const p = compileExpr(expr);
    expect(p.atoms).toHaveLength(1);
    expect(p.atoms[0]!.linear).toBe(linear);
    expect(p.atoms[0]!.dependsOnContinuous).toBe(true);
  });

  it('a comparison on discrete inputs only is constant per unit', () => {
    const p = compileExpr('k - 2');
    expect(p.atoms[0]!.dependsOnContinuous).toBe(false);
  });

  it('splits the example program into three atoms with their JSON paths', () => {
    const r = compileProgram(exampleCopy());
    if (!r.ok) throw new Error('example');
    expect(r.value.atoms.map((a) => a.path)).toEqual(['program.rule.all[0]', 'program.rule.all[1].any[0]', 'program.rule.all[1].any[1]']);
    expect(r.value.atoms.map((a) => a.linear)).toEqual([true, true, true]);
    expect(r.value.continuous.map((v) => v.key)).toEqual(['income', 'age']);
    expect(r.value.discrete.map((v) => v.key)).toEqual(['size']);
  });
});

describe('column evaluator', () => {
  // Reference: the plain recursive scalar evaluator of expression.ts, one point at a time.
  const keys = ['x', 'y', 'k'];
  const exprs = exprTree(keys, fc.integer({ min: 0, max: 9 }), 4);
  const point = fc.tuple(fc.double({ min: -50, max: 50, noNaN: true }), fc.double({ min: -50, max: 50, noNaN: true }), fc.integer({ min: 0, max: 4 }));

  it('agrees with the scalar reference evaluator and the point closures on random expressions', () => {
    fc.assert(
      fc.property(exprs, fc.array(point, { minLength: 1, maxLength: 8 }), (node: ExprNode, rows) => {
        const p = lowerExpr(formatExpression(node));
        const m = marginOf(p);
        const c = cols(rows);
        const col = evalColumn(m, c);
        const fn = compilePoint(m);
        rows.forEach((row, i) => {
          const ref = evaluateExpression(node, (key) => (key === 'x' ? row[0] : key === 'y' ? row[1] : row[2]));
          expect(Object.is(col[i], ref) || col[i] === ref).toBe(true);
          expect(Object.is(fn([row[0], row[1]], [row[2]]), ref) || fn([row[0], row[1]], [row[2]]) === ref).toBe(true);
        });
      }),
      { numRuns: 400 },
    );
  });

  it('interval bounds over a box contain the value at every sampled point of the box (Moore 1966)', () => {
    fc.assert(
      fc.property(
        exprs,
        point,
        fc.tuple(fc.double({ min: 0, max: 5, noNaN: true }), fc.double({ min: 0, max: 5, noNaN: true })),
        fc.array(fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true })), { minLength: 1, maxLength: 10 }),
        (node: ExprNode, centre, half, offsets) => {
          const p = lowerExpr(formatExpression(node));
          const m = marginOf(p);
          const box = intervalColumns(m, cols([centre]), half);
          for (const [u, v] of offsets) {
            const x = centre[0] + u * half[0];
            const y = centre[1] + v * half[1];
            const val = evaluateExpression(node, (key) => (key === 'x' ? x : key === 'y' ? y : centre[2]));
            if (Number.isNaN(val) || Number.isNaN(box.lo[0]!) || Number.isNaN(box.hi[0]!)) continue;
            expect(box.lo[0]!).toBeLessThanOrEqual(val);
            expect(box.hi[0]!).toBeGreaterThanOrEqual(val);
          }
        },
      ),
      { numRuns: 400 },
    );
  });

  it('gradients of affine margins are exact: they reproduce the margin at shifted points', () => {
    for (const expr of ['x / k + 2 * y', 'x * k - 3 * y', 'min(k, 3) * x + max(k, 1)', '-(x - 2 * (y + k))', '(x + y) / (k + 1)']) {
      const p = compileExpr(expr);
      const m = marginOf(p);
      const rows: Array<[number, number, number]> = [[1, 2, 1], [10, -3, 2], [0.5, 0.25, 4]];
      const c = cols(rows);
      const base = evalColumn(m, c);
      const gx = gradColumn(m, 0, c);
      const gy = gradColumn(m, 1, c);
      const shifted = cols(rows.map(([x, y, k]) => [x + 3, y - 2, k]));
      const moved = evalColumn(m, shifted);
      rows.forEach((_, i) => {
        expect(moved[i]).toBeCloseTo(base[i]! + 3 * (gx?.[i] ?? 0) - 2 * (gy?.[i] ?? 0), 10);
      });
    }
  });
});

describe('verdicts on the example program', () => {
  it('computes eligibility and the offer probability unit by unit, and flags undefined margins', () => {
    const prog = exampleCopy() as Program;
    const r = compileProgram(prog);
    if (!r.ok) throw new Error('example');
    // income, age | size — hand-computed from the rule text of docs/study-format.md
    const rows = [
      [20000, 70, 1], // under 21,000 and 65+: eligible
      [20000, 40, 1], // under the limit, 40 years, income per person 20,000 > 6,000: not eligible
      [11000, 30, 2], // under 28,000, per person 5,500 ≤ 6,000: eligible
      [43000, 66, 5], // limit 35,000 + 7,000·2 = 49,000, 65+: eligible
      [50000, 66, 5], // over 49,000: not eligible
    ];
    const c: DesignColumns = {
      n: rows.length,
      continuous: [Float64Array.from(rows, (x) => x[0]!), Float64Array.from(rows, (x) => x[1]!)],
      discrete: [Float64Array.from(rows, (x) => x[2]!)],
    };
    const v = verdicts(r.value, c);
    expect(Array.from(v.eligible)).toEqual([1, 0, 1, 1, 0]);
    expect(Array.from(v.offerProbability)).toEqual([1, 0, 1, 1, 0]);
    expect(v.undefinedRows).toEqual([]);

    const noElse = exampleCopy();
    delete noElse.rule.all[0].limit.else;
    const r2 = compileProgram(noElse);
    if (!r2.ok) throw new Error('no else');
    expect(verdicts(r2.value, c).undefinedRows).toEqual([3, 4]); // size 5 has no entry and no else
  });
});

describe('atom columns reused across a moved limit (atomColumns with reuse)', () => {
  // The rule with one limit moved must give exactly the verdicts of evaluating it from scratch;
  // only the moved limit's atom is evaluated again. Cases hand-picked round the example's limits.
  const rows = [
    [20000, 70, 1], [21000, 40, 1], [21500, 66, 1], [11000, 30, 2], [28500, 64.9, 2],
    [43000, 66, 5], [49000, 20, 5], [50000, 66, 5], [5000, 18, 4], [36000, 80, 3],
  ];
  const c: DesignColumns = {
    n: rows.length,
    continuous: [Float64Array.from(rows, (x) => x[0]!), Float64Array.from(rows, (x) => x[1]!)],
    discrete: [Float64Array.from(rows, (x) => x[2]!)],
  };
  const compiled = (p: unknown) => { const r = compileProgram(p as Program); if (!r.ok) throw new Error('example'); return r.value; };
  const base = compiled(exampleCopy());
  const baseAtoms = atomColumns(base, c);

  it('re-evaluates only the atom whose limit moved, with the verdicts of a fresh evaluation', () => {
    const moves: Array<(p: ReturnType<typeof exampleCopy>) => void> = [
      (p) => { p.rule.all[0].limit.table['1'] = 21000 * 1.05; },
      (p) => { p.rule.all[0].limit.else = '(35000 + 7000 * (size - 3)) * 0.99'; },
      (p) => { p.rule.all[1].any[0].limit = 65 * 0.99; },
      (p) => { delete p.rule.all[0].limit.else; },
    ];
    for (const move of moves) {
      const p = exampleCopy();
      move(p);
      const next = compiled(p);
      const reused = atomColumns(next, c, baseAtoms);
      const fresh = verdicts(next, c);
      const got = verdictsFromAtoms(next, reused, c.n);
      expect(Array.from(got.eligible)).toEqual(Array.from(fresh.eligible));
      expect(Array.from(got.offerProbability)).toEqual(Array.from(fresh.offerProbability));
      expect(got.undefinedRows).toEqual(fresh.undefinedRows);
      const same = reused.truth.filter((t, i) => t === baseAtoms.truth[i]).length;
      expect(same).toBe(next.atoms.length - 1); // every atom but the moved one taken as it was
    }
  });

  it('tells apart atoms that differ only in a lookup entry, an infinite limit or a sign of zero', () => {
    const p = exampleCopy();
    p.rule.all[0].limit.table['2'] = 28001;
    expect(atomKey(compiled(p).atoms[0]!)).not.toBe(atomKey(base.atoms[0]!));
    const a = { ...base.atoms[1]!, margin: { k: 'const', v: Number.POSITIVE_INFINITY } } as Atom;
    const b = { ...base.atoms[1]!, margin: { k: 'const', v: Number.NaN } } as Atom;
    const z = { ...base.atoms[1]!, margin: { k: 'const', v: -0 } } as Atom;
    const z0 = { ...base.atoms[1]!, margin: { k: 'const', v: 0 } } as Atom;
    expect(new Set([a, b, z, z0].map(atomKey)).size).toBe(4);
  });
});
