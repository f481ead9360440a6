// Runs: everything needed to say later what was run, on which data, by which software, with
// which seed — and what came out. A run points at a saved study version (a foreign key), and
// also keeps the study exactly as run, since settings may have been changed for that run only.

import { read, write, type StoreContext } from './context.ts';
import { importDataset, loadDataset } from './datasets.ts';
import { decodeJson, encodeJson } from './json-column.ts';
import { fail, fileLabel, ok } from './problems.ts';
import type { BeginRunInput, Checked, Problem, RunInput, RunSummary, StoredDataset, StoredRun } from './types.ts';
import { checkSha256, checkText, checkTimestamp, isPositiveId, preview } from './validate.ts';

interface RunRow {
  id: number; study_id: number; study_version: number; study_json: string; settings: string; seed: number;
  software_version: string; data_sha256: string; results: string; timings: string;
  started_at: string; finished_at: string; recorded_at: string;
  status: 'writing' | 'complete'; study_sha256: string; data_hashes: string; out_dir: string; files: string;
  units_dataset_id: number | null;
}

const SUMMARY_COLUMNS = 'id, status, study_id, study_version, seed, software_version, data_sha256, started_at, finished_at, recorded_at';

type SummaryRow = Pick<RunRow, 'id' | 'status' | 'study_id' | 'study_version' | 'seed' | 'software_version' | 'data_sha256' | 'started_at' | 'finished_at' | 'recorded_at'>;

function toSummary(r: SummaryRow): RunSummary {
  return {
    runId: r.id, status: r.status, studyId: r.study_id, studyVersion: r.study_version, seed: r.seed, softwareVersion: r.software_version,
    dataSha256: r.data_sha256, startedAt: r.started_at, finishedAt: r.finished_at, recordedAt: r.recorded_at,
  };
}

function checkTimings(timings: unknown, problems: Problem[]): void {
  if (timings === null || typeof timings !== 'object' || Array.isArray(timings) || ArrayBuffer.isView(timings)) {
    problems.push({ path: 'timings', message: `The timings must be a table of stage names and durations (got ${preview(timings)}).` });
    return;
  }
  for (const [stage, t] of Object.entries(timings)) {
    if (typeof t !== 'number' || !Number.isFinite(t) || t < 0) {
      problems.push({ path: `timings.${stage}`, message: `The duration of stage "${stage}" must be a number of zero or more (got ${preview(t)}).` });
    }
  }
}

/** Check a run's fields and encode its JSON documents; problems name each bad field. */
function checkRunInput(input: RunInput): Checked<{ studyJson: string; settings: string; results: string; timings: string }> {
  const problems: Problem[] = [];
  const i = (input ?? {}) as unknown as Record<string, unknown>;
  if (!isPositiveId(i.studyId)) problems.push({ path: 'studyId', message: `studyId must be the whole-number id of a saved study (got ${preview(i.studyId)}); save the study before recording its run.` });
  if (!isPositiveId(i.studyVersion)) problems.push({ path: 'studyVersion', message: `studyVersion must be the whole-number version of the saved study that was run (got ${preview(i.studyVersion)}).` });
  if (typeof i.seed !== 'number' || !Number.isSafeInteger(i.seed)) {
    problems.push({ path: 'seed', message: `The seed must be a whole number (got ${preview(i.seed)}).` });
  }
  checkText(i.softwareVersion, 'softwareVersion', 'The software version', problems);
  checkSha256(i.dataSha256, 'dataSha256', "The data file's fingerprint", problems);
  checkTimestamp(i.startedAt, 'startedAt', 'The start time', problems);
  checkTimestamp(i.finishedAt, 'finishedAt', 'The finish time', problems);
  if (problems.length === 0 && Date.parse(i.finishedAt as string) < Date.parse(i.startedAt as string)) {
    problems.push({ path: 'finishedAt', message: `The run finished (${i.finishedAt as string}) before it started (${i.startedAt as string}); check the computer's clock and the times given.` });
  }
  checkTimings(i.timings, problems);
  const docs = {
    studyJson: encodeJson(i.studyJson, 'studyJson'),
    settings: encodeJson(i.settings, 'settings'),
    results: encodeJson(i.results, 'results'),
    timings: encodeJson(i.timings, 'timings'),
  };
  for (const d of Object.values(docs)) if (!d.ok) problems.push(...d.problems);
  if (problems.length > 0 || !docs.studyJson.ok || !docs.settings.ok || !docs.results.ok || !docs.timings.ok) {
    return { ok: false, problems };
  }
  return ok({ studyJson: docs.studyJson.value, settings: docs.settings.value, results: docs.results.value, timings: docs.timings.value });
}

interface RunExtras { status: 'writing' | 'complete'; studySha256: string; dataHashes: string; outDir: string; files: string; unitsDatasetId: number | null }

/** Insert the run row (inside a write transaction). */
function insertRun(ctx: StoreContext, input: RunInput, text: { studyJson: string; settings: string; results: string; timings: string }, extras: RunExtras): Checked<number> {
  const exists = ctx.db.prepare('SELECT 1 FROM study_versions WHERE study_id = ? AND version = ?').get(input.studyId, input.studyVersion);
  if (exists === undefined) {
    return fail(`The workspace ${fileLabel(ctx.file)} has no version ${input.studyVersion} of study ${input.studyId}; save the study first, then record its run.`, 'studyVersion');
  }
  const info = ctx.db.prepare(
    `INSERT INTO runs (study_id, study_version, study_json, settings, seed, software_version, data_sha256, results, timings, started_at, finished_at, recorded_at,
                       status, study_sha256, data_hashes, out_dir, files, units_dataset_id)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  ).run(
    input.studyId, input.studyVersion, text.studyJson, text.settings, input.seed, input.softwareVersion,
    input.dataSha256.toLowerCase(), text.results, text.timings, input.startedAt, input.finishedAt, ctx.now(),
    extras.status, extras.studySha256, extras.dataHashes, extras.outDir, extras.files, extras.unitsDatasetId,
  );
  return ok(Number(info.lastInsertRowid));
}

/** A finished run with no per-unit columns and no files (kept for callers that record results only). */
export function recordRun(ctx: StoreContext, input: RunInput): Checked<number> {
  const text = checkRunInput(input);
  if (!text.ok) return text;
  return write(ctx, 'record the run', () => insertRun(ctx, input, text.value, {
    status: 'complete', studySha256: '', dataHashes: '{}', outDir: '', files: '[]', unitsDatasetId: null,
  }));
}

/**
 * Record a run before its files are written: the row says 'writing', and the per-unit columns are
 * stored as a dataset of role 'run-units' in the same transaction (all or nothing).
 */
export function beginRun(ctx: StoreContext, input: BeginRunInput): Checked<number> {
  const text = checkRunInput(input);
  if (!text.ok) return text;
  const problems: Problem[] = [];
  checkSha256(input.studySha256, 'studySha256', "The study's fingerprint", problems);
  const hashes = encodeJson(input.dataHashes, 'dataHashes');
  if (!hashes.ok) problems.push(...hashes.problems);
  if (typeof input.outDir !== 'string') problems.push({ path: 'outDir', message: `The output folder must be text (got ${preview(input.outDir)}).` });
  if (problems.length || !hashes.ok) return { ok: false, problems };
  return write(ctx, 'record the run', () => {
    const units = importDataset(ctx, {
      sourceName: `units of the run of ${input.startedAt}`,
      sheet: null,
      sha256: input.studySha256,
      importedAt: input.startedAt,
      rowNumbers: input.units.rowNumbers,
      columns: input.units.columns,
    }, { role: 'run-units' });
    if (!units.ok) return units;
    return insertRun(ctx, input, text.value, {
      status: 'writing', studySha256: input.studySha256.toLowerCase(), dataHashes: hashes.value, outDir: input.outDir, files: '[]', unitsDatasetId: units.value,
    });
  });
}

export function finishRun(ctx: StoreContext, runId: unknown, files: string[]): Checked<void> {
  if (!isPositiveId(runId)) return fail(`There is no run with id ${preview(runId)} to finish.`, 'runId');
  const list = encodeJson(files, 'files');
  if (!list.ok) return list;
  return write(ctx, 'mark the run finished', () => {
    const changed = ctx.db.prepare("UPDATE runs SET status = 'complete', files = ? WHERE id = ? AND status = 'writing'").run(list.value, runId).changes;
    if (changed === 0) return fail(`Run ${preview(runId)} is not waiting to be finished in the workspace ${fileLabel(ctx.file)}.`, 'runId');
    return ok(undefined);
  });
}

export function discardUnfinishedRun(ctx: StoreContext, runId: unknown): Checked<void> {
  if (!isPositiveId(runId)) return fail(`There is no run with id ${preview(runId)} to remove.`, 'runId');
  return write(ctx, 'remove the unfinished run', () => {
    const row = ctx.db.prepare("SELECT units_dataset_id FROM runs WHERE id = ? AND status = 'writing'").get(runId) as { units_dataset_id: number | null } | undefined;
    if (row === undefined) return fail(`Run ${preview(runId)} is finished or absent; a finished run is never removed.`, 'runId');
    ctx.db.prepare('DELETE FROM runs WHERE id = ?').run(runId);
    if (row.units_dataset_id !== null) ctx.db.prepare('DELETE FROM datasets WHERE id = ?').run(row.units_dataset_id);
    return ok(undefined);
  });
}

export function loadRunUnits(ctx: StoreContext, runId: unknown): Checked<StoredDataset> {
  const missing = <T>(): Checked<T> => fail(`Run ${preview(runId)} has no per-unit columns in the workspace ${fileLabel(ctx.file)} (it was recorded by an older version, or it is not there). Run the study again to draw its figures.`, 'runId');
  if (!isPositiveId(runId)) return missing();
  const found = read<number>(ctx, 'open the run', () => {
    const r = ctx.db.prepare('SELECT units_dataset_id FROM runs WHERE id = ?').get(runId) as { units_dataset_id: number | null } | undefined;
    return r?.units_dataset_id ? ok(r.units_dataset_id) : missing();
  });
  if (!found.ok) return found;
  return loadDataset(ctx, found.value);
}

export function getRun(ctx: StoreContext, runId: unknown): Checked<StoredRun> {
  const missing = (): Checked<StoredRun> => fail(`There is no run with id ${preview(runId)} in the workspace ${fileLabel(ctx.file)}. Pick one from the list of runs.`, 'runId');
  if (!isPositiveId(runId)) return missing();
  return read(ctx, 'open the run', () => {
    const r = ctx.db.prepare('SELECT * FROM runs WHERE id = ?').get(runId) as RunRow | undefined;
    if (r === undefined) return missing();
    return ok({
      ...toSummary(r),
      studyJson: decodeJson(r.study_json),
      settings: decodeJson(r.settings),
      results: decodeJson(r.results),
      timings: decodeJson(r.timings) as Record<string, number>,
      studySha256: r.study_sha256,
      dataHashes: decodeJson(r.data_hashes) as Record<string, string>,
      outDir: r.out_dir,
      files: decodeJson(r.files) as string[],
      hasUnits: r.units_dataset_id !== null,
    });
  });
}

export function listRuns(ctx: StoreContext, studyId?: unknown): Checked<RunSummary[]> {
  if (studyId !== undefined && !isPositiveId(studyId)) {
    return fail(`studyId must be the whole-number id of a saved study (got ${preview(studyId)}); leave it out to list every run.`, 'studyId');
  }
  return read(ctx, 'list the runs', () => {
    const rows = (studyId === undefined
      ? ctx.db.prepare(`SELECT ${SUMMARY_COLUMNS} FROM runs ORDER BY id DESC`).all()
      : ctx.db.prepare(`SELECT ${SUMMARY_COLUMNS} FROM runs WHERE study_id = ? ORDER BY id DESC`).all(studyId)) as SummaryRow[];
    return ok(rows.map(toSummary));
  });
}
