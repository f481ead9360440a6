// A criterion's short name: how the memo refers to it after stating it once in full words
// (main/rules/wording.ts). The analyst's own `label` when there is one; otherwise the criterion
// written compactly with the variables' keys — the short names the analyst gave the variables —
// and the usual mathematical signs (ISO 80000-2: ≤, ≥, ≠, ×, ÷, −), e.g. "income ≤ 30,000",
// "score ≤ limit by grade", "region is 1, 4 or 7". Deterministic and total on valid programs.

import { exprFromSource, printExpression, type ExpressionStyle } from './expression.ts';
import type { Comparator, Condition, ExprSource } from './types.ts';
import { formatAmount, listWithOr } from './wording.ts';

const COMPARATOR_SIGNS: Record<Comparator, string> = { '<=': '≤', '<': '<', '>=': '≥', '>': '>', '==': '=', '!=': '≠' };
// The parser's grammar with the signs of ISO 80000-2 and grouped numbers.
const SIGNS: ExpressionStyle = { number: formatAmount, minus: '−', operators: { '+': '+', '-': '−', '*': '×', '/': '÷' } };

function compactSource(src: ExprSource): string {
  const parsed = exprFromSource(src);
  return parsed.ok ? printExpression(parsed.node, SIGNS) : String(src);
}

function ownLabel(c: Condition): string | undefined {
  const label = (c as { label?: unknown }).label;
  return typeof label === 'string' && label.trim() !== '' ? label.trim() : undefined;
}

/** The short name of one condition (a criterion of the rule, or a group of them). */
export function criterionShortName(c: Condition): string {
  const label = ownLabel(c);
  if (label !== undefined) return label;
  if ('all' in c) return c.all.map((x) => criterionShortName(x)).join(' and ');
  if ('any' in c) return listWithOr(c.any.map((x) => criterionShortName(x)));
  if ('atLeast' in c) return `at least ${c.atLeast} of (${c.of.map((x) => criterionShortName(x)).join('; ')})`;
  if ('not' in c) return `not (${criterionShortName(c.not)})`;
  if ('in' in c) return `${c.value} is ${listWithOr(c.in.map((v) => (typeof v === 'number' ? formatAmount(v) : v)))}`;
  const limit = typeof c.limit === 'object' && c.limit !== null ? `limit by ${c.limit.by}` : compactSource(c.limit);
  return `${compactSource(c.value)} ${COMPARATOR_SIGNS[c.op] ?? c.op} ${limit}`;
}

/** Short names of several criteria, made distinct: a repeated name gets its place in the list ("income ≤ 30,000 (2)"). */
export function distinctShortNames(names: string[]): string[] {
  const seen = new Map<string, number>();
  for (const n of names) seen.set(n, (seen.get(n) ?? 0) + 1);
  return names.map((n, i) => ((seen.get(n) ?? 0) > 1 ? `${n} (${i + 1})` : n));
}
