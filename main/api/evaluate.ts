// The study methods of the api: evaluate a study, run the bundled demo (checking one is check.ts).
// They adapt files and the workspace to the pipeline (main/pipeline) and hold no analysis logic.

import { join, resolve } from 'node:path';
import type {
  ApiResult, DemoArgs, EvaluateArgs, EvaluateReport,
} from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import { Cancelled, validateSettings } from '../design/propensity.ts';
import { inputClashes } from '../output/input-clash.ts';
import { writeOutputFiles } from '../output/write-files.ts';
import { referenceStreamedFile, writeRun } from '../pipeline/record.ts';
import { runStudy } from '../pipeline/run-study.ts';
import { dataFileBytes, isStreamedStudy } from '../pipeline/stream-route.ts';
import { streamStudy } from '../pipeline/stream-study.ts';
import { AVAILABLE_MEMO_FORMATS, MEMO_FILE_NAMES } from '../report/memo-names.ts';
import { studyFingerprint, withAbsolutePaths } from '../studyfile/fingerprint.ts';
import { SAMPLES_DIR } from '../resources.ts';
import { loadAllowedStudy, refuseIf, studyDataPaths, workspaceProblem, writeProblem } from './access.ts';
import { cancelled, refuse } from './context.ts';
import type { HostContext } from './host.ts';


function withOverrides(study: Study, args: EvaluateArgs): ApiResult<Study> {
  const o = args.overrides ?? {};
  const settings = { ...study.settings, ...(o.deltas ? { deltas: o.deltas } : {}), ...(o.draws !== undefined ? { draws: o.draws } : {}), ...(o.seed !== undefined ? { seed: o.seed } : {}) };
  const checked = validateSettings(settings, 'settings');
  if (!checked.ok) return refuse(checked.problems.map((p) => ({ path: p.path.replace(/^settings\.(deltas|draws|seed).*/, '--$1'), message: p.message })));
  return { ok: true, value: { ...study, settings } };
}

export async function evaluateStudy(args: EvaluateArgs, ctx: HostContext = {}): Promise<ApiResult<EvaluateReport>> {
  const startedAt = new Date().toISOString();
  const formats = args.formats ?? [];
  const unavailable = formats.filter((f) => !AVAILABLE_MEMO_FORMATS.includes(f));
  if (unavailable.length) {
    return refuse([{ path: '--formats', message: `This version cannot write ${unavailable.join(', ')} memos yet; use --formats none for results.json and units.csv.` }]);
  }
  const denied = refuseIf(writeProblem(ctx, args.outDir, 'outDir'), args.workspacePath !== undefined ? workspaceProblem(ctx, args.workspacePath, 'workspacePath') : null);
  if (denied) return denied;
  const loaded = loadAllowedStudy(ctx, args.studyPath);
  if (!loaded.ok) return refuse(loaded.problems);
  const study = withOverrides(loaded.value.study, args);
  if (!study.ok) return study;
  // Outputs never replace the study's inputs (its files, its data, the workspace database): refused before the run.
  const inputs = [
    { path: loaded.value.studyPath, role: 'the study file' },
    ...(loaded.value.study.programPath ? [{ path: resolve(loaded.value.baseDir, loaded.value.study.programPath), role: 'the program file' }] : []),
    ...studyDataPaths(loaded.value.study, loaded.value.baseDir).map((d) => ({ path: d.path, role: 'the data file' })),
    ...(args.workspacePath ? [{ path: args.workspacePath, role: 'the workspace database' }] : []),
  ];
  const early = inputClashes(resolve(args.outDir), ['results.json', 'units.csv', ...formats.map((f) => MEMO_FILE_NAMES[f])], inputs);
  if (early.length) return refuse(early);
  if (isStreamedStudy(study.value, dataFileBytes(resolve(loaded.value.baseDir, study.value.data.path)))) {
    return evaluateStreamed(study.value, loaded.value.baseDir, args, ctx, inputs);
  }
  let run;
  try {
    run = await runStudy(study.value, { baseDir: loaded.value.baseDir, ...ctx, ...(args.workers !== undefined ? { workers: args.workers } : {}) });
  } catch (e) {
    if (e instanceof Cancelled) return cancelled(e);
    throw e;
  }
  if (!run.ok) return refuse(run.problems);
  const r = run.value;
  const studySha256 = studyFingerprint(study.value, loaded.value.baseDir);
  let written;
  try {
    // The workspace keeps the study as run with its file paths made absolute, so a reopened run
    // names the same files wherever its copy of the study lives.
    written = await writeRun(withAbsolutePaths(study.value, loaded.value.baseDir), studySha256, r, {
      outDir: resolve(args.outDir),
      formats,
      ...(args.workspacePath ? { workspacePath: resolve(args.workspacePath) } : {}),
      startedAt,
      // Checked again with the files' real names, just before writing.
      beforeWrite: (names) => inputClashes(resolve(args.outDir), names, inputs),
      ...(ctx.onProgress ? { onProgress: ctx.onProgress } : {}),
      ...(ctx.signal ? { signal: ctx.signal } : {}),
    });
  } catch (e) {
    if (e instanceof Cancelled) return cancelled(e);
    throw e;
  }
  if (!written.ok) return refuse(written.problems);
  return { ok: true, value: { outDir: resolve(args.outDir), files: written.value.files, results: r.results, runId: written.value.runId, studySha256, timings: r.timings } };
}

/**
 * A study whose data file is streamed (main/pipeline/stream-study.ts): results.json only, its
 * `streamed` block saying what was not computed and why no memo was written.
 */
async function evaluateStreamed(study: Study, baseDir: string, args: EvaluateArgs, ctx: HostContext, inputs: Array<{ path: string; role: string }>): Promise<ApiResult<EvaluateReport>> {
  let run;
  try {
    run = await streamStudy(study, { baseDir, ...(ctx.onProgress ? { onProgress: ctx.onProgress } : {}), ...(ctx.signal ? { signal: ctx.signal } : {}) });
  } catch (e) {
    if (e instanceof Cancelled) return cancelled(e);
    throw e;
  }
  if (!run.ok) return refuse(run.problems);
  const results = run.value.results;
  if (args.workspacePath) {
    const referenced = referenceStreamedFile(resolve(args.workspacePath), run.value.file, results.study.dataSha256);
    if (!referenced.ok) return refuse(referenced.problems);
    results.warnings.push({ code: 'streamed-run-not-stored', message: `The workspace records ${results.study.dataFile} by its path and SHA-256 (it is not copied in), but runs of streamed files are not stored as runs in this version: results.json is this run's record.` });
  }
  const outDir = resolve(args.outDir);
  const clash = inputClashes(outDir, ['results.json'], inputs);
  if (clash.length) return refuse(clash);
  const written = writeOutputFiles(outDir, [{ name: 'results.json', content: JSON.stringify(results, null, 2) + '\n' }]);
  if (!written.ok) return refuse(written.problems);
  return { ok: true, value: { outDir, files: written.value, results, runId: null, studySha256: studyFingerprint(study, baseDir), timings: run.value.timings } };
}

/** The bundled sample study end to end. */
export async function runDemo(args: DemoArgs, ctx: HostContext = {}): Promise<ApiResult<EvaluateReport>> {
  const studyPath = join(SAMPLES_DIR, 'winter-credit', 'study.json');
  return evaluateStudy({ studyPath, outDir: args.outDir, ...(args.formats ? { formats: args.formats } : {}), ...(args.workers !== undefined ? { workers: args.workers } : {}) }, ctx);
}
