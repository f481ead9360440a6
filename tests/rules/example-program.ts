// The example program of study file format 1 (docs/study-format.md, the `program` object),
// copied verbatim. Tests clone it before changing anything.
import type { Program } from '../../main/rules/types.ts';

export const EXAMPLE_PROGRAM: Program = {
  name: 'Winter Energy Credit (invented example)',
  unit: 'household',
  variables: [
    { key: 'income', label: 'Annual household income', type: 'continuous', unit: 'USD', column: 'HH_INCOME', scale: 10000 },
    { key: 'size', label: 'People in household', type: 'discrete', column: 'HH_SIZE' },
    { key: 'age', label: 'Age of oldest member', type: 'continuous', column: 'AGE_MAX' },
  ],
  rule: {
    all: [
      {
        value: 'income', op: '<=',
        limit: { by: 'size', table: { '1': 21000, '2': 28000, '3': 35000 }, else: '35000 + 7000 * (size - 3)' },
      },
      {
        any: [
          { value: 'age', op: '>=', limit: 65 },
          { value: 'income / size', op: '<=', limit: 6000 },
        ],
      },
    ],
  },
  offer: { ifEligible: 1, ifIneligible: 0 },
};

/** A deep, mutable copy of the example (as plain JSON data). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function exampleCopy(): any {
  return JSON.parse(JSON.stringify(EXAMPLE_PROGRAM));
}
