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

/** Every atom's truth column, and for a comparison the rows where its margin is not finite. */
export interface AtomColumns {
  /** What each atom computes (atomKey): an atom with the same key gives the same columns. */
  keys: string[];
  truth: Uint8Array[];
  /** Rows (ascending) where the atom's margin is not finite; empty for a membership. */
  undefinedRows: number[][];
}

/** Numbers JSON cannot tell apart (NaN, ±Infinity, −0), Maps and Sets written out in full. */
function keyReplacer(_: string, v: unknown): unknown {
  if (typeof v === 'number') return Number.isFinite(v) && !Object.is(v, -0) ? v : String(Object.is(v, -0) ? '-0' : v);
  if (v instanceof Map) return ['Map', [...v]];
  if (v instanceof Set) return ['Set', [...v]];
  return v;
}

/** Everything an atom's truth column depends on besides the data: its comparison and margin, or its variable and members. */
export function atomKey(a: Atom): string {
  return a.kind === 'member' ? JSON.stringify(['member', a.disc, a.members], keyReplacer) : JSON.stringify(['compare', a.op, a.margin], keyReplacer);
}

/**
 * Every atom of `program` evaluated over `cols`. With `reuse` (the columns of another program
 * over the same `cols`), an atom whose key equals the reused atom's at the same position takes its
 * columns instead of being evaluated again (a rule with one limit moved re-evaluates one atom).
 */
export function atomColumns(program: CompiledProgram, cols: DesignColumns, reuse?: AtomColumns): AtomColumns {
  const n = cols.n;
  const keys = program.atoms.map(atomKey);
  const truth: Uint8Array[] = [];
  const undefinedRows: number[][] = [];
  program.atoms.forEach((a, i) => {
    if (reuse && reuse.keys[i] === keys[i]) {
      truth.push(reuse.truth[i]!);
      undefinedRows.push(reuse.undefinedRows[i]!);
      return;
    }
    if (a.kind !== 'compare') {
      truth.push(atomTruthColumn(a, cols));
      undefinedRows.push([]);
      return;
    }
    const m = evalColumn(a.margin, cols);
    const bad: number[] = [];
    for (let r = 0; r < n; r++) if (!Number.isFinite(m[r]!)) bad.push(r);
    truth.push(atomTruthColumn(a, cols, m));
    undefinedRows.push(bad);
  });
  return { keys, truth, undefinedRows };
}

/** The verdicts from the atoms' columns (atomColumns of the same program). */
export function verdictsFromAtoms(program: CompiledProgram, atoms: AtomColumns, n: number): Verdicts {
  const eligible = n > 0 && atoms.truth.length > 0 ? treeColumn(program.tree, atoms.truth, n) : new Uint8Array(n);
  const offerProbability = new Float64Array(n);
  const { ifEligible, ifIneligible } = program.offer;
  for (let r = 0; r < n; r++) offerProbability[r] = eligible[r] ? ifEligible : ifIneligible;
  const bad = new Set<number>();
  for (const rows of atoms.undefinedRows) for (const r of rows) bad.add(r);
  return { eligible, offerProbability, undefinedRows: [...bad].sort((a, b) => a - b) };
}

export function verdicts(program: CompiledProgram, cols: DesignColumns): Verdicts {
  return verdictsFromAtoms(program, atomColumns(program, cols), cols.n);
}
