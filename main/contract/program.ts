// The program's types (study file format 1), re-exported for the renderer, which may import
// main/contract only. Types only.

export type {
  AllOf, AnyOf, AtLeast, Comparator, Comparison, Condition, ExprSource, LookupLimit, Membership, Not, Offer, Problem, Program,
  Variable, VariableType,
} from '../rules/types.ts';
