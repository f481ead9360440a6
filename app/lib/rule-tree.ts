// Editing the eligibility rule with forms: what kind each condition is, how its limit is given,
// and the edits the Rule screen offers (add a criterion or a group, change a group's kind,
// change how a limit is given, remove). Edits change the condition objects in place, so the
// screen's state (Svelte runes proxies) follows them. Pure apart from that mutation.

import type { Comparator, Comparison, Condition, LookupLimit, Membership, Program } from '../../main/contract/program.ts';

export type ConditionKind = 'compare' | 'member' | 'all' | 'any' | 'atLeast' | 'not';
export type GroupKind = 'all' | 'any' | 'atLeast';
export type LimitKind = 'number' | 'table' | 'expression';

export const COMPARATORS: ReadonlyArray<{ op: Comparator; words: string }> = [
  { op: '<=', words: 'is at most' },
  { op: '<', words: 'is below' },
  { op: '>=', words: 'is at least' },
  { op: '>', words: 'is above' },
  { op: '==', words: 'equals' },
  { op: '!=', words: 'is not' },
];

export function conditionKind(c: Condition): ConditionKind {
  if ('all' in c) return 'all';
  if ('any' in c) return 'any';
  if ('atLeast' in c) return 'atLeast';
  if ('not' in c) return 'not';
  if ('in' in c) return 'member';
  return 'compare';
}

export const isGroup = (c: Condition): boolean => ['all', 'any', 'atLeast'].includes(conditionKind(c));

export function childrenOf(c: Condition): Condition[] {
  if ('all' in c) return c.all;
  if ('any' in c) return c.any;
  if ('atLeast' in c) return c.of;
  if ('not' in c) return [c.not];
  return [];
}

/** JSON path of the i-th child (the validators' paths: `program.rule.all[1].any[0]`). */
export function childPath(path: string, c: Condition, i: number): string {
  if ('all' in c) return `${path}.all[${i}]`;
  if ('any' in c) return `${path}.any[${i}]`;
  if ('atLeast' in c) return `${path}.of[${i}]`;
  return `${path}.not`;
}

export function limitKind(c: Comparison): LimitKind {
  if (typeof c.limit === 'object' && c.limit !== null) return 'table';
  // An empty limit (not typed yet) is shown in the number field, waiting for its number.
  return typeof c.limit === 'string' && c.limit.trim() !== '' && !/^\s*-?\d+(\.\d+)?\s*$/.test(c.limit) ? 'expression' : 'number';
}

/** Is the compared value a plain variable key (the form's variable picker) or an expression? */
export function valueIsVariable(c: Comparison, p: Program): boolean {
  return typeof c.value === 'string' && p.variables.some((v) => v.key === c.value);
}

/** Keys of the variables some comparison of the rule already compares. */
function comparedKeys(c: Condition, out = new Set<string>()): Set<string> {
  if (conditionKind(c) === 'compare' && typeof (c as Comparison).value === 'string') out.add((c as Comparison).value as string);
  for (const child of childrenOf(c)) comparedKeys(child, out);
  return out;
}

/**
 * A new criterion compares the first continuous variable the rule does not compare yet (the
 * analyst sees it and can change it) and has no limit until one is typed: an empty limit is
 * shown as incomplete ("type a limit") and the rule cannot run until it is given.
 */
export function newComparison(p: Program): Comparison {
  const used = p.rule ? comparedKeys(p.rule) : new Set<string>();
  const continuous = p.variables.filter((x) => x.type === 'continuous' && x.key);
  const v = continuous.find((x) => !used.has(x.key)) ?? continuous[0] ?? p.variables.find((x) => x.key);
  return { value: v?.key ?? '', op: '<=', limit: '' };
}

export function newMembership(p: Program): Membership {
  const v = p.variables.find((x) => x.type === 'discrete');
  return { value: v?.key ?? '', in: [] };
}

export function newGroup(kind: GroupKind, p: Program): Condition {
  const first = newComparison(p);
  if (kind === 'atLeast') return { atLeast: 1, of: [first] };
  return kind === 'all' ? { all: [first] } : { any: [first] };
}

/** Change a group between all / any / at least k, keeping its members. */
export function setGroupKind(c: Condition, kind: GroupKind, k = 1): void {
  const members = childrenOf(c);
  const o = c as unknown as Record<string, unknown>;
  delete o.all; delete o.any; delete o.atLeast; delete o.of;
  if (kind === 'all') o.all = members;
  else if (kind === 'any') o.any = members;
  else { o.atLeast = Math.max(1, Math.min(k, members.length || 1)); o.of = members; }
}

/** Change how a comparison's limit is given, carrying the current number over where it can. */
export function setLimitKind(c: Comparison, kind: LimitKind, p: Program): void {
  // Nothing is invented: a limit carries over only when one was typed, and a new table's rows
  // (one per declared value) start empty, each shown as "type a limit".
  const current = typeof c.limit === 'number' ? c.limit : typeof c.limit === 'string' ? c.limit : (c.limit.else ?? '');
  if (kind === 'number') c.limit = typeof current === 'number' ? current : current.trim() !== '' && Number.isFinite(Number(current)) ? Number(current) : '';
  else if (kind === 'expression') c.limit = String(current);
  else {
    const by = p.variables.find((v) => v.type === 'discrete');
    const table: Record<string, number | string> = {};
    for (const value of declaredValues(p, by?.key ?? '')) table[String(value)] = '';
    const limit: LookupLimit = { by: by?.key ?? '', table };
    c.limit = limit;
  }
}

/** The declared values of a discrete variable (numbers), in order. */
export function declaredValues(p: Program, key: string): number[] {
  const v = p.variables.find((x) => x.key === key);
  return (v?.values ?? []).map((x) => (typeof x === 'number' ? x : x.value));
}

export function addChild(group: Condition, child: Condition): void {
  childrenOf(group).push(child);
}

export function removeChild(group: Condition, index: number): void {
  const list = childrenOf(group);
  list.splice(index, 1);
  if ('atLeast' in group && group.atLeast > list.length) group.atLeast = Math.max(1, list.length);
}

/** Wrap a criterion in "not". */
export function negate(c: Condition): Condition {
  return { not: c };
}

/** Names for the group kinds, as the form shows them. */
export function groupWords(kind: GroupKind, k = 1): string {
  return kind === 'all' ? 'all of these' : kind === 'any' ? 'any of these' : `at least ${k} of these`;
}

/** A table entry's written key as the analyst sees it (a declared label when there is one). */
export function tableKeyLabel(p: Program, by: string, key: string): string {
  const v = p.variables.find((x) => x.key === by);
  const hit = (v?.values ?? []).find((x) => typeof x === 'object' && String(x.value) === key);
  return hit && typeof hit === 'object' ? `${key} (${hit.label})` : key;
}

/** Next unused key for a new table row: one above the largest numeric key. */
export function nextTableKey(limit: LookupLimit): string {
  const nums = Object.keys(limit.table).map(Number).filter(Number.isFinite);
  return String(nums.length ? Math.max(...nums) + 1 : 1);
}
