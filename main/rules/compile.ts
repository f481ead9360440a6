// Compile a validated program: resolve variable keys to column positions, lookups to numeric
// keys, and split the rule into atoms plus a boolean tree. Validation (validate.ts) runs first,
// so every problem reaches the analyst as a path and a sentence; what remains here can only be
// an internal fault.

import { exprFromSource } from './expression.ts';
import type { Atom, BoolNode, CompiledProgram, CompiledVariable, IrNode } from './ir.ts';
import { dependsOnContinuous, isAffineInContinuous } from './linearity.ts';
import type { Checked, Condition, ExprNode, ExprSource, LookupLimit, Program, Variable } from './types.ts';
import { validateProgram } from './validate.ts';

export function compileProgram(input: unknown, basePath = 'program'): Checked<CompiledProgram> {
  const checked = validateProgram(input, basePath);
  if (!checked.ok) return checked;
  return { ok: true, value: lowerProgram(checked.value, basePath) };
}

/** Numeric code of a discrete value written in a study file: a number, a numeric string, or a declared label. */
export function discreteCode(variable: Variable, written: number | string): number | undefined {
  if (typeof written === 'number') return Number.isFinite(written) ? written : undefined;
  const trimmed = written.trim();
  if (trimmed !== '' && Number.isFinite(Number(trimmed))) return Number(trimmed);
  for (const v of variable.values ?? []) {
    if (typeof v === 'object' && v.label === written) return v.value;
  }
  return undefined;
}

/** Lower a program that has already passed validateProgram (e.g. inside a worker). */
export function lowerValidatedProgram(program: Program, basePath = 'program'): CompiledProgram {
  return lowerProgram(program, basePath);
}

function lowerProgram(program: Program, basePath: string): CompiledProgram {
  const continuous: CompiledVariable[] = [];
  const discrete: CompiledVariable[] = [];
  const byKey = new Map<string, { type: 'cont' | 'disc'; cv: CompiledVariable }>();
  for (const variable of program.variables) {
    const list = variable.type === 'continuous' ? continuous : discrete;
    const cv = { key: variable.key, index: list.length, variable };
    list.push(cv);
    byKey.set(variable.key, { type: variable.type === 'continuous' ? 'cont' : 'disc', cv });
  }

  const resolve = (key: string): { type: 'cont' | 'disc'; cv: CompiledVariable } => {
    const hit = byKey.get(key);
    if (!hit) throw new Error(`internal: variable '${key}' survived validation unresolved`);
    return hit;
  };

  const lowerExpr = (node: ExprNode): IrNode => {
    switch (node.kind) {
      case 'num':
        return { k: 'const', v: node.value };
      case 'var': {
        const { type, cv } = resolve(node.key);
        return type === 'cont' ? { k: 'cont', i: cv.index } : { k: 'disc', i: cv.index };
      }
      case 'neg':
        return { k: 'neg', a: lowerExpr(node.arg) };
      case 'bin': {
        const k = node.op === '+' ? 'add' : node.op === '-' ? 'sub' : node.op === '*' ? 'mul' : 'div';
        return { k, a: lowerExpr(node.left), b: lowerExpr(node.right) };
      }
      case 'call':
        return { k: node.fn, args: node.args.map(lowerExpr) };
    }
  };

  const lowerSource = (src: ExprSource): IrNode => {
    const parsed = exprFromSource(src);
    if (!parsed.ok) throw new Error(`internal: expression '${String(src)}' survived validation unparsed`);
    return lowerExpr(parsed.node);
  };

  const lowerLookup = (limit: LookupLimit): IrNode => {
    const { cv } = resolve(limit.by);
    const table = new Map<number, IrNode>();
    for (const [written, entry] of Object.entries(limit.table)) {
      const code = discreteCode(cv.variable, written);
      if (code === undefined) throw new Error(`internal: lookup key '${written}' survived validation`);
      table.set(code, lowerSource(entry));
    }
    return { k: 'lookup', by: cv.index, table, otherwise: limit.else === undefined ? null : lowerSource(limit.else) };
  };

  const atoms: Atom[] = [];
  const lowerCondition = (c: Condition, path: string): BoolNode => {
    if ('all' in c) return { t: 'all', c: c.all.map((x, i) => lowerCondition(x, `${path}.all[${i}]`)) };
    if ('any' in c) return { t: 'any', c: c.any.map((x, i) => lowerCondition(x, `${path}.any[${i}]`)) };
    if ('atLeast' in c) return { t: 'atLeast', k: c.atLeast, c: c.of.map((x, i) => lowerCondition(x, `${path}.of[${i}]`)) };
    if ('not' in c) return { t: 'not', c: lowerCondition(c.not, `${path}.not`) };
    const index = atoms.length;
    if ('in' in c) {
      const { cv } = resolve(c.value);
      const members = new Set<number>();
      for (const m of c.in) {
        const code = discreteCode(cv.variable, m);
        if (code !== undefined) members.add(code);
      }
      atoms.push({ kind: 'member', index, path, disc: cv.index, members, dependsOnContinuous: false, linear: true, condition: c });
      return { t: 'atom', i: index };
    }
    const value = lowerSource(c.value);
    const limit = typeof c.limit === 'object' ? lowerLookup(c.limit) : lowerSource(c.limit);
    const margin: IrNode = { k: 'sub', a: value, b: limit };
    atoms.push({
      kind: 'compare',
      index,
      path,
      op: c.op,
      margin,
      dependsOnContinuous: dependsOnContinuous(margin),
      linear: isAffineInContinuous(margin),
      condition: c,
    });
    return { t: 'atom', i: index };
  };

  const tree = lowerCondition(program.rule, `${basePath}.rule`);
  return { program, continuous, discrete, atoms, tree, offer: program.offer };
}
