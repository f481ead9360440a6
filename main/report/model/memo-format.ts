// Formats, words and small helpers shared by the memo's sections.

import type { OutcomeResults, Results } from '../../contract/results.ts';
import type { NumberFormat } from './document.ts';
import { headlineDeltaIndex } from '../../estimate/headline.ts';

export const COUNT: NumberFormat = { style: 'integer' };
export const PERCENT: NumberFormat = { style: 'percent', decimals: 1 };
export const PVALUE: NumberFormat = { style: 'pvalue' };
export const F_STAT: NumberFormat = { style: 'decimal', decimals: 1 };
export const STD_DIFF: NumberFormat = { style: 'decimal', decimals: 2, signed: true };
export const DELTA: NumberFormat = { style: 'decimal', decimals: 2 };

/** The index of the headline delta, as the findings state it (results.headline); results saved
 * before format 1.1 (a map cache, say) fall back to the one definition in main/estimate/headline.ts. */
export function headlineIndex(r: Results): number {
  return (r.headline as Results['headline'] | undefined)?.index ?? headlineDeltaIndex(r.settings.deltas);
}

/** "Utility arrears in March (USD)" → { name: "Utility arrears in March", unit: "USD" }. */
export function outcomeName(o: Pick<OutcomeResults, 'label' | 'column'>): { name: string; unit?: string } {
  const label = o.label || o.column;
  const m = /^(.*\S)\s*\(([^()]+)\)\s*$/.exec(label);
  return m ? { name: m[1]!, unit: m[2]! } : { name: label };
}

/** Decimals so that the standard error shows two significant digits (at most 6, at least 0). */
export function decimalsFor(se: number | null | undefined): number {
  if (se === null || se === undefined || !(se > 0) || !Number.isFinite(se)) return 2;
  return Math.min(6, Math.max(0, 1 - Math.floor(Math.log10(se))));
}

/** The number format of an outcome's effects: decimals from the headline standard error. */
export function effectFormat(o: OutcomeResults, headline: number, opts: { signed?: boolean; unit?: boolean } = {}): NumberFormat {
  const se = o.byDelta[headline]?.se ?? o.byDelta.find((b) => b.se !== null)?.se ?? null;
  const f: NumberFormat = { style: 'decimal', decimals: decimalsFor(se) };
  const unit = outcomeName(o).unit;
  if (opts.unit && unit) f.unit = unit;
  if (opts.signed) f.signed = true;
  return f;
}

export function lowerFirst(s: string): string {
  return s.length > 1 && /^[A-Z][a-z]/.test(s) ? s[0]!.toLowerCase() + s.slice(1) : s;
}

export function upperFirst(s: string): string {
  return s ? s[0]!.toUpperCase() + s.slice(1) : s;
}

/** Plural of the program's unit word ("household" → "households"). */
export function plural(unit: string): string {
  if (/(s|x|ch|sh)$/.test(unit)) return unit + 'es';
  if (/[^aeiou]y$/.test(unit)) return unit.slice(0, -1) + 'ies';
  return unit + 's';
}

export function unitWords(r: Results): { one: string; many: string } {
  const one = r.program.unit || 'unit';
  return { one, many: plural(one) };
}

/** The words for what the estimate is the effect of. */
export function effectOf(r: Results): string {
  return r.estimand.kind === 'treatment' ? 'receiving the benefit' : 'being offered the benefit';
}

/** A criterion of the rule in words, as a sentence subject ("The household's age … is at least 65"). */
export function criterionText(r: Results, atom: number, one: string): string {
  const c = r.program.criteria.find((x) => x.atom === atom);
  return c ? upperFirst(c.description.replace(/^its /, `the ${one}'s `)) : `Criterion ${atom + 1}`;
}

/** A criterion's short name (results.json `program.criteria[].shortName`): how the memo refers to
 * it after the rule section has stated it in full. Results written before short names fall back
 * to the full words. */
export function criterionShort(r: Results, atom: number, one: string): string {
  const c = r.program.criteria.find((x) => x.atom === atom);
  return c?.shortName ?? criterionText(r, atom, one);
}

/** A limit of the rule by the JSON path of its value (program.rule.all[0].limit, …limit.table.2):
 * "the limit of “income ≤ 30,000”", with the group a table limit applies to. */
export function limitName(r: Results, limit: { path: string; description: string; group?: string }, one: string): string {
  const c = r.program.criteria.find((x) => limit.path === `${x.path}.limit` || limit.path.startsWith(`${x.path}.limit.`));
  if (!c) return upperFirst(limit.description);
  return `Limit of “${criterionShort(r, c.atom, one)}”${limit.group ? ` for ${limit.group}` : ''}`;
}

/** The name the memo prints for a data column (results.study.columnLabels), else the column's own name. */
export function columnLabel(r: Results, column: string): string {
  return r.study.columnLabels?.[column] ?? column;
}

const escapeRegExp = (s: string): string => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** A message from reading the data with every column name it mentions preceded by the memo's name
 * for that column: "REPAIR_COST is not a number" → "Estimated repair cost (REPAIR_COST) is not a
 * number"; a name that ends in its unit takes the column inside: "Earnings (USD; EARNINGS)".
 * Apply it after memo-scrub's shareableText, whose patterns read the message's own parentheses. */
export function withColumnLabels(r: Results, message: string): string {
  const labels = Object.entries(r.study.columnLabels ?? {}).filter(([column, label]) => label && label !== column);
  if (!labels.length) return message;
  labels.sort((a, b) => b[0].length - a[0].length);
  const byColumn = new Map(labels);
  const pattern = new RegExp(`(?<![\\w])(${labels.map(([c]) => escapeRegExp(c)).join('|')})(?![\\w])`, 'g');
  const out = message.replace(pattern, (column) => { const label = byColumn.get(column)!; return label.endsWith(')') ? `${label.slice(0, -1)}; ${column})` : `${label} (${column})`; });
  return /^[a-z]/.test(message) ? out : upperFirst(out);
}

/** "within each district (DISTRICT)": the clusters of CR1 standard errors, in words. */
export function clusterWords(r: Results): string {
  const column = r.settings.clusterColumn;
  if (!column) return 'within each cluster';
  const label = columnLabel(r, column);
  return label === column ? `within each cluster (${column})` : `within each ${lowerFirst(label)} (${column})`;
}
