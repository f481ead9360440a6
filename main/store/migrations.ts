// The workspace schema as an ordered list of steps. Step N turns a schema-(N-1) file into a
// schema-N file; the file's schema version lives in SQLite's `user_version` header field
// (https://www.sqlite.org/pragma.html#pragma_user_version) and changes in the same transaction
// as the step, so a step is applied entirely or not at all. Never edit a released step: add one.

import type Database from 'better-sqlite3';

/** Marks the file as a Fenceline workspace (SQLite header field `application_id`): "Fenc". */
export const APPLICATION_ID = 0x46656e63;

export interface Migration {
  version: number;
  description: string;
  sql: string;
}

export const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    description: 'meta, programs and studies with their version history',
    sql: `
      CREATE TABLE meta (
        key   TEXT PRIMARY KEY,
        value TEXT NOT NULL
      ) STRICT;

      CREATE TABLE programs (
        id         INTEGER PRIMARY KEY,
        name       TEXT NOT NULL,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL
      ) STRICT;

      CREATE TABLE program_versions (
        program_id INTEGER NOT NULL REFERENCES programs(id) ON DELETE CASCADE,
        version    INTEGER NOT NULL CHECK (version >= 1),
        name       TEXT NOT NULL,
        saved_at   TEXT NOT NULL,
        document   TEXT NOT NULL CHECK (json_valid(document)),
        PRIMARY KEY (program_id, version)
      ) STRICT;

      CREATE TABLE studies (
        id         INTEGER PRIMARY KEY,
        name       TEXT NOT NULL,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL
      ) STRICT;

      CREATE TABLE study_versions (
        study_id INTEGER NOT NULL REFERENCES studies(id) ON DELETE CASCADE,
        version  INTEGER NOT NULL CHECK (version >= 1),
        name     TEXT NOT NULL,
        saved_at TEXT NOT NULL,
        document TEXT NOT NULL CHECK (json_valid(document)),
        PRIMARY KEY (study_id, version)
      ) STRICT;
    `,
  },
  {
    version: 2,
    description: 'datasets stored as column chunks',
    sql: `
      -- A dataset is listed only once complete = 1, set in the transaction that wrote its last chunk.
      CREATE TABLE datasets (
        id          INTEGER PRIMARY KEY,
        source_name TEXT NOT NULL,
        sheet       TEXT,
        sha256      TEXT NOT NULL,
        imported_at TEXT NOT NULL,
        stored_at   TEXT NOT NULL,
        row_count   INTEGER NOT NULL CHECK (row_count >= 0),
        chunk_rows  INTEGER NOT NULL CHECK (chunk_rows > 0),
        notes       TEXT CHECK (notes IS NULL OR json_valid(notes)),
        complete    INTEGER NOT NULL DEFAULT 0 CHECK (complete IN (0, 1))
      ) STRICT;

      CREATE TABLE dataset_columns (
        dataset_id INTEGER NOT NULL REFERENCES datasets(id) ON DELETE CASCADE,
        position   INTEGER NOT NULL CHECK (position >= 0),
        name       TEXT NOT NULL,
        kind       TEXT NOT NULL CHECK (kind IN ('f64', 'i32', 'text')),
        PRIMARY KEY (dataset_id, position),
        UNIQUE (dataset_id, name)
      ) STRICT;

      -- series -1 holds the source row numbers (i32); series k >= 0 holds column k.
      CREATE TABLE dataset_chunks (
        dataset_id INTEGER NOT NULL REFERENCES datasets(id) ON DELETE CASCADE,
        series     INTEGER NOT NULL CHECK (series >= -1),
        chunk      INTEGER NOT NULL CHECK (chunk >= 0),
        data       BLOB NOT NULL,
        PRIMARY KEY (dataset_id, series, chunk)
      ) STRICT;
    `,
  },
  {
    version: 3,
    description: 'runs: what was run, on which data, with which software, and the results',
    sql: `
      CREATE TABLE runs (
        id               INTEGER PRIMARY KEY,
        study_id         INTEGER NOT NULL,
        study_version    INTEGER NOT NULL,
        study_json       TEXT NOT NULL CHECK (json_valid(study_json)),
        settings         TEXT NOT NULL CHECK (json_valid(settings)),
        seed             INTEGER NOT NULL,
        software_version TEXT NOT NULL,
        data_sha256      TEXT NOT NULL,
        results          TEXT NOT NULL CHECK (json_valid(results)),
        timings          TEXT NOT NULL CHECK (json_valid(timings)),
        started_at       TEXT NOT NULL,
        finished_at      TEXT NOT NULL,
        recorded_at      TEXT NOT NULL,
        FOREIGN KEY (study_id, study_version) REFERENCES study_versions(study_id, version)
      ) STRICT;

      CREATE INDEX runs_by_study ON runs(study_id, id);
    `,
  },
  {
    version: 4,
    description: 'stored runs: status (writing, complete), content hashes, output files, per-unit columns; immutable once complete',
    sql: `
      -- 'source': a file the analyst imported; 'run-units': the per-unit columns of one run.
      ALTER TABLE datasets ADD COLUMN role TEXT NOT NULL DEFAULT 'source' CHECK (role IN ('source', 'run-units'));

      -- A run is recorded as 'writing' before its files are written and marked 'complete' after,
      -- so a kill in between leaves a run that says it is incomplete (never files with no run).
      ALTER TABLE runs ADD COLUMN status TEXT NOT NULL DEFAULT 'complete' CHECK (status IN ('writing', 'complete'));
      ALTER TABLE runs ADD COLUMN study_sha256 TEXT NOT NULL DEFAULT '';
      ALTER TABLE runs ADD COLUMN data_hashes TEXT NOT NULL DEFAULT '{}' CHECK (json_valid(data_hashes));
      ALTER TABLE runs ADD COLUMN out_dir TEXT NOT NULL DEFAULT '';
      ALTER TABLE runs ADD COLUMN files TEXT NOT NULL DEFAULT '[]' CHECK (json_valid(files));
      ALTER TABLE runs ADD COLUMN units_dataset_id INTEGER REFERENCES datasets(id);

      -- A finished run never changes; an unfinished one may only be finished (status and files).
      CREATE TRIGGER runs_complete_is_final BEFORE UPDATE ON runs WHEN OLD.status = 'complete'
      BEGIN SELECT RAISE(ABORT, 'a finished run cannot be changed'); END;
      CREATE TRIGGER runs_writing_finishes_only BEFORE UPDATE OF id, study_id, study_version, study_json, settings, seed,
        software_version, data_sha256, results, timings, started_at, finished_at, recorded_at, study_sha256, data_hashes,
        out_dir, units_dataset_id ON runs WHEN OLD.status = 'writing'
      BEGIN SELECT RAISE(ABORT, 'a run can only be marked finished'); END;
      CREATE TRIGGER runs_complete_kept BEFORE DELETE ON runs WHEN OLD.status = 'complete'
      BEGIN SELECT RAISE(ABORT, 'a finished run cannot be deleted'); END;
      CREATE TRIGGER run_units_kept BEFORE DELETE ON datasets
        WHEN EXISTS (SELECT 1 FROM runs WHERE units_dataset_id = OLD.id)
      BEGIN SELECT RAISE(ABORT, 'the per-unit columns of a run cannot be deleted'); END;
    `,
  },
  {
    version: 5,
    description: 'referenced files: a data file beyond one sheet (Parquet, large CSV) known by its path and SHA-256, never copied in',
    sql: `
      CREATE TABLE referenced_files (
        id          INTEGER PRIMARY KEY,
        path        TEXT NOT NULL CHECK (path <> ''),
        sha256      TEXT NOT NULL CHECK (length(sha256) = 64),
        bytes       INTEGER NOT NULL CHECK (bytes >= 0),
        rows        INTEGER NOT NULL CHECK (rows >= 0),
        format      TEXT NOT NULL CHECK (format IN ('parquet', 'csv')),
        recorded_at TEXT NOT NULL,
        UNIQUE (path, sha256)
      );
    `,
  },
];

/** The newest schema this version of Fenceline reads and writes. */
export const SCHEMA_VERSION: number = MIGRATIONS[MIGRATIONS.length - 1]!.version;

export function readSchemaVersion(db: Database.Database): number {
  return db.pragma('user_version', { simple: true }) as number;
}

/**
 * Apply the steps after the file's current version, up to `target`, one transaction per step.
 * Each step re-reads the version under the write lock, so two processes opening the same new
 * file do not both apply it.
 */
export function applyMigrations(db: Database.Database, target: number = SCHEMA_VERSION): void {
  for (const step of MIGRATIONS) {
    if (step.version > target) break;
    db.transaction(() => {
      if (readSchemaVersion(db) >= step.version) return;
      db.exec(step.sql);
      if (step.version === 1) db.pragma(`application_id = ${APPLICATION_ID}`);
      db.pragma(`user_version = ${step.version}`);
    }).immediate();
  }
}
