// Types of an eligibility program (study file format 1, docs/study-format.md) and of the
// parsed arithmetic expressions inside it. Pure types: no behaviour lives here.

/** A number, or a string of plain arithmetic over variable keys (see expression.ts). */
export type ExprSource = number | string;

export type Comparator = '<' | '<=' | '>' | '>=' | '==' | '!=';

/** A limit picked by the value of a discrete variable; `else` covers values not in the table. */
export interface LookupLimit {
  by: string;
  table: Record<string, ExprSource>;
  else?: ExprSource;
}

export interface Comparison {
  value: ExprSource;
  op: Comparator;
  limit: ExprSource | LookupLimit;
  /** Optional short name the analyst gives this criterion (used in wording and reports). */
  label?: string;
}

export interface Membership {
  value: string;
  in: Array<number | string>;
  label?: string;
}

export interface AllOf { all: Condition[]; label?: string }
export interface AnyOf { any: Condition[]; label?: string }
export interface AtLeast { atLeast: number; of: Condition[]; label?: string }
export interface Not { not: Condition; label?: string }

export type Condition = Comparison | Membership | AllOf | AnyOf | AtLeast | Not;

export type VariableType = 'continuous' | 'discrete';

export interface Variable {
  key: string;
  label: string;
  type: VariableType;
  column: string;
  unit?: string;
  /** Unit of distance along this variable for the ball (continuous only). Default: sample SD. */
  scale?: number;
  /** Optional declared range [min, max] of a continuous variable (used to check divisions). */
  range?: [number, number];
  /** Optional declared possible values of a discrete variable, with optional labels for wording. */
  values?: Array<number | { value: number; label: string }>;
}

export interface Offer {
  /** Probability of an offer (Z = 1) when the formula says eligible. */
  ifEligible: number;
  /** Probability of an offer when the formula says ineligible. */
  ifIneligible: number;
}

export interface Program {
  name: string;
  unit?: string;
  variables: Variable[];
  rule: Condition;
  offer: Offer;
}

/** One problem found in a program or expression: where it is and what to do, in plain words. */
export interface Problem {
  /** JSON path such as `program.rule.all[1].limit`, or `` for the whole document. */
  path: string;
  message: string;
}

export type Checked<T> = { ok: true; value: T } | { ok: false; problems: Problem[] };

// ---- Parsed expressions -------------------------------------------------------------------

/** Position of a node in the source string: [start, end) character offsets. */
export interface Span { start: number; end: number }

export type BinaryOp = '+' | '-' | '*' | '/';
export type CallName = 'min' | 'max';

export type ExprNode =
  | ({ kind: 'num'; value: number } & Span)
  | ({ kind: 'var'; key: string } & Span)
  | ({ kind: 'neg'; arg: ExprNode } & Span)
  | ({ kind: 'bin'; op: BinaryOp; left: ExprNode; right: ExprNode } & Span)
  | ({ kind: 'call'; fn: CallName; args: ExprNode[] } & Span);

export interface ExprError {
  message: string;
  /** Character offset in the expression string where the problem is. */
  position: number;
}

export type ParsedExpr = { ok: true; node: ExprNode } | { ok: false; errors: ExprError[] };
