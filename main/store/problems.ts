// Turning what goes wrong with a workspace file into one sentence an analyst can act on.
// SQLite reports failures as result codes (https://www.sqlite.org/rescode.html); the
// ones a user can cause or fix (busy, full disk, damaged file, no permission) get their own
// wording, everything else names the file and quotes SQLite.

import Database from 'better-sqlite3';
import { basename } from 'node:path';
import type { Checked, Problem } from './types.ts';

export function fail<T>(message: string, path = ''): Checked<T> {
  return { ok: false, problems: [{ path, message }] };
}

export function ok<T>(value: T): Checked<T> {
  return { ok: true, value };
}

/** The file as the analyst sees it: the name in quotes and the full path after it. */
export function fileLabel(file: string): string {
  return `"${basename(file)}" (${file})`;
}

export function isSqliteError(err: unknown): err is InstanceType<typeof Database.SqliteError> {
  return err instanceof Database.SqliteError;
}

/** One problem for a SQLite failure while `doing` something with the workspace `file`. */
export function sqliteProblem(file: string, doing: string, err: InstanceType<typeof Database.SqliteError>): Problem {
  const code = err.code;
  const where = `the workspace file ${fileLabel(file)}`;
  let message: string;
  if (code === 'SQLITE_NOTADB') {
    message = `Could not ${doing}: ${where} is not a Fenceline workspace (it is not a SQLite database, or it is encrypted). Choose another workspace file, or create a new one.`;
  } else if (code.startsWith('SQLITE_CORRUPT')) {
    message = `Could not ${doing}: ${where} is damaged. Restore it from a backup copy, or create a new workspace and import the data again.`;
  } else if (code.startsWith('SQLITE_BUSY') || code.startsWith('SQLITE_LOCKED')) {
    message = `Could not ${doing}: another program (perhaps a second Fenceline window or the command line) is writing to ${where}. Wait for it to finish, then try again.`;
  } else if (code === 'SQLITE_FULL') {
    message = `Could not ${doing}: the disk holding ${where} is full. Free some space, then try again; nothing was half-written.`;
  } else if (code.startsWith('SQLITE_READONLY')) {
    message = `Could not ${doing}: ${where} cannot be written (it is read-only, or you lack permission for it or its folder). Open a copy you may write to, or ask for write permission.`;
  } else if (code.startsWith('SQLITE_CANTOPEN')) {
    message = `Could not ${doing}: ${where} cannot be opened (the folder may not exist, the path may be a folder, or you may lack permission). Check the path and permissions.`;
  } else if (code.startsWith('SQLITE_IOERR')) {
    message = `Could not ${doing}: the computer could not read or write ${where} (disk or network drive error). Check the drive, then try again; copy the file to a local disk if it lives on a network share.`;
  } else if (code.startsWith('SQLITE_PERM') || code.startsWith('SQLITE_AUTH')) {
    message = `Could not ${doing}: you lack permission for ${where}. Ask for access, or choose another workspace file.`;
  } else {
    message = `Could not ${doing} in ${where}: SQLite reported "${err.message}" (${code}). Keep a copy of the file and report this to the Fenceline maintainers.`;
  }
  return { path: '', message };
}

/**
 * Run `work`, turning SQLite failures into a problem (the transaction, if any, has rolled back).
 * Other errors are programming mistakes and propagate.
 */
export function guard<T>(file: string, doing: string, work: () => Checked<T>): Checked<T> {
  try {
    return work();
  } catch (err) {
    if (isSqliteError(err)) return { ok: false, problems: [sqliteProblem(file, doing, err)] };
    throw err;
  }
}
