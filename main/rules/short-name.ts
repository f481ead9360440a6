// A criterion's short name: how the memo refers to it after stating it once in full words
// (main/rules/wording.ts). The analyst's own `label` when there is one; otherwise the criterion
// written compactly with the variables' keys — the short names the analyst gave the variables —
// and the usual mathematical signs (ISO 80000-2: ≤, ≥, ≠, ×, ÷, −), e.g. "income ≤ 30,000",
// "score ≤ limit by grade", "region is 1, 4 or 7". Deterministic and total on valid programs.

import { exprFromSource, needsParentheses, precedenceOf, PRECEDENCE } from './expression.ts';
import type { Comparator, Condition, ExprNode, ExprSource } from './types.ts';
import { formatAmount } from './wording.ts';

const COMPARATOR_SIGNS: Record<Comparator, string> = { '<=': '≤', '<': '<', '>=': '≥', '>': '>', '==': '=', '!=': '≠' };
const OPERATOR_SIGNS = { '+': '+', '-': '−', '*': '×', '/': '÷' } as const;

function compact(node: ExprNode): string {
  switch (node.kind) {
    case 'num': return formatAmount(node.value);
    case 'var': return node.key;
    case 'neg': {
      const inner = compact(node.arg);
      return precedenceOf(node.arg) < PRECEDENCE.unary ? `−(${inner})` : `−${inner}`;
    }
    case 'bin': {
      const l = compact(node.left);
      const r = compact(node.right);
      const left = needsParentheses(node.op, node.left, 'left') ? `(${l})` : l;
      const right = needsParentheses(node.op, node.right, 'right') ? `(${r})` : r;
      return `${left} ${OPERATOR_SIGNS[node.op]} ${right}`;
    }
    case 'call': return `${node.fn}(${node.args.map(compact).join(', ')})`;
  }
}

function compactSource(src: ExprSource): string {
  const parsed = exprFromSource(src);
  return parsed.ok ? compact(parsed.node) : String(src);
}

function joinOr(parts: string[]): string {
  return parts.length <= 1 ? parts.join('') : `${parts.slice(0, -1).join(', ')} or ${parts[parts.length - 1]}`;
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
  if ('any' in c) return joinOr(c.any.map((x) => criterionShortName(x)));
  if ('atLeast' in c) return `at least ${c.atLeast} of (${c.of.map((x) => criterionShortName(x)).join('; ')})`;
  if ('not' in c) return `not (${criterionShortName(c.not)})`;
  if ('in' in c) return `${c.value} is ${joinOr(c.in.map((v) => (typeof v === 'number' ? formatAmount(v) : v)))}`;
  const limit = typeof c.limit === 'object' && c.limit !== null ? `limit by ${c.limit.by}` : compactSource(c.limit);
  return `${compactSource(c.value)} ${COMPARATOR_SIGNS[c.op] ?? c.op} ${limit}`;
}

/** Short names of several criteria, made distinct: a repeated name gets its place in the list ("income ≤ 30,000 (2)"). */
export function distinctShortNames(names: string[]): string[] {
  const seen = new Map<string, number>();
  for (const n of names) seen.set(n, (seen.get(n) ?? 0) + 1);
  return names.map((n, i) => ((seen.get(n) ?? 0) > 1 ? `${n} (${i + 1})` : n));
}
