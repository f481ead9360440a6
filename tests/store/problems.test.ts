// SQLite failures become one sentence naming the file and what to do. Result codes are
// SQLite's (https://www.sqlite.org/rescode.html); the errors are built by hand because a
// full disk or a second writer cannot be arranged cheaply in a test.

import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { guard, sqliteProblem } from '../../main/store/problems.ts';

const FILE = '/data/agency/winter.fenceline';
const err = (code: string, message = 'some sqlite message') => new Database.SqliteError(message, code);

describe('sqliteProblem', () => {
  it.each([
    ['SQLITE_BUSY', /another program .* is writing to .*Wait for it to finish/],
    ['SQLITE_BUSY_SNAPSHOT', /another program/],
    ['SQLITE_FULL', /disk holding .* is full\. Free some space/],
    ['SQLITE_READONLY', /cannot be written .*read-only, or you lack permission/],
    ['SQLITE_CORRUPT', /is damaged\. Restore it from a backup/],
    ['SQLITE_NOTADB', /is not a Fenceline workspace/],
    ['SQLITE_IOERR_WRITE', /could not read or write/],
    ['SQLITE_CANTOPEN', /cannot be opened/],
    ['SQLITE_PERM', /lack permission/],
  ])('words %s for an analyst and names the file', (code, wording) => {
    const p = sqliteProblem(FILE, 'store the dataset', err(code));
    expect(p.message).toMatch(/^Could not store the dataset/);
    expect(p.message).toMatch(wording);
    expect(p.message).toContain('"winter.fenceline" (/data/agency/winter.fenceline)');
  });

  it('quotes SQLite for codes without their own wording', () => {
    expect(sqliteProblem(FILE, 'list the runs', err('SQLITE_MISMATCH', 'datatype mismatch')).message).toMatch(/SQLite reported "datatype mismatch" \(SQLITE_MISMATCH\)/);
  });
});

describe('guard', () => {
  it('turns a SQLite failure into a problem and lets other errors through', () => {
    const r = guard(FILE, 'save the study', () => { throw err('SQLITE_FULL'); });
    expect(r.ok).toBe(false);
    expect(() => guard(FILE, 'save the study', () => { throw new TypeError('a bug'); })).toThrow(TypeError);
  });
});
