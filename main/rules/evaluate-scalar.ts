// Point evaluation of lowered expressions through a tree of closures (no code generation from
// user text). Used where one unit is evaluated at many points: simulation inside a ball for
// criteria that are not linear, and the "try a unit" panel.

import type { IrNode } from './ir.ts';

export type PointFn = (cont: ArrayLike<number>, disc: ArrayLike<number>) => number;

export function compilePoint(node: IrNode): PointFn {
  switch (node.k) {
    case 'const': { const v = node.v; return () => v; }
    case 'cont': { const i = node.i; return (c) => c[i]!; }
    case 'disc': { const i = node.i; return (_c, d) => d[i]!; }
    case 'neg': { const a = compilePoint(node.a); return (c, d) => -a(c, d); }
    case 'add': { const a = compilePoint(node.a), b = compilePoint(node.b); return (c, d) => a(c, d) + b(c, d); }
    case 'sub': { const a = compilePoint(node.a), b = compilePoint(node.b); return (c, d) => a(c, d) - b(c, d); }
    case 'mul': { const a = compilePoint(node.a), b = compilePoint(node.b); return (c, d) => a(c, d) * b(c, d); }
    case 'div': { const a = compilePoint(node.a), b = compilePoint(node.b); return (c, d) => a(c, d) / b(c, d); }
    case 'min':
    case 'max': {
      const args = node.args.map(compilePoint);
      const f = node.k === 'min' ? Math.min : Math.max;
      return (c, d) => {
        let v = args[0]!(c, d);
        for (let j = 1; j < args.length; j++) v = f(v, args[j]!(c, d));
        return v;
      };
    }
    case 'lookup': {
      const table = new Map<number, PointFn>();
      for (const [key, branch] of node.table) table.set(key, compilePoint(branch));
      const otherwise = node.otherwise ? compilePoint(node.otherwise) : null;
      const by = node.by;
      return (c, d) => {
        const f = table.get(d[by]!) ?? otherwise;
        return f ? f(c, d) : NaN;
      };
    }
  }
}
