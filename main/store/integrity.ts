// A full check of the workspace file: SQLite's own page-level check
// (https://www.sqlite.org/pragma.html#pragma_integrity_check) and the foreign keys between tables.

import { read, type StoreContext } from './context.ts';
import { fileLabel, ok } from './problems.ts';
import type { Checked, Problem } from './types.ts';

const MAX_REPORTED = 10;

export function integrityProblems(ctx: StoreContext): Checked<void> {
  return read(ctx, 'check the workspace', () => {
    const problems: Problem[] = [];
    const advice = 'Restore the file from a backup copy, or create a new workspace and import the data again.';
    const pages = ctx.db.pragma(`integrity_check(${MAX_REPORTED})`) as Array<{ integrity_check: string }>;
    for (const p of pages) {
      if (p.integrity_check !== 'ok') problems.push({ path: '', message: `The workspace file ${fileLabel(ctx.file)} is damaged (SQLite: ${p.integrity_check}). ${advice}` });
    }
    const links = ctx.db.pragma('foreign_key_check') as Array<{ table: string; rowid: number; parent: string }>;
    for (const l of links.slice(0, MAX_REPORTED)) {
      problems.push({ path: '', message: `The workspace file ${fileLabel(ctx.file)} is inconsistent: row ${l.rowid} of table ${l.table} points at a missing entry of ${l.parent}. ${advice}` });
    }
    return problems.length > 0 ? { ok: false, problems } : ok(undefined);
  });
}
