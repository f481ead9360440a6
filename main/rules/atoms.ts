// Truth of one atom from its margin (value − limit), and the formula's verdict and offer
// probability A(x) for every unit at its own point.

import type { Comparator } from './types.ts';
import type { Atom, BoolNode, CompiledProgram, DesignColumns } from './ir.ts';
import { evalColumn } from './evaluate-columns.ts';
import { FALSE, TRUE } from './logic.ts';

export function holds(margin: number, op: Comparator): boolean {
  switch (op) {
    case '<': return margin < 0;
    case '<=': return margin <= 0;
    case '>': return margin > 0;
    case '>=': return margin >= 0;
    case '==': return margin === 0;
    case '!=': return margin !== 0;
  }
}

/** 1/0 truth of one atom for every unit at its own point (from its margin column, if already computed). */
export function atomTruthColumn(atom: Atom, cols: DesignColumns, margin?: Float64Array): Uint8Array {
  const out = new Uint8Array(cols.n);
  if (atom.kind === 'member') {
    const d = cols.discrete[atom.disc]!;
    for (let r = 0; r < cols.n; r++) out[r] = atom.members.has(d[r]!) ? TRUE : FALSE;
    return out;
  }
  const m = margin ?? evalColumn(atom.margin, cols);
  const n = cols.n;
  // one loop per operator, so the comparison is not re-dispatched for every unit
  switch (atom.op) {
    case '<': for (let r = 0; r < n; r++) out[r] = m[r]! < 0 ? 1 : 0; break;
    case '<=': for (let r = 0; r < n; r++) out[r] = m[r]! <= 0 ? 1 : 0; break;
    case '>': for (let r = 0; r < n; r++) out[r] = m[r]! > 0 ? 1 : 0; break;
    case '>=': for (let r = 0; r < n; r++) out[r] = m[r]! >= 0 ? 1 : 0; break;
    case '==': for (let r = 0; r < n; r++) out[r] = m[r]! === 0 ? 1 : 0; break;
    case '!=': for (let r = 0; r < n; r++) out[r] = m[r]! !== 0 ? 1 : 0; break;
  }
  return out;
}

/** The rule's verdict for every unit, combining atom truth columns column by column. */
export function treeColumn(node: BoolNode, truth: Uint8Array[], n: number): Uint8Array {
  switch (node.t) {
    case 'atom':
      return truth[node.i]!.slice();
    case 'not': {
      const c = treeColumn(node.c, truth, n);
      for (let r = 0; r < n; r++) c[r] = 1 - c[r]!;
      return c;
    }
    case 'all':
    case 'any': {
      const out = treeColumn(node.c[0]!, truth, n);
      for (let j = 1; j < node.c.length; j++) {
        const c = treeColumn(node.c[j]!, truth, n);
        if (node.t === 'all') for (let r = 0; r < n; r++) out[r] = out[r]! & c[r]!;
        else for (let r = 0; r < n; r++) out[r] = out[r]! | c[r]!;
      }
      return out;
    }
    case 'atLeast': {
      const count = new Uint16Array(n);
      for (const child of node.c) {
        const c = treeColumn(child, truth, n);
        for (let r = 0; r < n; r++) count[r] = count[r]! + c[r]!;
      }
      const out = new Uint8Array(n);
      for (let r = 0; r < n; r++) out[r] = count[r]! >= node.k ? 1 : 0;
      return out;
    }
  }
}

export interface Verdicts {
  /** 1 where the formula says eligible at the unit's own inputs. */
  eligible: Uint8Array;
  /** The rule's offer probability A(x): ifEligible or ifIneligible. */
  offerProbability: Float64Array;
  /** Row positions whose margin could not be computed (a lookup with no entry, a division by zero). */
  undefinedRows: number[];
}

export function verdicts(program: CompiledProgram, cols: DesignColumns): Verdicts {
  const n = cols.n;
  const bad = new Set<number>();
  const truth = program.atoms.map((a) => {
    if (a.kind !== 'compare') return atomTruthColumn(a, cols);
    const m = evalColumn(a.margin, cols);
    for (let r = 0; r < n; r++) if (!Number.isFinite(m[r]!)) bad.add(r);
    return atomTruthColumn(a, cols, m);
  });
  const eligible = n > 0 && truth.length > 0 ? treeColumn(program.tree, truth, n) : new Uint8Array(n);
  const offerProbability = new Float64Array(n);
  const { ifEligible, ifIneligible } = program.offer;
  for (let r = 0; r < n; r++) offerProbability[r] = eligible[r] ? ifEligible : ifIneligible;
  return { eligible, offerProbability, undefinedRows: [...bad].sort((a, b) => a - b) };
}
