// Opening a workspace file: one SQLite database (https://www.sqlite.org/fileformat.html) in WAL
// mode with foreign keys on, brought to the current schema by the ordered steps in
// migrations.ts. Anything that is not a Fenceline workspace we can read — not SQLite at all,
// another program's database, a newer schema, a damaged file — is refused with one sentence
// that names the file and says what to do.

import Database from 'better-sqlite3';
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import type { StoreContext } from './context.ts';
import { stampWriter } from './context.ts';
import * as datasets from './datasets.ts';
import * as referenced from './referenced-files.ts';
import { documentHistory, getDocument, listDocuments, PROGRAMS, saveDocument, STUDIES } from './documents.ts';
import { APPLICATION_ID, applyMigrations, readSchemaVersion, SCHEMA_VERSION } from './migrations.ts';
import { fail, fileLabel, isSqliteError, ok, sqliteProblem } from './problems.ts';
import * as runs from './runs.ts';
import { SOFTWARE_VERSION } from './software-version.ts';
import type { Checked, OpenOptions, Workspace } from './types.ts';
import { integrityProblems } from './integrity.ts';

/** First 16 bytes of every SQLite 3 database file (file format §1.3, "The Database Header"). */
const SQLITE_MAGIC = 'SQLite format 3\u0000';
/** Page size for new files: 16 KiB pages load column chunks ~25% faster than the 4 KiB default (tests/bench/store.bench.ts) without wasting much space on small tables. */
const NEW_FILE_PAGE_SIZE = 16_384;
/** How long to wait for another writer before reporting the file busy (ms). */
const BUSY_TIMEOUT_MS = 5_000;

type FileState = { kind: 'missing' } | { kind: 'empty' } | { kind: 'sqlite' };

/** Look at the file before SQLite does, so the common mistakes get precise messages. */
function inspectFile(file: string, readonly: boolean): Checked<FileState> {
  let size: number;
  try {
    const st = statSync(file);
    if (st.isDirectory()) return fail(`${fileLabel(file)} is a folder, not a workspace file. Choose a file inside it, or a new file name.`);
    size = st.size;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') {
      return fail(`The workspace file ${fileLabel(file)} cannot be examined (${(err as NodeJS.ErrnoException).code ?? 'unknown error'}). Check that you may read it and its folder.`);
    }
    if (readonly) return fail(`The workspace file ${fileLabel(file)} does not exist. Check the name and folder, or open it without read-only to create a new workspace.`);
    try {
      if (!statSync(dirname(file)).isDirectory()) throw new Error('not a folder');
    } catch {
      return fail(`The folder for the new workspace file ${fileLabel(file)} does not exist. Create the folder first, or choose another place.`);
    }
    return ok({ kind: 'missing' });
  }
  if (size === 0) return ok({ kind: 'empty' });
  const header = Buffer.alloc(16);
  let got = 0;
  try {
    const fd = openSync(file, 'r');
    try { got = readSync(fd, header, 0, 16, 0); } finally { closeSync(fd); }
  } catch (err) {
    return fail(`The workspace file ${fileLabel(file)} cannot be read (${(err as NodeJS.ErrnoException).code ?? 'unknown error'}). Check that you may read it.`);
  }
  if (got < 16 || header.toString('latin1') !== SQLITE_MAGIC) {
    return fail(`${fileLabel(file)} is not a Fenceline workspace: it is not a SQLite database file at all. Choose the workspace file (usually ending in .fenceline), or create a new one.`);
  }
  return ok({ kind: 'sqlite' });
}

function lastWriter(db: Database.Database): string | null {
  try {
    const row = db.prepare("SELECT value FROM meta WHERE key = 'last_written_by'").get() as { value: string } | undefined;
    return row?.value ?? null;
  } catch {
    return null;
  }
}

/** Check the file is ours and of a schema we can read; upgrade it unless read-only. */
function prepare(db: Database.Database, file: string, readonly: boolean, softwareVersion: string, now: () => string): Checked<number> {
  const appId = db.pragma('application_id', { simple: true }) as number;
  const version = readSchemaVersion(db);
  const objects = (db.prepare('SELECT COUNT(*) AS n FROM sqlite_schema').get() as { n: number }).n;
  const fresh = appId === 0 && version === 0 && objects === 0;

  if (!fresh && appId !== APPLICATION_ID) {
    return fail(`${fileLabel(file)} is a SQLite database, but not a Fenceline workspace (it belongs to another program). Choose the Fenceline workspace file, or create a new one.`);
  }
  if (version > SCHEMA_VERSION) {
    const by = lastWriter(db);
    return fail(`This workspace was written by a newer Fenceline (schema ${version}; this version reads up to ${SCHEMA_VERSION})${by === null ? '' : ` — last by Fenceline ${by}`}. Open it with the newer version, or choose another workspace file. File: ${fileLabel(file)}.`);
  }
  if (readonly) {
    if (fresh) return fail(`${fileLabel(file)} is empty: it is not a workspace yet. Open it without read-only to create a workspace, or choose another file.`);
    if (version < SCHEMA_VERSION) {
      return fail(`The workspace ${fileLabel(file)} was written by an older Fenceline (schema ${version}; this version uses ${SCHEMA_VERSION}) and must be upgraded, which read-only opening cannot do. Open it once without read-only (keep a copy if older versions must still read it).`);
    }
    db.pragma('query_only = ON');
    return ok(version);
  }

  if (fresh) {
    // Must precede the first table and the switch to WAL (https://www.sqlite.org/pragma.html#pragma_page_size).
    db.pragma(`page_size = ${NEW_FILE_PAGE_SIZE}`);
  }
  db.pragma('journal_mode = WAL');
  // FULL: a committed import survives a power cut, not only a crash (WAL commits are rare and large here).
  db.pragma('synchronous = FULL');
  if (version < SCHEMA_VERSION) {
    applyMigrations(db);
    db.transaction(() => {
      if (fresh) {
        const insert = db.prepare('INSERT OR IGNORE INTO meta (key, value) VALUES (?, ?)');
        insert.run('created_by', softwareVersion);
        insert.run('created_at', now());
      }
      stampWriter(db, softwareVersion, now());
    }).immediate();
  }
  return ok(readSchemaVersion(db));
}

export function openWorkspace(path: string, opts: OpenOptions = {}): Checked<Workspace> {
  if (typeof path !== 'string' || path.trim() === '') {
    return fail('No workspace file was given. Choose a workspace file, or a name for a new one.');
  }
  const file = resolve(path);
  const readonly = opts.readonly === true;
  const softwareVersion = opts.softwareVersion ?? SOFTWARE_VERSION;
  const clock = opts.now ?? (() => new Date());
  const now = (): string => clock().toISOString();

  const state = inspectFile(file, readonly);
  if (!state.ok) return state;

  let db: Database.Database;
  try {
    db = new Database(file, { readonly, fileMustExist: readonly, timeout: BUSY_TIMEOUT_MS });
  } catch (err) {
    if (isSqliteError(err)) return { ok: false, problems: [sqliteProblem(file, 'open the workspace', err)] };
    return fail(`The workspace file ${fileLabel(file)} could not be opened (${(err as Error).message}). Check the path and your permissions.`);
  }

  let schemaVersion: number;
  try {
    db.pragma('foreign_keys = ON');
    db.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
    const prepared = prepare(db, file, readonly, softwareVersion, now);
    if (!prepared.ok) {
      db.close();
      return prepared;
    }
    schemaVersion = prepared.value;
  } catch (err) {
    db.close();
    if (isSqliteError(err)) return { ok: false, problems: [sqliteProblem(file, 'open the workspace', err)] };
    throw err;
  }

  let open = true;
  const ctx: StoreContext = { db, file, readonly, softwareVersion, now, isOpen: () => open };

  return ok({
    path: file,
    readonly,
    schemaVersion,

    saveProgram: (input) => {
      const r = saveDocument(ctx, PROGRAMS, { id: input?.programId, name: input?.name, document: input?.program });
      return r.ok ? ok({ programId: r.value.id, version: r.value.version }) : r;
    },
    getProgram: (programId, version) => {
      const r = getDocument(ctx, PROGRAMS, programId, version);
      return r.ok ? ok({ programId: r.value.id, version: r.value.version, name: r.value.name, savedAt: r.value.savedAt, program: r.value.document }) : r;
    },
    listPrograms: () => {
      const r = listDocuments(ctx, PROGRAMS);
      return r.ok ? ok(r.value.map(({ id, ...rest }) => ({ programId: id, ...rest }))) : r;
    },
    programHistory: (programId) => documentHistory(ctx, PROGRAMS, programId),

    saveStudy: (input) => {
      const r = saveDocument(ctx, STUDIES, { id: input?.studyId, name: input?.name, document: input?.study });
      return r.ok ? ok({ studyId: r.value.id, version: r.value.version }) : r;
    },
    getStudy: (studyId, version) => {
      const r = getDocument(ctx, STUDIES, studyId, version);
      return r.ok ? ok({ studyId: r.value.id, version: r.value.version, name: r.value.name, savedAt: r.value.savedAt, study: r.value.document }) : r;
    },
    listStudies: () => {
      const r = listDocuments(ctx, STUDIES);
      return r.ok ? ok(r.value.map(({ id, ...rest }) => ({ studyId: id, ...rest }))) : r;
    },
    studyHistory: (studyId) => documentHistory(ctx, STUDIES, studyId),

    importDataset: (meta, importOpts) => datasets.importDataset(ctx, meta, importOpts),
    loadDataset: (datasetId) => datasets.loadDataset(ctx, datasetId),
    listDatasets: () => datasets.listDatasets(ctx),
    deleteDataset: (datasetId) => datasets.deleteDataset(ctx, datasetId),
    referenceFile: (input) => referenced.referenceFile(ctx, input),
    listReferencedFiles: () => referenced.listReferencedFiles(ctx),

    recordRun: (input) => runs.recordRun(ctx, input),
    beginRun: (input) => runs.beginRun(ctx, input),
    finishRun: (runId, files) => runs.finishRun(ctx, runId, files),
    discardUnfinishedRun: (runId) => runs.discardUnfinishedRun(ctx, runId),
    getRun: (runId) => runs.getRun(ctx, runId),
    loadRunUnits: (runId) => runs.loadRunUnits(ctx, runId),
    listRuns: (studyId) => runs.listRuns(ctx, studyId),

    checkIntegrity: () => integrityProblems(ctx),
    close: () => {
      if (!open) return;
      open = false;
      db.close();
    },
  });
}
