// Putting every validation message next to the field it is about. The validators name a JSON
// path for each problem (`program.rule.all[0].limit.table.2`); a field claims the problems at
// its path and below, and a problem goes to the deepest field that claims it. What no field
// claims is listed at the top of the screen, so nothing is dropped.

import type { Problem } from '../../main/contract/program.ts';
import type { Condition, Program } from '../../main/contract/program.ts';
import { childPath, childrenOf, conditionKind } from './rule-tree.ts';

/** Is `path` the same as `prefix`, or inside it (`a.b` is inside `a`, `a[0]` is inside `a`; `ab` is not)? */
export function isWithin(path: string, prefix: string): boolean {
  if (prefix === '') return true;
  if (path === prefix) return true;
  return path.startsWith(prefix) && (path[prefix.length] === '.' || path[prefix.length] === '[');
}

export interface Assigned {
  byField: Map<string, Problem[]>;
  unclaimed: Problem[];
}

export function assignProblems(problems: readonly Problem[], fieldPaths: Iterable<string>): Assigned {
  const fields = [...new Set(fieldPaths)].sort((a, b) => b.length - a.length);
  const byField = new Map<string, Problem[]>();
  const unclaimed: Problem[] = [];
  for (const p of problems) {
    const field = fields.find((f) => isWithin(p.path, f));
    if (field === undefined) { unclaimed.push(p); continue; }
    const list = byField.get(field) ?? [];
    list.push(p);
    byField.set(field, list);
  }
  return { byField, unclaimed };
}

/** Every field the Rule screen shows for a program, by the JSON path the validators use. */
export function programFieldPaths(p: Program, base = 'program'): string[] {
  const out = [`${base}.name`, `${base}.unit`, `${base}.variables`, `${base}.offer.ifEligible`, `${base}.offer.ifIneligible`, `${base}.offer`];
  (Array.isArray(p.variables) ? p.variables : []).forEach((v, i) => {
    const at = `${base}.variables[${i}]`;
    out.push(at, `${at}.key`, `${at}.label`, `${at}.type`, `${at}.column`, `${at}.unit`);
    // The form shows the scale of a continuous variable and the values of a discrete one; a
    // problem with the other stays with the variable's row, so it is never hidden.
    out.push(v?.type === 'discrete' ? `${at}.values` : `${at}.scale`);
  });
  const walk = (c: Condition, path: string) => {
    out.push(path);
    const kind = conditionKind(c);
    if (kind === 'compare') {
      out.push(`${path}.value`, `${path}.op`, `${path}.limit`);
      const limit = (c as { limit?: unknown }).limit;
      if (limit !== null && typeof limit === 'object' && !Array.isArray(limit)) {
        const table = (limit as { table?: unknown }).table;
        out.push(`${path}.limit.by`, `${path}.limit.else`);
        if (table !== null && typeof table === 'object') for (const k of Object.keys(table)) out.push(tableRowPath(path, k));
      }
    }
    else if (kind === 'member') out.push(`${path}.value`, `${path}.in`);
    else if (kind === 'atLeast') out.push(`${path}.atLeast`);
    childrenOf(c).forEach((child, i) => walk(child, childPath(path, c, i)));
  };
  if (p.rule && typeof p.rule === 'object') walk(p.rule, `${base}.rule`);
  return out;
}

export const problemsAt = (a: Assigned, path: string): Problem[] => a.byField.get(path) ?? [];

/** The validators' path of one row of a limit table (`….limit.table["2"]`). */
export const tableRowPath = (conditionPath: string, key: string): string =>
  /^[A-Za-z_][A-Za-z0-9_]*$/.test(key) ? `${conditionPath}.limit.table.${key}` : `${conditionPath}.limit.table[${JSON.stringify(key)}]`;

/** How many messages a screen shows for these assigned problems: every problem, once (claimed or listed at the top). */
export const shownCount = (a: Assigned): number => [...a.byField.values()].reduce((n, l) => n + l.length, 0) + a.unclaimed.length;
