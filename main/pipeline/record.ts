// Writing one run: its files (results.json, units.csv, the memo) and its record in the workspace.
//
// Order (so that no kill leaves results on disk with no run, and no run claims files it lacks):
//   1. everything is computed and rendered in memory (a cancel here writes nothing);
//   2. the run is recorded as 'writing', with the study as run, its fingerprint, the data hashes
//      and the per-unit columns, in one transaction;
//   3. the files are written under temporary names and renamed together (output/write-files.ts);
//   4. the run is marked 'complete' with the list of files.
// A kill between 2 and 4 leaves a run that says it is incomplete; a refused write removes the
// unfinished record. A run, once complete, never changes (store/migrations.ts, schema 4).

import type { OutputFormat, ProgressEvent } from '../contract/api.ts';
import type { Results } from '../contract/results.ts';
import type { Study } from '../contract/study.ts';
import type { RawTable } from '../data/types.ts';
import { Cancelled } from '../design/propensity.ts';
import { unitsCsv } from '../output/units-csv.ts';
import { writeOutputFiles, type OutputFile } from '../output/write-files.ts';
import { figureData } from '../report/figure-data.ts';
import { memoFiles } from '../report/memo-files.ts';
import type { RunView } from '../report/run-view.ts';
import type { Checked, Problem } from '../rules/types.ts';
import { SOFTWARE_VERSION } from '../store/software-version.ts';
import type { DatasetColumnInput, Workspace } from '../store/types.ts';
import { openWorkspace } from '../store/workspace.ts';
import type { StudyRun } from './run-study.ts';
import { runUnitColumns, runViewFromStored } from './stored-run.ts';

export interface WriteRunOptions {
  outDir: string;
  formats: readonly OutputFormat[];
  /** Record the run in this workspace file (the app always does; the CLI when asked). */
  workspacePath?: string;
  startedAt: string;
  onProgress?: (p: ProgressEvent) => void;
  signal?: AbortSignal;
  /** Last check of the files' names before anything is written (e.g. that no input would be replaced). */
  beforeWrite?: (names: string[]) => Problem[];
}

export interface WrittenRun { files: string[]; runId: number | null }

/** The run's files, all rendered in memory (nothing is written here). */
export async function runFiles(view: RunView, units: { ids: string[]; z: Float64Array; d: Float64Array | null; aps: Float64Array[] }, opts: Pick<WriteRunOptions, 'formats' | 'startedAt' | 'onProgress' | 'signal'>): Promise<OutputFile[]> {
  const results = view.results;
  const files: OutputFile[] = [
    { name: 'results.json', content: JSON.stringify(results, null, 2) + '\n' },
    { name: 'units.csv', content: unitsCsv({ ids: units.ids, z: units.z, d: units.d, deltas: results.settings.deltas, aps: units.aps }) },
  ];
  if (opts.formats.length) files.push(...await memoFiles(results, figureData(view), opts.formats, memoOptions(opts)));
  if (opts.signal?.aborted) throw new Cancelled();
  return files;
}

function memoOptions(opts: Pick<WriteRunOptions, 'startedAt' | 'onProgress' | 'signal'>) {
  return { createdAt: opts.startedAt, ...(opts.onProgress ? { onProgress: opts.onProgress } : {}), ...(opts.signal ? { signal: opts.signal } : {}) };
}

function datasetColumns(table: RawTable): DatasetColumnInput[] {
  return table.columns.map((c) =>
    c.texts
      ? { name: c.name, kind: 'text' as const, values: Array.from({ length: table.rowCount }, (_, r) => c.texts![r] ?? (Number.isNaN(c.numbers[r]!) ? '' : String(c.numbers[r]))) }
      : { name: c.name, kind: 'f64' as const, values: c.numbers },
  );
}

/** The study's saved version: the latest one when it is the same study, else a new version. */
function studyVersion(ws: Workspace, study: Study): Checked<{ studyId: number; version: number }> {
  const existing = ws.listStudies();
  if (!existing.ok) return existing;
  const prior = existing.value.find((s) => s.name === study.title);
  if (prior) {
    const latest = ws.getStudy(prior.studyId);
    if (latest.ok && JSON.stringify(latest.value.study) === JSON.stringify(study)) return { ok: true, value: { studyId: prior.studyId, version: latest.value.version } };
  }
  return ws.saveStudy({ ...(prior ? { studyId: prior.studyId } : {}), name: study.title, study });
}

/** Steps 2–4 above; `writeFiles` is step 3. */
function recordAround(ws: Workspace, study: Study, studySha256: string, run: StudyRun, outDir: string, startedAt: string, writeFiles: () => Checked<string[]>): Checked<WrittenRun> {
  const saved = studyVersion(ws, study);
  if (!saved.ok) return saved;
  const datasets = ws.listDatasets();
  if (!datasets.ok) return datasets;
  if (!datasets.value.some((d) => d.sha256 === run.table.source.sha256 && d.sheet === run.table.source.sheet)) {
    const imported = ws.importDataset({
      sourceName: run.table.source.fileName,
      sheet: run.table.source.sheet,
      sha256: run.table.source.sha256,
      importedAt: startedAt,
      rowNumbers: run.table.rowNumbers,
      columns: datasetColumns(run.table),
      notes: { headerRow: run.table.headerRow, notes: run.table.notes },
    });
    if (!imported.ok) return imported;
  }
  const begun = ws.beginRun({
    studyId: saved.value.studyId,
    studyVersion: saved.value.version,
    studyJson: study,
    settings: study.settings,
    seed: study.settings.seed,
    softwareVersion: SOFTWARE_VERSION,
    dataSha256: run.results.study.dataSha256,
    results: run.results,
    timings: run.timings,
    startedAt,
    finishedAt: new Date().toISOString(),
    studySha256,
    dataHashes: run.dataHashes,
    outDir,
    units: runUnitColumns(run),
  });
  if (!begun.ok) return begun;
  let files: Checked<string[]>;
  try {
    files = writeFiles();
  } catch (e) {
    ws.discardUnfinishedRun(begun.value);
    throw e;
  }
  if (!files.ok) { ws.discardUnfinishedRun(begun.value); return files; }
  const finished = ws.finishRun(begun.value, files.value);
  if (!finished.ok) return finished;
  return { ok: true, value: { files: files.value, runId: begun.value } };
}

/** Render, record and write one run (see the order at the top). */
export async function writeRun(study: Study, studySha256: string, run: StudyRun, opts: WriteRunOptions): Promise<Checked<WrittenRun>> {
  const files = await runFiles(run, run.units, opts);
  const clash = opts.beforeWrite?.(files.map((f) => f.name)) ?? [];
  if (clash.length) return { ok: false, problems: clash };
  const writeFiles = () => writeOutputFiles(opts.outDir, files);
  if (!opts.workspacePath) {
    const written = writeFiles();
    return written.ok ? { ok: true, value: { files: written.value, runId: null } } : written;
  }
  const opened = openWorkspace(opts.workspacePath);
  if (!opened.ok) return opened;
  try {
    return recordAround(opened.value, study, studySha256, run, opts.outDir, opts.startedAt, writeFiles);
  } finally {
    opened.value.close();
  }
}

/** A stored run as the figures read it (no study is run again). */
export function openStoredRun(ws: Workspace, runId: number): Checked<{ view: RunView; studyJson: unknown; status: 'writing' | 'complete'; outDir: string; files: string[]; studySha256: string }> {
  const stored = ws.getRun(runId);
  if (!stored.ok) return stored;
  const units = ws.loadRunUnits(runId);
  if (!units.ok) return units;
  const view = runViewFromStored(stored.value.studyJson, stored.value.results as Results, units.value);
  if (!view.ok) return view;
  const s = stored.value;
  return { ok: true, value: { view: view.value, studyJson: s.studyJson, status: s.status, outDir: s.outDir, files: s.files, studySha256: s.studySha256 } };
}

/** Write a stored run's memo files again, into another folder (nothing is run again, no run is recorded). */
export async function exportStoredMemo(view: RunView, outDir: string, opts: Pick<WriteRunOptions, 'formats' | 'startedAt' | 'onProgress' | 'signal'>): Promise<Checked<string[]>> {
  const files = await memoFiles(view.results, figureData(view), opts.formats, memoOptions(opts));
  if (opts.signal?.aborted) throw new Cancelled();
  return writeOutputFiles(outDir, files);
}

/**
 * Record the data file a streamed run read (its path and SHA-256, never its bytes) in the
 * workspace; the run itself is not stored in this version (its results.json says so).
 */
export function referenceStreamedFile(workspacePath: string, file: { path: string; bytes: number; rows: number; format: 'parquet' | 'csv' }, sha256: string): Checked<number> {
  const opened = openWorkspace(workspacePath);
  if (!opened.ok) return opened;
  try {
    return opened.value.referenceFile({ path: file.path, sha256, bytes: file.bytes, rows: file.rows, format: file.format });
  } finally {
    opened.value.close();
  }
}
