// Runs: everything needed to say later what was run, on which data, by which software, with
// which seed — and what came out. A run points at a saved study version (a foreign key), and
// also keeps the study exactly as run, since settings may have been changed for that run only.

import { read, write, type StoreContext } from './context.ts';
import { decodeJson, encodeJson } from './json-column.ts';
import { fail, fileLabel, ok } from './problems.ts';
import type { Checked, Problem, RunInput, RunSummary, StoredRun } from './types.ts';
import { checkSha256, checkText, checkTimestamp, isPositiveId, preview } from './validate.ts';

interface RunRow {
  id: number; study_id: number; study_version: number; study_json: string; settings: string; seed: number;
  software_version: string; data_sha256: string; results: string; timings: string;
  started_at: string; finished_at: string; recorded_at: string;
}

const SUMMARY_COLUMNS = 'id, study_id, study_version, seed, software_version, data_sha256, started_at, finished_at, recorded_at';

function toSummary(r: Omit<RunRow, 'study_json' | 'settings' | 'results' | 'timings'>): RunSummary {
  return {
    runId: r.id, studyId: r.study_id, studyVersion: r.study_version, seed: r.seed, softwareVersion: r.software_version,
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

export function recordRun(ctx: StoreContext, input: RunInput): Checked<number> {
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
  const text = { studyJson: docs.studyJson.value, settings: docs.settings.value, results: docs.results.value, timings: docs.timings.value };

  return write(ctx, 'record the run', () => {
    const exists = ctx.db.prepare('SELECT 1 FROM study_versions WHERE study_id = ? AND version = ?').get(input.studyId, input.studyVersion);
    if (exists === undefined) {
      return fail(`The workspace ${fileLabel(ctx.file)} has no version ${input.studyVersion} of study ${input.studyId}; save the study first, then record its run.`, 'studyVersion');
    }
    const info = ctx.db.prepare(
      `INSERT INTO runs (study_id, study_version, study_json, settings, seed, software_version, data_sha256, results, timings, started_at, finished_at, recorded_at)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    ).run(
      input.studyId, input.studyVersion, text.studyJson, text.settings, input.seed, input.softwareVersion,
      input.dataSha256.toLowerCase(), text.results, text.timings, input.startedAt, input.finishedAt, ctx.now(),
    );
    return ok(Number(info.lastInsertRowid));
  });
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
      : ctx.db.prepare(`SELECT ${SUMMARY_COLUMNS} FROM runs WHERE study_id = ? ORDER BY id DESC`).all(studyId)) as RunRow[];
    return ok(rows.map(toSummary));
  });
}
