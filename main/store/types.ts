// Public shapes of the workspace file (main/store): what goes in and what comes back out.
// Types only; behaviour lives in the repository modules.

import type { Checked } from '../rules/types.ts';

export type { Checked, Problem } from '../rules/types.ts';

export interface OpenOptions {
  /** Open without writing anything; refuses files that would need a schema upgrade. */
  readonly?: boolean;
  /** Recorded in the `meta` table as the version that last wrote the file (default: package.json). */
  softwareVersion?: string;
  /** Source of "now" for saved-at stamps; tests pass a fixed clock. */
  now?: () => Date;
}

// ---- Programs and studies (versioned JSON documents) ---------------------------------------

export interface SaveProgramInput {
  /** Omit to create a new program; give an existing id to add a version to it. */
  programId?: number;
  name: string;
  program: unknown;
}

export interface SaveStudyInput {
  /** Omit to create a new study; give an existing id to add a version to it. */
  studyId?: number;
  name: string;
  study: unknown;
}

export interface SavedProgramVersion { programId: number; version: number }
export interface SavedStudyVersion { studyId: number; version: number }

export interface ProgramSummary { programId: number; name: string; latestVersion: number; createdAt: string; updatedAt: string }
export interface StudySummary { studyId: number; name: string; latestVersion: number; createdAt: string; updatedAt: string }

/** One entry of a document's history: the name it carried and when that version was saved. */
export interface VersionEntry { version: number; name: string; savedAt: string }

export interface StoredProgram { programId: number; version: number; name: string; savedAt: string; program: unknown }
export interface StoredStudy { studyId: number; version: number; name: string; savedAt: string; study: unknown }

// ---- Datasets ---------------------------------------------------------------------------

export type ColumnKind = 'f64' | 'i32' | 'text';

export type DatasetColumn =
  | { name: string; kind: 'f64'; values: Float64Array }
  | { name: string; kind: 'i32'; values: Int32Array }
  | { name: string; kind: 'text'; values: string[] };

/** Loose input form: the kind and the values' type are checked against each other at run time. */
export interface DatasetColumnInput {
  name: string;
  kind: ColumnKind;
  values: Float64Array | Int32Array | string[];
}

export interface DatasetInput {
  /** File name the data came from (as the analyst knows it). */
  sourceName: string;
  sheet: string | null;
  /** SHA-256 of the source file, 64 hexadecimal digits. */
  sha256: string;
  /** ISO 8601 time of the import. */
  importedAt: string;
  /** Row number of each unit in the source file (one per unit). */
  rowNumbers: Int32Array;
  columns: DatasetColumnInput[];
  /** Any JSON document (validation report, column mapping...). */
  notes?: unknown;
}

export interface StoredDataset {
  datasetId: number;
  sourceName: string;
  sheet: string | null;
  sha256: string;
  importedAt: string;
  rowNumbers: Int32Array;
  columns: DatasetColumn[];
  notes?: unknown;
}

export interface DatasetSummary {
  datasetId: number;
  sourceName: string;
  sheet: string | null;
  sha256: string;
  importedAt: string;
  storedAt: string;
  rowCount: number;
  columns: Array<{ name: string; kind: ColumnKind }>;
}

/** Progress of a long write: `done` of `total` column chunks written. */
export interface StoreProgress { stage: 'store'; done: number; total: number }

export interface ImportOptions {
  onProgress?: (p: StoreProgress) => void;
  /** 'source' (default): a file the analyst imported; 'run-units': a run's per-unit columns. */
  role?: 'source' | 'run-units';
}

// ---- Runs -------------------------------------------------------------------------------

export interface RunInput {
  studyId: number;
  studyVersion: number;
  /** The study exactly as it was run (may differ from the saved version, e.g. edited settings). */
  studyJson: unknown;
  settings: unknown;
  seed: number;
  softwareVersion: string;
  dataSha256: string;
  results: unknown;
  /** Seconds (or any unit the caller documents) per stage name. */
  timings: Record<string, number>;
  startedAt: string;
  finishedAt: string;
}

export interface RunSummary {
  runId: number;
  /** 'writing': recorded, files not all written yet (a run left so was interrupted); 'complete'. */
  status: 'writing' | 'complete';
  studyId: number;
  studyVersion: number;
  seed: number;
  softwareVersion: string;
  dataSha256: string;
  startedAt: string;
  finishedAt: string;
  recordedAt: string;
}

export interface StoredRun extends RunSummary {
  studyJson: unknown;
  settings: unknown;
  results: unknown;
  timings: Record<string, number>;
  /** SHA-256 of the study as run (its content, paths resolved); '' for runs recorded before schema 4. */
  studySha256: string;
  /** SHA-256 of each data file read, by the path the study names. */
  dataHashes: Record<string, string>;
  /** Folder the run's files were written to, and their paths ('' and [] when none). */
  outDir: string;
  files: string[];
  /** Whether the run's per-unit columns are stored (figures and exports need them). */
  hasUnits: boolean;
}

/** A run recorded before its files are written (status 'writing'), with its per-unit columns. */
export interface BeginRunInput extends RunInput {
  studySha256: string;
  dataHashes: Record<string, string>;
  outDir: string;
  /** The run's per-unit columns, stored with the existing column codec (one value per unit). */
  units: { rowNumbers: Int32Array; columns: DatasetColumnInput[] };
}

// ---- The workspace ----------------------------------------------------------------------

export interface Workspace {
  /** Absolute path of the workspace file. */
  readonly path: string;
  readonly readonly: boolean;
  /** Schema version of the file after opening (always SCHEMA_VERSION). */
  readonly schemaVersion: number;

  saveProgram(input: SaveProgramInput): Checked<SavedProgramVersion>;
  getProgram(programId: number, version?: number): Checked<StoredProgram>;
  listPrograms(): Checked<ProgramSummary[]>;
  programHistory(programId: number): Checked<VersionEntry[]>;

  saveStudy(input: SaveStudyInput): Checked<SavedStudyVersion>;
  getStudy(studyId: number, version?: number): Checked<StoredStudy>;
  listStudies(): Checked<StudySummary[]>;
  studyHistory(studyId: number): Checked<VersionEntry[]>;

  importDataset(meta: DatasetInput, opts?: ImportOptions): Checked<number>;
  /** Record a data file that stays where it is (a streamed file): its path and hash; the id of its record (the same for the same path and hash). */
  referenceFile(input: ReferencedFileInput): Checked<number>;
  listReferencedFiles(): Checked<ReferencedFile[]>;
  loadDataset(datasetId: number): Checked<StoredDataset>;
  listDatasets(): Checked<DatasetSummary[]>;
  deleteDataset(datasetId: number): Checked<void>;

  recordRun(input: RunInput): Checked<number>;
  /** Record a run as 'writing' with its per-unit columns, in one transaction; then write its files, then finishRun. */
  beginRun(input: BeginRunInput): Checked<number>;
  /** Mark a 'writing' run complete with the files written. */
  finishRun(runId: number, files: string[]): Checked<void>;
  /** Remove a run that never finished (its files could not be written), with its per-unit columns. */
  discardUnfinishedRun(runId: number): Checked<void>;
  getRun(runId: number): Checked<StoredRun>;
  /** The run's per-unit columns (problems when the run has none stored). */
  loadRunUnits(runId: number): Checked<StoredDataset>;
  listRuns(studyId?: number): Checked<RunSummary[]>;

  /** SQLite's full integrity check; problems name what is damaged. Slow on big files. */
  checkIntegrity(): Checked<void>;
  close(): void;
}

/** A data file known by its path and SHA-256, never copied into the workspace (schema 5). */
export interface ReferencedFileInput {
  /** Absolute path of the file. */
  path: string;
  sha256: string;
  bytes: number;
  rows: number;
  format: 'parquet' | 'csv';
}

export interface ReferencedFile extends ReferencedFileInput {
  id: number;
  recordedAt: string;
}
