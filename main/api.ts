// The one API surface. The CLI calls these functions in-process; browser mode (serve.ts) and
// Electron's IPC (electron/) call `callApi`, which refuses methods outside the contract and
// arguments of the wrong shape before any work is done, then runs the method — on a worker
// thread when the host gave a runner and the method is long (main/host/worker-runner.ts), otherwise
// here. No analysis logic lives here.

import { API_METHODS, OUTPUT_FORMATS, type ApiMethod, type ApiMethods, type ApiResult } from './contract/api.ts';
import { availableParallelism } from 'node:os';
import { checkShape, workersProblem, type Shape } from './api/args.ts';
import { refuse, type CallContext } from './api/context.ts';
import { checkStudy } from './api/check.ts';
import { evaluateStudy, runDemo } from './api/evaluate.ts';
import { checkDraftStudy, previewData } from './api/data.ts';
import { boundaryMap, edgeFiguresOfRun } from './api/figures.ts';
import { listFolder, openDialog, previewMemo, saveDialog } from './api/files.ts';
import { WORKER_METHODS, type HostContext } from './api/host.ts';
import { checkProgram, tryUnit } from './api/program.ts';
import { loadSession, saveSession } from './api/session.ts';
import { listSamples, openStudy, saveStudy } from './api/studies.ts';
import { exportRunMemo, fingerprintStudy, recentWork, recordedRun, workspaceInfo } from './api/workspace.ts';

export { checkStudy, evaluateStudy, runDemo, type CallContext, type HostContext };

type Handler<M extends ApiMethod> = (args: ApiMethods[M]['args'], ctx: HostContext) => Promise<ApiResult<ApiMethods[M]['result']>>;

const NO_ARGS: Shape = { object: {} };
const path: Shape = 'string';

const formats: Shape = { list: { oneOf: OUTPUT_FORMATS }, max: OUTPUT_FORMATS.length };
const overrides: Shape = { object: { deltas: { list: 'number', max: 50 }, draws: 'integer', seed: 'integer' }, optional: ['deltas', 'draws', 'seed'] };

const METHODS: { [M in ApiMethod]: { args: Shape; run: Handler<M> } } = {
  'study.check': { args: { object: { studyPath: 'string' } }, run: checkStudy },
  'study.evaluate': {
    args: { object: { studyPath: 'string', outDir: 'string', overrides, formats, workspacePath: 'string', workers: 'integer' }, optional: ['overrides', 'formats', 'workspacePath', 'workers'] },
    run: evaluateStudy,
  },
  'demo.run': { args: { object: { outDir: 'string', formats, workers: 'integer' }, optional: ['formats', 'workers'] }, run: runDemo },
  // The app's methods. `unknown` parts (a program, a study) are checked in full by their validators.
  'program.check': { args: { object: { program: 'unknown' } }, run: checkProgram },
  'program.tryUnit': { args: { object: { program: 'unknown', values: 'unknown' } }, run: tryUnit },
  'study.open': { args: { object: { path } }, run: openStudy },
  'study.save': { args: { object: { path, study: 'unknown', baseDir: path }, optional: ['baseDir'] }, run: saveStudy },
  'samples.list': { args: NO_ARGS, run: listSamples },
  'data.preview': {
    args: { object: { path, sheet: 'string', headerRow: 'integer', program: 'unknown' }, optional: ['sheet', 'headerRow', 'program'] },
    run: previewData,
  },
  'data.check': { args: { object: { study: 'unknown', baseDir: path }, optional: ['baseDir'] }, run: checkDraftStudy },
  'workspace.info': { args: NO_ARGS, run: workspaceInfo },
  'workspace.recent': { args: NO_ARGS, run: recentWork },
  'workspace.run': { args: { object: { runId: 'integer' } }, run: recordedRun },
  'files.list': { args: { object: { dir: path, kind: { oneOf: ['study', 'data'] } } }, run: listFolder },
  'dialog.openFile': { args: { object: { purpose: { oneOf: ['study', 'data'] }, defaultPath: path }, optional: ['defaultPath'] }, run: openDialog },
  'dialog.saveFile': { args: { object: { purpose: { oneOf: ['study', 'data'] }, defaultPath: path }, optional: ['defaultPath'] }, run: saveDialog },
  'memo.preview': { args: { object: { path } }, run: previewMemo },
  // The map's choices: their types here; whether the keys, delta and codes belong to the study, in api/figures.ts.
  'figure.map': {
    args: {
      object: {
        runId: 'integer',
        axes: { object: { x: 'string', y: 'string' } },
        delta: 'number',
        cell: { list: { object: { key: 'string', value: 'number' } }, max: 50 },
        view: { oneOf: ['binned', 'units'] },
      },
      optional: ['axes', 'delta', 'cell', 'view'],
    },
    run: boundaryMap,
  },
  'figure.edge': { args: { object: { runId: 'integer' } }, run: edgeFiguresOfRun },
  'study.fingerprint': { args: { object: { study: 'unknown', baseDir: path }, optional: ['baseDir'] }, run: fingerprintStudy },
  'session.save': { args: { object: { state: 'unknown' } }, run: saveSession },
  'session.load': { args: NO_ARGS, run: loadSession },
  'run.exportMemo': { args: { object: { runId: 'integer', outDir: path, formats } }, run: exportRunMemo },
};

/** The methods this build implements (the contract's list, checked against the registry in tests). */
export const REGISTERED_METHODS: readonly string[] = Object.keys(METHODS);

export function isApiMethod(name: unknown): name is ApiMethod {
  return typeof name === 'string' && (API_METHODS as readonly string[]).includes(name);
}

/** Call a method by name with untrusted arguments. */
export async function callApi(method: unknown, args: unknown, ctx: HostContext = {}): Promise<ApiResult<unknown>> {
  if (!isApiMethod(method)) return refuse([{ path: 'method', message: `"${String(method)}" is not a Fenceline api method.` }]);
  const entry = METHODS[method];
  const problems = checkShape(args, entry.args, 'args');
  if (problems.length) return refuse(problems);
  const workers = workersProblem((args as { workers?: number }).workers, 'args.workers', availableParallelism());
  if (workers) return refuse([workers]);
  if (ctx.runInWorker && WORKER_METHODS.has(method)) return ctx.runInWorker(method, args, ctx);
  return (entry.run as Handler<ApiMethod>)(args as never, ctx);
}
