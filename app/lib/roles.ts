// Column roles on the Data screen: which column is the unit ID, which feeds each input of the
// rule, which are outcomes, take-up, the recorded decision, the cluster, covariates, controls.
// The study draft is the one place the mapping lives; these read it per column and change it
// for one column at a time. Names match forgiving case and surrounding spaces, as the importer
// does (main/data/find-column.ts).

import type { ColumnRole, PreviewColumn } from '../../main/contract/api.ts';
import type { StudyDraft } from './draft.ts';

export interface RoleChoice { role: ColumnRole; variable?: string }

const same = (a: string | undefined, b: string): boolean => a !== undefined && a.trim().toLowerCase() === b.trim().toLowerCase();

export const ROLE_WORDS: Record<ColumnRole, string> = {
  id: 'Unit ID',
  variable: 'Input to the rule',
  outcome: 'Outcome (measured after the decision)',
  treatment: 'Take-up (received the benefit)',
  decision: 'Recorded decision (offered or not)',
  cluster: 'Group for standard errors (cluster)',
  covariate: 'Covariate (for balance checks)',
  control: 'Control (added to the regression)',
  ignore: 'Not used',
};

/** The choices a column's role menu offers, one per rule input. */
export function roleOptions(d: StudyDraft): Array<{ value: string; label: string }> {
  const out = [{ value: 'ignore', label: ROLE_WORDS.ignore }, { value: 'id', label: ROLE_WORDS.id }];
  for (const v of d.program.variables) out.push({ value: `variable:${v.key}`, label: `Rule input: ${v.label || v.key}` });
  for (const r of ['outcome', 'treatment', 'decision', 'cluster', 'covariate', 'control'] as const) out.push({ value: r, label: ROLE_WORDS[r] });
  return out;
}

export const choiceValue = (c: RoleChoice): string => (c.role === 'variable' ? `variable:${c.variable}` : c.role);
export function parseChoice(value: string): RoleChoice {
  if (value.startsWith('variable:')) return { role: 'variable', variable: value.slice('variable:'.length) };
  return { role: value as ColumnRole };
}

export function roleOf(d: StudyDraft, column: string): RoleChoice {
  const c = d.columns;
  if (same(c.id, column)) return { role: 'id' };
  const v = d.program.variables.find((x) => same(x.column, column));
  if (v) return { role: 'variable', variable: v.key };
  if (c.outcomes.some((o) => same(o.column, column))) return { role: 'outcome' };
  if (typeof c.treatment === 'string' && same(c.treatment, column)) return { role: 'treatment' };
  if (same(c.decision, column)) return { role: 'decision' };
  if (same(c.cluster, column)) return { role: 'cluster' };
  if ((c.covariates ?? []).some((x) => same(x, column))) return { role: 'covariate' };
  if ((c.controls ?? []).some((x) => same(x, column))) return { role: 'control' };
  return { role: 'ignore' };
}

/** Take a column out of every role. */
function clear(d: StudyDraft, column: string): void {
  const c = d.columns;
  if (same(c.id, column)) c.id = '';
  for (const v of d.program.variables) if (same(v.column, column)) v.column = '';
  c.outcomes = c.outcomes.filter((o) => !same(o.column, column));
  if (typeof c.treatment === 'string' && same(c.treatment, column)) delete c.treatment;
  if (same(c.decision, column)) delete c.decision;
  if (same(c.cluster, column)) delete c.cluster;
  c.covariates = (c.covariates ?? []).filter((x) => !same(x, column));
  c.controls = (c.controls ?? []).filter((x) => !same(x, column));
}

/** Give a column a role. Roles held by one column (ID, each rule input, take-up, decision, cluster) move to it. */
export function setRole(d: StudyDraft, column: string, choice: RoleChoice): void {
  clear(d, column);
  const c = d.columns;
  switch (choice.role) {
    case 'id': c.id = column; break;
    case 'variable': { const v = d.program.variables.find((x) => x.key === choice.variable); if (v) v.column = column; break; }
    // The memo prints labels, never column names: the Data screen asks for one (outcomeLabelsMissing).
    case 'outcome': c.outcomes.push({ column, label: '' }); break;
    case 'treatment': c.treatment = column; break;
    case 'decision': c.decision = column; break;
    case 'cluster': c.cluster = column; break;
    case 'covariate': c.covariates = [...(c.covariates ?? []), column]; break;
    case 'control': c.controls = [...(c.controls ?? []), column]; break;
    case 'ignore': break;
  }
}

/** Columns the memo mentions besides outcomes and rule inputs — characteristics and the cluster — that may carry a name for the memo. */
export const labelledColumns = (d: StudyDraft): string[] =>
  [...(d.columns.covariates ?? []), ...(d.columns.cluster ? [d.columns.cluster] : [])];

/** Set or clear the memo's name of a column (an empty name clears it: the memo then prints the column name). */
export function setColumnLabel(d: StudyDraft, column: string, label: string): void {
  const rest = { ...(d.columns.labels ?? {}) };
  if (label.trim()) rest[column] = label; else delete rest[column];
  if (Object.keys(rest).length) d.columns.labels = rest; else delete d.columns.labels;
}

/** Is a single-column role already given to some column? */
function roleTaken(d: StudyDraft, choice: RoleChoice): boolean {
  const c = d.columns;
  switch (choice.role) {
    case 'id': return c.id !== '';
    case 'variable': return !!d.program.variables.find((x) => x.key === choice.variable)?.column;
    case 'treatment': return c.treatment !== undefined;
    case 'decision': return !!c.decision;
    case 'cluster': return !!c.cluster;
    default: return false;
  }
}

/** Apply the suggestions to columns that have no role yet, never moving a role the analyst gave. Returns how many were applied. */
export function applySuggestions(d: StudyDraft, columns: readonly PreviewColumn[]): number {
  let applied = 0;
  for (const col of columns) {
    const s = col.suggestion;
    if (!s || s.role === 'ignore' || roleOf(d, col.name).role !== 'ignore') continue;
    const choice: RoleChoice = s.variable ? { role: s.role, variable: s.variable } : { role: s.role };
    if (roleTaken(d, choice)) continue;
    setRole(d, col.name, choice);
    applied++;
  }
  return applied;
}

/** Outcomes that have no name for the memo yet. */
export const outcomeLabelsMissing = (d: StudyDraft): string[] => d.columns.outcomes.filter((o) => !(o.label ?? '').trim()).map((o) => o.column);
