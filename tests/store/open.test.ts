// Opening workspace files: creation and migration, reopening, and refusal of files we must not
// read. Header offsets are from the SQLite file format specification
// (https://www.sqlite.org/fileformat.html §1.3): bytes 0-15 the magic string, 60-63 the
// user version, 68-71 the application id, both big-endian.

import Database from 'better-sqlite3';
import { randomBytes } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { APPLICATION_ID, applyMigrations, MIGRATIONS, SCHEMA_VERSION } from '../../main/store/migrations.ts';
import { openWorkspace } from '../../main/store/workspace.ts';
import { must, openFresh, problemsOf, simpleDataset, steppingClock, tempDir, tempWorkspacePath } from './helpers.ts';

function header(file: string): Buffer {
  return readFileSync(file).subarray(0, 100);
}

function tables(file: string): string[] {
  const db = new Database(file, { readonly: true });
  try {
    return (db.prepare("SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY name").all() as Array<{ name: string }>).map((r) => r.name);
  } finally {
    db.close();
  }
}

describe('migrations', () => {
  it('are numbered 1, 2, 3, ... in order, each with SQL', () => {
    expect(MIGRATIONS.map((m) => m.version)).toEqual(MIGRATIONS.map((_, i) => i + 1));
    for (const m of MIGRATIONS) expect(m.sql.trim().length).toBeGreaterThan(0);
    expect(SCHEMA_VERSION).toBe(MIGRATIONS.length);
  });

  it('create every table in a new file and mark its header', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    expect(ws.schemaVersion).toBe(SCHEMA_VERSION);
    ws.close();

    const h = header(file);
    expect(h.subarray(0, 16).toString('latin1')).toBe('SQLite format 3\u0000');
    expect(h.readUInt32BE(60)).toBe(SCHEMA_VERSION);
    expect(h.readUInt32BE(68)).toBe(APPLICATION_ID);
    expect(h.readUInt16BE(16)).toBe(16_384); // page size (file format §1.3.2)
    // Bytes 18 and 19 are the write and read format versions: 2 means WAL (file format §1.3.4).
    expect(h[18]).toBe(2);
    expect(h[19]).toBe(2);
    expect(tables(file)).toEqual(['dataset_chunks', 'dataset_columns', 'datasets', 'meta', 'program_versions', 'programs', 'referenced_files', 'runs', 'studies', 'study_versions']);
  });

  it('treat a zero-byte file as a new workspace', () => {
    const file = tempWorkspacePath();
    writeFileSync(file, '');
    const ws = must(openWorkspace(file));
    expect(ws.schemaVersion).toBe(SCHEMA_VERSION);
    ws.close();
  });

  it('record which software created and last wrote the file', () => {
    const file = tempWorkspacePath();
    must(openWorkspace(file, { softwareVersion: '0.1.0', now: () => new Date('2025-02-01T00:00:00Z') })).close();
    const ws = must(openWorkspace(file, { softwareVersion: '0.2.0', now: () => new Date('2025-02-02T00:00:00Z') }));
    must(ws.saveStudy({ name: 'Study', study: { fenceline: 1 } }));
    ws.close();
    const db = new Database(file, { readonly: true });
    const meta = Object.fromEntries((db.prepare('SELECT key, value FROM meta').all() as Array<{ key: string; value: string }>).map((r) => [r.key, r.value]));
    db.close();
    expect(meta).toEqual({ created_by: '0.1.0', created_at: '2025-02-01T00:00:00.000Z', last_written_by: '0.2.0', last_written_at: '2025-02-02T00:00:00.000Z' });
  });

  it('upgrade a schema-1 file step by step and keep its contents', () => {
    const file = tempWorkspacePath();
    const raw = new Database(file);
    applyMigrations(raw, 1);
    raw.prepare("INSERT INTO studies (id, name, created_at, updated_at) VALUES (1, 'Old study', '2024-01-01T00:00:00Z', '2024-01-01T00:00:00Z')").run();
    raw.prepare("INSERT INTO study_versions VALUES (1, 1, 'Old study', '2024-01-01T00:00:00Z', '{\"fenceline\":1}')").run();
    raw.close();
    expect(header(file).readUInt32BE(60)).toBe(1);
    expect(tables(file)).not.toContain('datasets');

    const ws = must(openWorkspace(file, { now: steppingClock() }));
    expect(ws.schemaVersion).toBe(SCHEMA_VERSION);
    expect(must(ws.getStudy(1)).study).toEqual({ fenceline: 1 });
    const runId = must(ws.recordRun({
      studyId: 1, studyVersion: 1, studyJson: { fenceline: 1 }, settings: {}, seed: 1, softwareVersion: 'x', dataSha256: 'a'.repeat(64),
      results: {}, timings: {}, startedAt: '2025-01-01T00:00:00Z', finishedAt: '2025-01-01T00:00:01Z',
    }));
    expect(runId).toBe(1);
    ws.close();
    expect(header(file).readUInt32BE(60)).toBe(SCHEMA_VERSION);
  });
});

describe('reopening', () => {
  it('finds what was saved and does not migrate again', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const { studyId } = must(ws.saveStudy({ name: 'Winter credit', study: { title: 'Winter credit' } }));
    const datasetId = must(ws.importDataset(simpleDataset(10)));
    ws.close();

    const again = must(openWorkspace(file));
    expect(must(again.getStudy(studyId)).study).toEqual({ title: 'Winter credit' });
    expect(must(again.loadDataset(datasetId)).columns.map((c) => c.name)).toEqual(['HH_INCOME', 'HH_SIZE', 'APPLICANT_ID']);
    again.close();
  });

  it('reads a workspace opened read-only and refuses to change it', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    must(ws.saveStudy({ name: 'A', study: { a: 1 } }));
    ws.close();
    const before = readFileSync(file);

    const ro = must(openWorkspace(file, { readonly: true }));
    expect(ro.readonly).toBe(true);
    expect(must(ro.listStudies()).map((s) => s.name)).toEqual(['A']);
    const refused = problemsOf(ro.saveStudy({ name: 'B', study: {} }));
    expect(refused[0]!.message).toMatch(/opened read-only/);
    expect(refused[0]!.message).toContain('test.fenceline');
    ro.close();
    expect(readFileSync(file).equals(before)).toBe(true);
  });

  it('lets two connections (say the app and the command line) see each other\'s commits', () => {
    const file = tempWorkspacePath();
    const app = openFresh(file);
    const cli = must(openWorkspace(file));
    const { studyId } = must(cli.saveStudy({ name: 'From the command line', study: { a: 1 } }));
    expect(must(app.getStudy(studyId)).name).toBe('From the command line');
    must(app.saveStudy({ studyId, name: 'Edited in the app', study: { a: 2 } }));
    expect(must(cli.studyHistory(studyId)).map((h) => h.name)).toEqual(['From the command line', 'Edited in the app']);
    cli.close();
    app.close();
  });

  it('says so when a closed workspace is used', () => {
    const ws = openFresh();
    ws.close();
    ws.close(); // closing twice is harmless
    expect(problemsOf(ws.listStudies())[0]!.message).toMatch(/has been closed/);
  });
});

describe('refusals (one message, no exception)', () => {
  it('refuses a file written by a newer schema, leaving it untouched', () => {
    const file = tempWorkspacePath();
    openFresh(file).close();
    const raw = new Database(file);
    raw.pragma(`user_version = ${SCHEMA_VERSION + 1}`);
    raw.close();
    const before = readFileSync(file);

    for (const readonly of [false, true]) {
      const problems = problemsOf(openWorkspace(file, { readonly }));
      expect(problems).toHaveLength(1);
      expect(problems[0]!.message).toContain(`This workspace was written by a newer Fenceline (schema ${SCHEMA_VERSION + 1}; this version reads up to ${SCHEMA_VERSION})`);
      expect(problems[0]!.message).toContain('Open it with the newer version, or choose another workspace file.');
      expect(problems[0]!.message).toContain('last by Fenceline 0.1.0-test');
      expect(problems[0]!.message).toContain(file);
    }
    expect(readFileSync(file).equals(before)).toBe(true);
  });

  it('refuses random bytes as not a database', () => {
    const file = tempWorkspacePath();
    writeFileSync(file, randomBytes(8192));
    const problems = problemsOf(openWorkspace(file));
    expect(problems).toHaveLength(1);
    expect(problems[0]!.message).toMatch(/is not a Fenceline workspace: it is not a SQLite database file/);
    expect(problems[0]!.message).toContain('test.fenceline');
  });

  it('refuses a spreadsheet-like text file', () => {
    const file = join(tempDir(), 'applicants.csv');
    writeFileSync(file, 'ID,INCOME\n1,20000\n');
    expect(problemsOf(openWorkspace(file))[0]!.message).toMatch(/not a SQLite database/);
  });

  it('refuses a damaged workspace (valid header, garbage after it)', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    must(ws.importDataset(simpleDataset(1000)));
    ws.close();
    const bytes = readFileSync(file);
    const damaged = Buffer.concat([bytes.subarray(0, 100), randomBytes(bytes.length - 100)]);
    writeFileSync(file, damaged);
    const problems = problemsOf(openWorkspace(file));
    expect(problems).toHaveLength(1);
    expect(problems[0]!.message).toMatch(/damaged|not a Fenceline workspace/);
    expect(problems[0]!.message).toContain('test.fenceline');
  });

  it("refuses another program's SQLite database", () => {
    const file = join(tempDir(), 'other.db');
    const raw = new Database(file);
    raw.exec('CREATE TABLE customers (id INTEGER PRIMARY KEY, name TEXT)');
    raw.close();
    expect(problemsOf(openWorkspace(file))[0]!.message).toMatch(/is a SQLite database, but not a Fenceline workspace/);
    expect(tables(file)).toEqual(['customers']);
  });

  it('refuses read-only opening of a missing, empty or older file', () => {
    const dir = tempDir();
    expect(problemsOf(openWorkspace(join(dir, 'none.fenceline'), { readonly: true }))[0]!.message).toMatch(/does not exist/);
    const empty = join(dir, 'empty.fenceline');
    writeFileSync(empty, '');
    expect(problemsOf(openWorkspace(empty, { readonly: true }))[0]!.message).toMatch(/is empty: it is not a workspace yet/);
    const old = join(dir, 'old.fenceline');
    const raw = new Database(old);
    applyMigrations(raw, 1);
    raw.close();
    expect(problemsOf(openWorkspace(old, { readonly: true }))[0]!.message).toMatch(new RegExp(`older Fenceline \\(schema 1; this version uses ${SCHEMA_VERSION}\\).*Open it once without read-only`));
  });

  it('refuses a folder, a path in a missing folder, and an empty path', () => {
    const dir = tempDir();
    mkdirSync(join(dir, 'sub'));
    expect(problemsOf(openWorkspace(join(dir, 'sub')))[0]!.message).toMatch(/is a folder, not a workspace file/);
    expect(problemsOf(openWorkspace(join(dir, 'missing', 'w.fenceline')))[0]!.message).toMatch(/folder for the new workspace file .* does not exist/);
    expect(problemsOf(openWorkspace('  '))[0]!.message).toMatch(/No workspace file was given/);
  });
});
