// What every repository shares: the open connection, the file's name for messages, and the two
// ways of touching the file — a read, or a write that is one transaction.

import type Database from 'better-sqlite3';
import { fail, fileLabel, guard } from './problems.ts';
import type { Checked } from './types.ts';

export interface StoreContext {
  readonly db: Database.Database;
  readonly file: string;
  readonly readonly: boolean;
  readonly softwareVersion: string;
  /** Current time as ISO 8601 text. */
  readonly now: () => string;
  isOpen(): boolean;
}

function closedProblem<T>(ctx: StoreContext, doing: string): Checked<T> {
  return fail(`Could not ${doing}: the workspace file ${fileLabel(ctx.file)} has been closed. Open it again first.`);
}

export function read<T>(ctx: StoreContext, doing: string, work: () => Checked<T>): Checked<T> {
  if (!ctx.isOpen()) return closedProblem(ctx, doing);
  return guard(ctx.file, doing, work);
}

/**
 * Run `work` as one IMMEDIATE transaction (the write lock is taken up front, so a busy file is
 * reported before any work is done). A problem returned by `work` rolls the transaction back.
 * The transaction also records which software version last wrote the file.
 */
export function write<T>(ctx: StoreContext, doing: string, work: () => Checked<T>): Checked<T> {
  if (!ctx.isOpen()) return closedProblem(ctx, doing);
  if (ctx.readonly) {
    return fail(`Could not ${doing}: the workspace file ${fileLabel(ctx.file)} was opened read-only. Open it again without read-only to change it.`);
  }
  return guard(ctx.file, doing, () => {
    let outcome: Checked<T> | undefined;
    const rollback = new Error('rollback');
    try {
      ctx.db.transaction(() => {
        outcome = work();
        if (!outcome.ok) throw rollback;
        stampWriter(ctx.db, ctx.softwareVersion, ctx.now());
      }).immediate();
    } catch (err) {
      if (err !== rollback) throw err;
    }
    return outcome!;
  });
}

/** Record the software version and time of the latest write in `meta`. */
export function stampWriter(db: Database.Database, softwareVersion: string, nowIso: string): void {
  const upsert = db.prepare('INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value');
  upsert.run('last_written_by', softwareVersion);
  upsert.run('last_written_at', nowIso);
}
