// What the screens call a criterion and a column: the names results.json gives them (format 1.1),
// the same the memo prints — a criterion's short name, a column's label — with older results
// falling back to the criterion's full words and the column's own name.

import type { Results } from '../../main/contract/results.ts';

export const criterionName = (c: Results['program']['criteria'][number]): string => c.shortName ?? c.description;

export const columnName = (r: Results, column: string): string => r.study?.columnLabels?.[column] ?? column;
