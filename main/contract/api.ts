// The one typed API surface (main/api.ts implements it). The CLI calls it in-process, browser
// mode over HTTP, Electron over IPC. Types only.

import type { Results } from './results.ts';
import type { BoundaryMapSpec, ChartSpec } from '../report/charts/spec.ts';
import type { StudySettings } from './study.ts';
import type { Problem } from '../rules/types.ts';

export type OutputFormat = 'pdf' | 'html' | 'docx' | 'xlsx';
export const OUTPUT_FORMATS: readonly OutputFormat[] = ['pdf', 'html', 'docx', 'xlsx'];

export interface ProgressEvent { stage: string; done: number; total: number }

/** An answer, or why there is none: the input is wrong (problems say where), or the work was cancelled. */
export type ApiResult<T> =
  | { ok: true; value: T }
  | { ok: false; error: { kind: 'input' | 'cancelled'; problems: Problem[] } };

export interface SettingsOverrides extends Partial<Pick<StudySettings, 'deltas' | 'draws' | 'seed'>> {}

export interface CheckArgs { studyPath: string }
export interface CheckReport {
  title: string;
  dataFile: string;
  sheet: string | null;
  rowsRead: number;
  rowsUsed: number;
  rowsExcluded: Array<{ reason: string; count: number; rows: number[] }>;
  outcomesMissing: Array<{ column: string; count: number }>;
  fidelity: Results['fidelity'];
  eligible: number;
  notes: Array<{ code: string; message: string }>;
  ruleWording: string;
}

export interface EvaluateArgs {
  studyPath: string;
  outDir: string;
  overrides?: SettingsOverrides;
  /** Memo formats to write besides results.json and units.csv; [] = none. */
  formats?: OutputFormat[];
  workspacePath?: string;
  workers?: number;
}
export interface EvaluateReport {
  outDir: string;
  files: string[];
  results: Results;
  runId: number | null;
  /** Content hash of the study as run (study.fingerprint of the open study differs once it changes). */
  studySha256: string;
  timings: Record<string, number>;
}

export interface DemoArgs { outDir: string; formats?: OutputFormat[]; workers?: number }

export interface ApiMethods extends AppApiMethods {
  'study.check': { args: CheckArgs; result: CheckReport };
  'study.evaluate': { args: EvaluateArgs; result: EvaluateReport };
  'demo.run': { args: DemoArgs; result: EvaluateReport };
}
export type ApiMethod = keyof ApiMethods;
export const API_METHODS: readonly ApiMethod[] = [
  'study.check', 'study.evaluate', 'demo.run',
  'program.check', 'program.tryUnit', 'study.open', 'study.save', 'samples.list', 'data.preview', 'data.check',
  'workspace.info', 'workspace.recent', 'workspace.run', 'files.list', 'dialog.openFile', 'dialog.saveFile', 'memo.preview',
  'figure.map', 'figure.edge', 'study.fingerprint', 'run.exportMemo', 'session.save', 'session.load',
];

// ---- The desktop app's methods (issue 6) ------------------------------------------------------
// The renderer works on study and program objects that are not saved yet, so these take values
// (a program, a study) as well as paths. Arguments are untrusted: main/api.ts checks each shape.

/** Where an app call runs: browser mode (serve.ts) or the Electron shell. */
export type AppHost = 'browser' | 'electron' | 'cli';

export interface CriterionInfo {
  /** JSON path of the criterion, e.g. `program.rule.all[0]`. */
  path: string;
  description: string;
  /** Keys of the variables the criterion reads. */
  variables: string[];
}

export interface ProgramCheckArgs { program: unknown }
/** A program checked as the analyst edits it: problems are an answer, not an error. */
export interface ProgramCheck {
  valid: boolean;
  /** Every problem, each with the JSON path of the field it is about (`program.…`). */
  problems: Problem[];
  /** The whole rule in plain language (null while the program has problems). */
  reading: string | null;
  offerReading: string | null;
  /** One entry per comparison or membership test, in the order they appear. */
  criteria: CriterionInfo[];
}

export interface TryUnitArgs {
  program: unknown;
  /** Values typed by the analyst, by variable key: numbers, or text such as "21,000" or a value's label. */
  values: Record<string, unknown>;
}
export interface TryUnitCriterion extends CriterionInfo {
  /** null when a value it needs is missing or the limit has no entry for this unit. */
  holds: boolean | null;
  /** For a comparison: the value compared and the limit it was compared with. */
  value: number | null;
  limit: number | null;
}
export interface TryUnitReport {
  /** 'unknown' when missing values leave the verdict open. */
  verdict: 'eligible' | 'not eligible' | 'unknown';
  /** Probability of an offer for this unit (null when the verdict is unknown). */
  offerProbability: number | null;
  /** One sentence for the analyst. */
  sentence: string;
  criteria: TryUnitCriterion[];
  /** Problems with the typed values, each at `values.<key>`. */
  problems: Problem[];
}

export interface StudyOpenArgs { path: string }
export interface StudyOpened {
  /** Absolute path of the study file. */
  path: string;
  /** Folder that relative paths in the study were resolved against. */
  baseDir: string;
  /** The study (its data paths relative to `baseDir` as written): validated, with defaults, when `problems` is empty; else as written. */
  study: unknown;
  problems: Problem[];
}

export interface StudySaveArgs {
  path: string;
  study: unknown;
  /** Folder the study's relative data paths are relative to now (they are rewritten for the new file's folder). */
  baseDir?: string;
}
export interface StudySaved { path: string }

export interface SampleInfo { id: string; title: string; description: string; studyPath: string }
export interface SamplesList { samples: SampleInfo[] }

export interface DataPreviewArgs {
  path: string;
  sheet?: string;
  /** Spreadsheet row of the column names; found automatically when absent. */
  headerRow?: number;
  /** The program being studied, so its variables can be matched to columns. */
  program?: unknown;
}
export type ColumnRole =
  | 'id' | 'variable' | 'outcome' | 'treatment' | 'decision' | 'cluster' | 'covariate' | 'control' | 'ignore';
export interface PreviewColumn {
  name: string;
  letter: string;
  /** What the cells hold: numbers, text, both, or nothing. */
  holds: 'numbers' | 'text' | 'mixed' | 'empty';
  /** Blank cells among the data rows. */
  blanks: number;
  /** Distinct values among the first 1,000 data rows (capped at 1,000). */
  distinct: number;
  suggestion: { role: ColumnRole; variable?: string; why: string } | null;
}
export interface DataPreview {
  path: string;
  fileName: string;
  format: 'xlsx' | 'csv';
  sheets: string[];
  sheet: string | null;
  headerRow: number;
  rowCount: number;
  columns: PreviewColumn[];
  /** The first 20 data rows as shown text, with their spreadsheet row numbers. */
  rows: Array<{ row: number; cells: string[] }>;
  notes: Array<{ code: string; message: string }>;
}

export interface DataCheckArgs {
  /** A study object not yet saved (paths absolute, or relative to `baseDir`). */
  study: unknown;
  baseDir?: string;
}

export interface WorkspaceInfo {
  host: AppHost;
  /** Folder of the workspace (studies the app saves, runs, the workspace file). */
  dir: string;
  workspacePath: string;
  runsDir: string;
  studiesDir: string;
  /** Memo formats study.evaluate can write in this version. */
  memoFormats: OutputFormat[];
  /** True when the host has native open and save dialogs (Electron). */
  dialogs: boolean;
}

export interface RecentStudy { path: string; title: string; openedAt: string }
export interface RecentRun { runId: number; studyName: string; finishedAt: string; status: 'writing' | 'complete' }
export interface WorkspaceRecent { studies: RecentStudy[]; runs: RecentRun[] }

export interface WorkspaceRunArgs { runId: number }
export interface WorkspaceRun {
  runId: number;
  studyName: string;
  finishedAt: string;
  study: unknown;
  results: Results;
  /** 'writing': the run was interrupted while its files were written (they may be missing). */
  status: 'writing' | 'complete';
  /** Content hash of the study as run (compare with study.fingerprint of the open study: out of date when they differ). */
  studySha256: string;
  outDir: string;
  files: string[];
  /** Whether the run's per-unit columns are stored (its map and memo can be drawn without running again). */
  hasUnits: boolean;
}

export interface StudyFingerprintArgs { study: unknown; baseDir?: string }
/** The content hash of a study being edited (null while it is not a valid study). */
export interface StudyFingerprint { sha256: string | null }

export interface SessionSaveArgs { state: unknown }
export interface SessionSaved { savedAt: string }
/** The app's state as last saved in this workspace (null: none), handed back as it was given. */
export interface SessionLoaded { state: unknown; savedAt: string | null }

export interface EdgeFiguresArgs { runId: number }
/** Take-up and outcomes against the distance to the rule's edge, and the density around each limit, of a stored run (binned; small cells hidden). */
export interface EdgeFigures { figures: Array<{ id: string; spec: ChartSpec; caption: string; alt: string }> }

export interface RunExportMemoArgs { runId: number; outDir: string; formats: OutputFormat[] }
export interface RunExportedMemo { outDir: string; files: string[] }

export interface FilesListArgs {
  dir: string;
  /** Which files to list besides folders. */
  kind: 'study' | 'data';
}
export interface FilesList {
  dir: string;
  parent: string | null;
  entries: Array<{ name: string; path: string; isFolder: boolean }>;
}

export interface DialogArgs { purpose: 'study' | 'data'; defaultPath?: string }
export interface DialogAnswer { path: string | null }

export interface MemoPreviewArgs { path: string }
export interface MemoPreview { path: string; html: string }

export interface MapArgs {
  /** The stored run to draw (workspace.run); nothing is run again. */
  runId: number;
  /** Continuous input keys across (x) and up (y); default: the pair with most units near the edge. */
  axes?: { x: string; y: string };
  /** One of the study's deltas; default: the headline delta. */
  delta?: number;
  /** Codes of discrete inputs to draw; an input left out takes its most common value near the edge. */
  cell?: Array<{ key: string; value: number }>;
  /** 'binned' (default; as in the memo) or 'units' (the analyst's private view: each unit a point; never in the memo or exports). */
  view?: 'binned' | 'units';
}
/** A value a discrete input takes, with the units near the edge at the delta drawn (null: too few to show). */
export interface MapCellValue { value: number; label: string; nearEdge: number | null }
/** The boundary-region map (main/report/boundary-map.ts) and what the Map screen's pickers offer. */
export interface MapFigure {
  spec: BoundaryMapSpec | null;
  /** Why there is no map, or what is held fixed (and, in the units view, how many units are drawn). */
  note: string | null;
  deltas: number[];
  headlineDelta: number;
  /** What was drawn, with every default filled in (axes null when there is no map). */
  drawn: { axes: { x: string; y: string } | null; delta: number; cell: Array<{ key: string; value: number }>; view: 'binned' | 'units' };
  continuous: Array<{ key: string; label: string; unit?: string }>;
  discrete: Array<{ key: string; label: string; values: MapCellValue[] }>;
}

export interface AppApiMethods {
  'program.check': { args: ProgramCheckArgs; result: ProgramCheck };
  'program.tryUnit': { args: TryUnitArgs; result: TryUnitReport };
  'study.open': { args: StudyOpenArgs; result: StudyOpened };
  'study.save': { args: StudySaveArgs; result: StudySaved };
  'samples.list': { args: Record<string, never>; result: SamplesList };
  'data.preview': { args: DataPreviewArgs; result: DataPreview };
  'data.check': { args: DataCheckArgs; result: CheckReport };
  'workspace.info': { args: Record<string, never>; result: WorkspaceInfo };
  'workspace.recent': { args: Record<string, never>; result: WorkspaceRecent };
  'workspace.run': { args: WorkspaceRunArgs; result: WorkspaceRun };
  'files.list': { args: FilesListArgs; result: FilesList };
  'dialog.openFile': { args: DialogArgs; result: DialogAnswer };
  'dialog.saveFile': { args: DialogArgs; result: DialogAnswer };
  'memo.preview': { args: MemoPreviewArgs; result: MemoPreview };
  'figure.map': { args: MapArgs; result: MapFigure };
  'figure.edge': { args: EdgeFiguresArgs; result: EdgeFigures };
  'study.fingerprint': { args: StudyFingerprintArgs; result: StudyFingerprint };
  'run.exportMemo': { args: RunExportMemoArgs; result: RunExportedMemo };
  'session.save': { args: SessionSaveArgs; result: SessionSaved };
  'session.load': { args: Record<string, never>; result: SessionLoaded };
}

// Files the user hands over (project rule: the renderer never names an arbitrary path). In browser
// mode the page posts the bytes of a file the user picked or dropped to UPLOAD_ENDPOINT (raw body,
// the launch token header as for every call, the original name URI-encoded in UPLOAD_NAME_HEADER);
// the host stores them in the workspace's uploads folder, adds the stored path to the session's
// allow-list and answers `ApiResult<UploadedFile>` (413 with a plain message beyond
// UPLOAD_MAX_BYTES). In Electron the native open dialog adds the picked path the same way.
export const UPLOAD_ENDPOINT = '/api/upload';
export const UPLOAD_NAME_HEADER = 'X-Fenceline-File-Name';
export const UPLOAD_MAX_BYTES = 512 * 1024 * 1024;

export interface UploadedFile {
  /** Where the host keeps the file (inside the workspace); use it as the study's data path. */
  path: string;
  /** The file's own name as the user picked it. */
  name: string;
  bytes: number;
  sha256: string;
}
