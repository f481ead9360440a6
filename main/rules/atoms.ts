// Truth of one atom from its margin (value − limit), and the formula's verdict and offer
// probability A(x) for every unit at its own point.

import type { Comparator } from './types.ts';
import type { Atom, CompiledProgram, DesignColumns } from './ir.ts';
import { evalColumn, rowsMissingLookup } from './evaluate-columns.ts';
import { evalTree, FALSE, TRUE } from './logic.ts';

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

/** 1/0 truth of one atom for every unit at its own point. */
export function atomTruthColumn(atom: Atom, cols: DesignColumns): Uint8Array {
  const out = new Uint8Array(cols.n);
  if (atom.kind === 'member') {
    const d = cols.discrete[atom.disc]!;
    for (let r = 0; r < cols.n; r++) out[r] = atom.members.has(d[r]!) ? TRUE : FALSE;
    return out;
  }
  const m = evalColumn(atom.margin, cols);
  const op = atom.op;
  for (let r = 0; r < cols.n; r++) out[r] = holds(m[r]!, op) ? TRUE : FALSE;
  return out;
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
  const truth = program.atoms.map((a) => atomTruthColumn(a, cols));
  const bad = new Set<number>();
  for (const a of program.atoms) {
    if (a.kind !== 'compare') continue;
    rowsMissingLookup(a.margin, cols, bad);
    const m = evalColumn(a.margin, cols);
    for (let r = 0; r < n; r++) if (!Number.isFinite(m[r]!)) bad.add(r);
  }
  const eligible = new Uint8Array(n);
  const offerProbability = new Float64Array(n);
  const state = new Uint8Array(program.atoms.length);
  const { ifEligible, ifIneligible } = program.offer;
  for (let r = 0; r < n; r++) {
    for (let a = 0; a < truth.length; a++) state[a] = truth[a]![r]!;
    const e = evalTree(program.tree, state);
    eligible[r] = e ? 1 : 0;
    offerProbability[r] = e ? ifEligible : ifIneligible;
  }
  return { eligible, offerProbability, undefinedRows: [...bad].sort((a, b) => a - b) };
}
