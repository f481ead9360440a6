// The compiled form of a program: expressions lowered to an index-based tree (variables
// resolved to column positions, lookups resolved to numeric keys), the rule split into its
// atoms (one per comparison or membership test) and a boolean tree over those atoms.
// Pure data: the evaluators live in evaluate-columns.ts, evaluate-scalar.ts and logic.ts.

import type { Comparator, Condition, Offer, Program, Variable } from './types.ts';

export type IrNode =
  | { k: 'const'; v: number }
  | { k: 'cont'; i: number }
  | { k: 'disc'; i: number }
  | { k: 'neg'; a: IrNode }
  | { k: 'add' | 'sub' | 'mul' | 'div'; a: IrNode; b: IrNode }
  | { k: 'min' | 'max'; args: IrNode[] }
  /** A limit picked by the value of discrete variable `by`; `otherwise` null = no else. */
  | { k: 'lookup'; by: number; table: Map<number, IrNode>; otherwise: IrNode | null };

export interface ComparisonAtom {
  kind: 'compare';
  index: number;
  /** JSON path of the comparison in the study file, e.g. `program.rule.all[1].any[0]`. */
  path: string;
  op: Comparator;
  /** value − limit: the atom is true when `margin op 0`. */
  margin: IrNode;
  /** Does the margin vary with some continuous variable (for some discrete cell)? */
  dependsOnContinuous: boolean;
  /** Affine in the continuous variables once the discrete ones are fixed (linearity.ts). */
  linear: boolean;
  condition: Condition;
}

export interface MembershipAtom {
  kind: 'member';
  index: number;
  path: string;
  /** Index of the discrete variable tested. */
  disc: number;
  members: Set<number>;
  dependsOnContinuous: false;
  linear: true;
  condition: Condition;
}

export type Atom = ComparisonAtom | MembershipAtom;

export type BoolNode =
  | { t: 'atom'; i: number }
  | { t: 'all'; c: BoolNode[] }
  | { t: 'any'; c: BoolNode[] }
  | { t: 'atLeast'; k: number; c: BoolNode[] }
  | { t: 'not'; c: BoolNode };

export interface CompiledVariable {
  key: string;
  /** Position among the variables of the same type (column index in DesignColumns). */
  index: number;
  variable: Variable;
}

export interface CompiledProgram {
  program: Program;
  continuous: CompiledVariable[];
  discrete: CompiledVariable[];
  atoms: Atom[];
  tree: BoolNode;
  offer: Offer;
}

/** Columns in the order of `CompiledProgram.continuous` / `.discrete`; missing = NaN. */
export interface DesignColumns {
  n: number;
  continuous: Float64Array[];
  discrete: Float64Array[];
}
