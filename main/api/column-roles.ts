// Suggested roles for the columns of a data file, shown on the Data screen beside each column.
// Suggestions only: the analyst confirms every role. The name patterns are common practice in
// agency extracts (no published source); a program's own column names always win.

import type { ColumnRole, PreviewColumn } from '../contract/api.ts';
import { closestName } from '../data/similar.ts';

export interface ColumnFacts {
  name: string;
  holds: PreviewColumn['holds'];
  /** Distinct shown values among the rows looked at, and how many rows were looked at. */
  distinct: number;
  looked: number;
  /** Numbers apart from at most 1% stray text cells. */
  mostlyNumbers: boolean;
  /** Every numeric value is 0 or 1 (and the column is mostly numbers). */
  zeroOne: boolean;
}

export interface ProgramColumns {
  /** Variable key, label and the column the program names for it. */
  variables: Array<{ key: string; label: string; column: string }>;
}

type Suggestion = NonNullable<PreviewColumn['suggestion']>;

const PATTERNS: Array<{ role: ColumnRole; re: RegExp; why: string; needs?: (c: ColumnFacts) => boolean }> = [
  { role: 'id', re: /(^|[^a-z])(id|key|ident|identifier|case|ref|number|no)$|^id[^a-z]/i, why: 'the name reads like an identifier and every value differs', needs: (c) => c.distinct === c.looked && c.looked > 0 },
  { role: 'decision', re: /offer|decision|approv|award|select|granted/i, why: 'the name reads like the recorded decision and the values are 0/1', needs: (c) => c.zeroOne },
  { role: 'treatment', re: /receiv|enrol|took|take.?up|treat|particip|paid|claimed|used/i, why: 'the name reads like take-up of the benefit', needs: (c) => c.mostlyNumbers },
  { role: 'cluster', re: /office|site|district|region|county|branch|school|clinic|area|zone|ward|cluster/i, why: 'the name reads like a place units are grouped by' },
  { role: 'covariate', re: /prior|before|baseline|^pre|_pre|last.?year|previous/i, why: 'the name reads like something measured before the decision', needs: (c) => c.mostlyNumbers },
];

/** One suggestion per column; a role that needs one column (id, decision, treatment, cluster) goes to the first fit. */
export function suggestRoles(columns: readonly ColumnFacts[], program: ProgramColumns | null): Array<Suggestion | null> {
  const out: Array<Suggestion | null> = columns.map(() => null);
  const taken = new Set<ColumnRole>();
  const names = columns.map((c) => c.name);
  // The program's variables first: exact (forgiving case and spaces), then the closest name.
  for (const v of program?.variables ?? []) {
    const wanted = v.column.trim().toLowerCase();
    let i = names.findIndex((n) => n.trim().toLowerCase() === wanted);
    let why = `the program reads ${v.label} from this column`;
    if (i < 0) {
      const near = closestName(v.column, names);
      i = near === null ? -1 : names.indexOf(near);
      why = `the program names column ${v.column} for ${v.label}; this is the closest name`;
    }
    if (i >= 0 && out[i] === null) out[i] = { role: 'variable', variable: v.key, why };
  }
  columns.forEach((c, i) => {
    if (out[i] !== null || c.holds === 'empty') return;
    for (const p of PATTERNS) {
      const single = p.role !== 'covariate';
      if (single && taken.has(p.role)) continue;
      if (!p.re.test(c.name) || (p.needs && !p.needs(c))) continue;
      out[i] = { role: p.role, why: p.why };
      if (single) taken.add(p.role);
      return;
    }
  });
  // No ID by name: the first text column whose values all differ.
  if (!taken.has('id')) {
    const i = columns.findIndex((c, j) => out[j] === null && c.holds === 'text' && c.looked > 0 && c.distinct === c.looked);
    if (i >= 0) out[i] = { role: 'id', why: 'every value differs, as an identifier does' };
  }
  // Remaining numeric columns: yes/no columns are usually characteristics known before the
  // decision (covariates); other numbers are candidate outcomes. Both are to be confirmed.
  columns.forEach((c, i) => {
    if (out[i] !== null || !c.mostlyNumbers) return;
    out[i] = c.zeroOne
      ? { role: 'covariate', why: 'a yes/no column; a covariate if it was known before the decision' }
      : { role: 'outcome', why: 'a numeric column not used otherwise; check it was measured after the decision' };
  });
  return out;
}
