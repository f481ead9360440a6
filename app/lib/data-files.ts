// Files handed to the Data step, and lists the Data and Start screens derive: which column links a
// second file to the first, which columns can group units for standard errors, and the recent
// studies without the workspace's run copies. Pure.

import type { DataPreview, RecentStudy } from '../../main/contract/api.ts';
import type { StudyDraft } from './draft.ts';

const loose = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, '');

/** The column of a linked file that holds the unit ID: the main ID's name (loosely), else the column suggested as an ID. */
export function guessJoinKey(linked: DataPreview, mainId: string): string | null {
  const same = mainId ? linked.columns.find((c) => loose(c.name) === loose(mainId)) : undefined;
  if (same) return same.name;
  return linked.columns.find((c) => c.suggestion?.role === 'id')?.name ?? null;
}

/** Columns that could group units for clustered standard errors: not the ID, a rule input, an outcome, take-up or the decision. */
export function clusterChoices(d: StudyDraft, previews: ReadonlyArray<DataPreview | null>): Array<{ name: string; groups: number }> {
  const c = d.columns;
  const used = new Set([c.id, c.decision ?? '', typeof c.treatment === 'string' ? c.treatment : '', ...c.outcomes.map((o) => o.column), ...d.program.variables.map((v) => v.column)]
    .filter((x) => x !== '').map(loose));
  const out: Array<{ name: string; groups: number }> = [];
  for (const p of previews) {
    for (const col of p?.columns ?? []) {
      if (used.has(loose(col.name)) || col.holds === 'empty' || out.some((o) => o.name === col.name)) continue;
      // A grouping repeats: a column whose first rows all differ is an identifier, not a group.
      if (col.distinct >= Math.min(p!.rowCount, 1000)) continue;
      out.push({ name: col.name, groups: col.distinct });
    }
  }
  return out;
}

/**
 * Fewer clusters than this make clustered standard errors unreliable (Cameron and Miller 2015,
 * "A practitioner's guide to cluster-robust inference", J. Human Resources 50(2), sec. VI: with
 * few clusters the CR1 variance is biased down and Wald tests over-reject; they discuss about
 * 20–50 as "few"). 30 is common practice within that range.
 */
export const FEW_CLUSTERS = 30;

/** Recent studies once each: the workspace's run copies (<studies>/<name>/study.json) are left out, and a path listed twice once. */
export function recentStudies(list: readonly RecentStudy[], studiesDir: string | undefined): RecentStudy[] {
  const dir = (studiesDir ?? '').replace(/[\\/]+$/, '');
  const runCopy = (p: string) => dir !== '' && p.startsWith(dir) && /^[\\/][^\\/]+[\\/]study\.json$/.test(p.slice(dir.length));
  const seen = new Set<string>();
  return list.filter((r) => {
    if (runCopy(r.path) || seen.has(r.path)) return false;
    seen.add(r.path);
    return true;
  });
}
