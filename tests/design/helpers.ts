// Small builders for design-stage tests.
import { compileProgram } from '../../main/rules/compile.ts';
import type { CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';
import type { Condition, Offer, Variable } from '../../main/rules/types.ts';

export function cont(key: string, scale?: number): Variable {
  return { key, label: key, type: 'continuous', column: key.toUpperCase(), ...(scale === undefined ? {} : { scale }) };
}
export function disc(key: string): Variable {
  return { key, label: key, type: 'discrete', column: key.toUpperCase() };
}

export function compile(variables: Variable[], rule: Condition, offer: Offer = { ifEligible: 1, ifIneligible: 0 }): CompiledProgram {
  const r = compileProgram({ name: 'Test program (invented)', variables, rule, offer });
  if (!r.ok) throw new Error('test program invalid: ' + JSON.stringify(r.problems));
  return r.value;
}

/** Columns from row objects keyed by variable key. */
export function columns(program: CompiledProgram, rows: Array<Record<string, number>>): DesignColumns {
  return {
    n: rows.length,
    continuous: program.continuous.map((v) => Float64Array.from(rows, (row) => row[v.key]!)),
    discrete: program.discrete.map((v) => Float64Array.from(rows, (row) => row[v.key]!)),
  };
}

/** Composite Simpson's rule. */
export function simpson(f: (x: number) => number, a: number, b: number, m = 20000): number {
  const h = (b - a) / m;
  let s = f(a) + f(b);
  for (let i = 1; i < m; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}
