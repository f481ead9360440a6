// The study methods of the api: check a study, evaluate it, run the bundled demo. They adapt
// files and the workspace to the pure pipeline (study.ts) and hold no analysis logic.

import { join, resolve } from 'node:path';
import type {
  ApiResult, CheckArgs, CheckReport, DemoArgs, EvaluateArgs, EvaluateReport, OutputFormat,
} from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import type { RawTable } from '../data/types.ts';
import { Cancelled, validateSettings } from '../design/propensity.ts';
import { unitsCsv } from '../output/units-csv.ts';
import { inputClashes } from '../output/input-clash.ts';
import { writeOutputFiles, type OutputFile } from '../output/write-files.ts';
import { prepareUnits } from '../pipeline/prepare-units.ts';
import { describeAtom } from '../estimate/composition.ts';
import { lowerValidatedProgram } from '../rules/compile.ts';
import type { Problem } from '../rules/types.ts';
import { describeProgram } from '../rules/wording.ts';
import { openWorkspace } from '../store/workspace.ts';
import type { DatasetColumnInput } from '../store/types.ts';
import { SOFTWARE_VERSION } from '../store/software-version.ts';
import { readStudyData, runStudy, type StudyRun } from '../pipeline/run-study.ts';
import { figureData } from '../report/figure-data.ts';
import { MEMO_FILE_NAMES, memoFiles } from '../report/memo-files.ts';
import { SAMPLES_DIR } from '../resources.ts';
import { loadAllowedStudy, refuseIf, studyDataPaths, workspaceProblem, writeProblem } from './access.ts';
import { refuse, type CallContext } from './context.ts';
import type { HostContext } from './host.ts';

/** The memo formats this version can write (docs/cli.md: memo.pdf, memo.html, memo.docx, tables.xlsx). */
export const AVAILABLE_MEMO_FORMATS: readonly OutputFormat[] = ['pdf', 'html', 'docx', 'xlsx'];

export async function checkStudy(args: CheckArgs, ctx: HostContext = {}): Promise<ApiResult<CheckReport>> {
  const loaded = loadAllowedStudy(ctx, args.studyPath);
  if (!loaded.ok) return refuse(loaded.problems);
  return checkValidatedStudy(loaded.value.study, loaded.value.baseDir, ctx);
}

/** Read and map a validated study's data and report what will be used, estimating nothing. */
export async function checkValidatedStudy(study: Study, baseDir: string, ctx: CallContext = {}): Promise<ApiResult<CheckReport>> {
  const read = await readStudyData(study, { baseDir, ...ctx });
  if (!read.ok) return refuse(read.problems);
  const { mapped, table } = read.value;
  const program = lowerValidatedProgram(study.program);
  const prepared = prepareUnits(program, mapped, study.program.variables.map((v) => v.key), (a) => describeAtom(program, a));
  return {
    ok: true,
    value: {
      title: study.title,
      dataFile: table.source.fileName,
      sheet: table.source.sheet,
      rowsRead: mapped.rowsRead,
      rowsUsed: prepared.data.n,
      rowsExcluded: [...mapped.excluded, ...prepared.excludedByRule],
      outcomesMissing: study.columns.outcomes.map((o, i) => ({ column: o.column, count: prepared.data.outcomeMissing[i]?.count ?? 0 })),
      fidelity: prepared.fidelity,
      eligible: prepared.eligible.reduce((a, b) => a + b, 0),
      notes: [...mapped.notes, ...prepared.warnings],
      ruleWording: describeProgram(study.program),
    },
  };
}

function withOverrides(study: Study, args: EvaluateArgs): ApiResult<Study> {
  const o = args.overrides ?? {};
  const settings = { ...study.settings, ...(o.deltas ? { deltas: o.deltas } : {}), ...(o.draws !== undefined ? { draws: o.draws } : {}), ...(o.seed !== undefined ? { seed: o.seed } : {}) };
  const checked = validateSettings(settings, 'settings');
  if (!checked.ok) return refuse(checked.problems.map((p) => ({ path: p.path.replace(/^settings\.(deltas|draws|seed).*/, '--$1'), message: p.message })));
  return { ok: true, value: { ...study, settings } };
}

function datasetColumns(table: RawTable): DatasetColumnInput[] {
  return table.columns.map((c) =>
    c.texts
      ? { name: c.name, kind: 'text' as const, values: Array.from({ length: table.rowCount }, (_, r) => c.texts![r] ?? (Number.isNaN(c.numbers[r]!) ? '' : String(c.numbers[r]))) }
      : { name: c.name, kind: 'f64' as const, values: c.numbers },
  );
}

/** Save the study version, the dataset (once per file hash) and the run in the workspace. */
function recordInWorkspace(path: string, study: Study, run: StudyRun, startedAt: string): ApiResult<number> {
  const opened = openWorkspace(path);
  if (!opened.ok) return refuse(opened.problems);
  const ws = opened.value;
  try {
    const existing = ws.listStudies();
    if (!existing.ok) return refuse(existing.problems);
    const prior = existing.value.find((s) => s.name === study.title);
    const saved = ws.saveStudy({ ...(prior ? { studyId: prior.studyId } : {}), name: study.title, study });
    if (!saved.ok) return refuse(saved.problems);
    const datasets = ws.listDatasets();
    if (!datasets.ok) return refuse(datasets.problems);
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
      if (!imported.ok) return refuse(imported.problems);
    }
    const recorded = ws.recordRun({
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
    });
    if (!recorded.ok) return refuse(recorded.problems);
    return { ok: true, value: recorded.value };
  } finally {
    ws.close();
  }
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
  let run;
  try {
    run = await runStudy(study.value, { baseDir: loaded.value.baseDir, ...ctx, ...(args.workers !== undefined ? { workers: args.workers } : {}) });
  } catch (e) {
    if (e instanceof Cancelled) return { ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: e.message }] } };
    throw e;
  }
  if (!run.ok) return refuse(run.problems);
  const r = run.value;
  const files: OutputFile[] = [
    { name: 'results.json', content: JSON.stringify(r.results, null, 2) + '\n' },
    { name: 'units.csv', content: unitsCsv({ ids: r.units.ids, z: r.units.z, d: r.units.d, deltas: r.results.settings.deltas, aps: r.units.aps }) },
  ];
  // The memo is rendered before anything is written, so results.json and the memo files are
  // renamed into place together (write-files.ts) and always come from the same run.
  if (formats.length) {
    files.push(...await memoFiles(r.results, figureData(r), formats, { createdAt: startedAt, ...(ctx.onProgress ? { onProgress: ctx.onProgress } : {}) }));
  }
  // Checked again with the files' real names, just before writing.
  const clashes = inputClashes(resolve(args.outDir), files.map((f) => f.name), inputs);
  if (clashes.length) return refuse(clashes);
  const wrote = writeOutputFiles(resolve(args.outDir), files);
  if (!wrote.ok) return refuse(wrote.problems);
  const written = wrote.value;
  let runId: number | null = null;
  if (args.workspacePath) {
    const recorded = recordInWorkspace(resolve(args.workspacePath), study.value, r, startedAt);
    if (!recorded.ok) return recorded;
    runId = recorded.value;
  }
  return { ok: true, value: { outDir: resolve(args.outDir), files: written, results: r.results, runId, timings: r.timings } };
}

/** The bundled sample study end to end. */
export async function runDemo(args: DemoArgs, ctx: HostContext = {}): Promise<ApiResult<EvaluateReport>> {
  const studyPath = join(SAMPLES_DIR, 'winter-credit', 'study.json');
  return evaluateStudy({ studyPath, outDir: args.outDir, ...(args.formats ? { formats: args.formats } : {}), ...(args.workers !== undefined ? { workers: args.workers } : {}) }, ctx);
}
