// Column-at-a-time evaluation of lowered expressions: each node is computed for every unit in
// one tight loop over Float64Arrays, which is what makes whole-dataset evaluation fast (tens of
// millions of criterion evaluations a second) without generating code from user text.
// Also: exact gradients of affine expressions (forward differentiation) and interval bounds over
// a box around each unit (for proving a criterion constant on the unit's ball).

import type { DesignColumns, IrNode } from './ir.ts';
import { addI, divI, mulI, nextDown, nextUp, subI, type Interval } from './interval.ts';
import { dependsOnContinuous } from './linearity.ts';

/** Value of `node` for every unit. A lookup with no entry for a unit's value and no `else` gives NaN. */
export function evalColumn(node: IrNode, cols: DesignColumns): Float64Array {
  const n = cols.n;
  switch (node.k) {
    case 'const':
      return new Float64Array(n).fill(node.v);
    case 'cont':
      return cols.continuous[node.i]!.slice(0, n);
    case 'disc':
      return cols.discrete[node.i]!.slice(0, n);
    case 'neg': {
      const a = evalColumn(node.a, cols);
      for (let r = 0; r < n; r++) a[r] = -a[r]!;
      return a;
    }
    case 'add':
    case 'sub':
    case 'mul':
    case 'div': {
      const a = evalColumn(node.a, cols);
      const b = evalColumn(node.b, cols);
      if (node.k === 'add') for (let r = 0; r < n; r++) a[r] = a[r]! + b[r]!;
      else if (node.k === 'sub') for (let r = 0; r < n; r++) a[r] = a[r]! - b[r]!;
      else if (node.k === 'mul') for (let r = 0; r < n; r++) a[r] = a[r]! * b[r]!;
      else for (let r = 0; r < n; r++) a[r] = a[r]! / b[r]!;
      return a;
    }
    case 'min':
    case 'max': {
      const out = evalColumn(node.args[0]!, cols);
      for (let j = 1; j < node.args.length; j++) {
        const b = evalColumn(node.args[j]!, cols);
        if (node.k === 'min') for (let r = 0; r < n; r++) out[r] = Math.min(out[r]!, b[r]!);
        else for (let r = 0; r < n; r++) out[r] = Math.max(out[r]!, b[r]!);
      }
      return out;
    }
    case 'lookup':
      return selectByLookup(node, cols, (branch) => evalColumn(branch, cols), (v) => v, NaN);
  }
}

/**
 * For each unit, the value from the branch its discrete value picks. Constant branches (the
 * usual table of numbers) are read straight from a map; others are evaluated as columns once.
 */
function selectByLookup(
  node: Extract<IrNode, { k: 'lookup' }>,
  cols: DesignColumns,
  evalBranch: (b: IrNode) => Float64Array | null,
  constBranch: (v: number) => number,
  missing: number,
): Float64Array {
  const n = cols.n;
  const by = cols.discrete[node.by]!;
  const out = new Float64Array(n);
  // branch b: a constant (values[b]) or a column (columns[b]; null = zero); slot −1 = otherwise
  const values: number[] = [];
  const columns: Array<Float64Array | null | undefined> = [];
  const slotOf = new Map<number, number>();
  let maxKey = -1;
  let smallIntegers = true;
  for (const [key, branch] of node.table) {
    slotOf.set(key, values.length);
    if (branch.k === 'const') { values.push(constBranch(branch.v)); columns.push(undefined); }
    else { values.push(0); columns.push(evalBranch(branch)); }
    if (Number.isInteger(key) && key >= 0 && key < 4096) maxKey = Math.max(maxKey, key);
    else smallIntegers = false;
  }
  // household sizes, region codes...: a dense index avoids a hash lookup per unit
  const dense = smallIntegers ? new Int32Array(maxKey + 1).fill(-1) : null;
  if (dense) for (const [key, slot] of slotOf) dense[key] = slot;
  const otherwise = node.otherwise === null ? undefined : evalBranch(node.otherwise);
  for (let r = 0; r < n; r++) {
    const key = by[r]!;
    const slot = dense ? (key >= 0 && key <= maxKey && Number.isInteger(key) ? dense[key]! : -1) : slotOf.get(key) ?? -1;
    if (slot >= 0) {
      const col = columns[slot];
      out[r] = col === undefined ? values[slot]! : col === null ? 0 : col[r]!;
    } else out[r] = otherwise === undefined ? missing : otherwise === null ? 0 : otherwise[r]!;
  }
  return out;
}

/**
 * Partial derivative of an affine expression with respect to continuous variable `j`, for every
 * unit (the derivative of an affine function does not depend on the point). `null` means zero.
 * Only meaningful when isAffineInContinuous(node) holds.
 */
export function gradColumn(node: IrNode, j: number, cols: DesignColumns): Float64Array | null {
  const n = cols.n;
  switch (node.k) {
    case 'const':
    case 'disc':
      return null;
    case 'cont':
      return node.i === j ? new Float64Array(n).fill(1) : null;
    case 'neg': {
      const g = gradColumn(node.a, j, cols);
      if (g) for (let r = 0; r < n; r++) g[r] = -g[r]!;
      return g;
    }
    case 'add':
    case 'sub': {
      const ga = gradColumn(node.a, j, cols);
      const gb = gradColumn(node.b, j, cols);
      if (!gb) return ga;
      if (!ga) {
        if (node.k === 'sub') for (let r = 0; r < n; r++) gb[r] = -gb[r]!;
        return gb;
      }
      if (node.k === 'add') for (let r = 0; r < n; r++) ga[r] = ga[r]! + gb[r]!;
      else for (let r = 0; r < n; r++) ga[r] = ga[r]! - gb[r]!;
      return ga;
    }
    case 'mul': {
      // one factor is constant within the discrete cell (affine), so d(ab) = a'b + ab'
      const ga = gradColumn(node.a, j, cols);
      const gb = gradColumn(node.b, j, cols);
      if (!ga && !gb) return null;
      const out = new Float64Array(n);
      if (ga) { const b = evalColumn(node.b, cols); for (let r = 0; r < n; r++) out[r] = ga[r]! * b[r]!; }
      if (gb) { const a = evalColumn(node.a, cols); for (let r = 0; r < n; r++) out[r] = out[r]! + a[r]! * gb[r]!; }
      return out;
    }
    case 'div': {
      const ga = gradColumn(node.a, j, cols);
      if (!ga) return null;
      const b = evalColumn(node.b, cols);
      for (let r = 0; r < n; r++) ga[r] = ga[r]! / b[r]!;
      return ga;
    }
    case 'min':
    case 'max':
      return null;
    case 'lookup': {
      if (!dependsOnContinuous(node)) return null;
      return selectByLookup(node, cols, (b) => gradColumn(b, j, cols), () => 0, 0);
    }
  }
}

/**
 * Interval bounds of `node` over the box [x − h, x + h] around each unit (h per continuous
 * variable, in the variable's own units), by interval arithmetic (R. E. Moore, "Interval
 * Analysis", 1966). Sound: the value at any point of the box lies in [lo, hi].
 */
export function intervalColumns(node: IrNode, cols: DesignColumns, halfWidth: ArrayLike<number>): { lo: Float64Array; hi: Float64Array } {
  const n = cols.n;
  switch (node.k) {
    case 'const':
    case 'disc': {
      const v = evalColumn(node, cols);
      return { lo: v, hi: v.slice() };
    }
    case 'cont': {
      const x = cols.continuous[node.i]!;
      const h = halfWidth[node.i]!;
      const lo = new Float64Array(n);
      const hi = new Float64Array(n);
      for (let r = 0; r < n; r++) { lo[r] = nextDown(x[r]! - h); hi[r] = nextUp(x[r]! + h); }
      return { lo, hi };
    }
    case 'neg': {
      const a = intervalColumns(node.a, cols, halfWidth);
      for (let r = 0; r < n; r++) { const l = a.lo[r]!; a.lo[r] = -a.hi[r]!; a.hi[r] = -l; }
      return a;
    }
    case 'add':
    case 'sub':
    case 'mul':
    case 'div': {
      // the scalar operations of interval.ts round outward, so the bounds stay sound in floating point
      const a = intervalColumns(node.a, cols, halfWidth);
      const b = intervalColumns(node.b, cols, halfWidth);
      const op = node.k === 'add' ? addI : node.k === 'sub' ? subI : node.k === 'mul' ? mulI : divI;
      for (let r = 0; r < n; r++) {
        const v: Interval = op({ lo: a.lo[r]!, hi: a.hi[r]! }, { lo: b.lo[r]!, hi: b.hi[r]! });
        a.lo[r] = v.lo; a.hi[r] = v.hi;
      }
      return a;
    }
    case 'min':
    case 'max': {
      // min and max are monotone in every argument, so bounds combine bound-wise
      const out = intervalColumns(node.args[0]!, cols, halfWidth);
      const f = node.k === 'min' ? Math.min : Math.max;
      for (let j = 1; j < node.args.length; j++) {
        const b = intervalColumns(node.args[j]!, cols, halfWidth);
        for (let r = 0; r < n; r++) { out.lo[r] = f(out.lo[r]!, b.lo[r]!); out.hi[r] = f(out.hi[r]!, b.hi[r]!); }
      }
      return out;
    }
    case 'lookup': {
      const los = new Map<IrNode, { lo: Float64Array; hi: Float64Array }>();
      const bounds = (b: IrNode) => { let v = los.get(b); if (!v) { v = intervalColumns(b, cols, halfWidth); los.set(b, v); } return v; };
      return {
        lo: selectByLookup(node, cols, (b) => bounds(b).lo, (v) => v, NaN),
        hi: selectByLookup(node, cols, (b) => bounds(b).hi, (v) => v, NaN),
      };
    }
  }
}
