// The one API surface. The CLI calls these functions in-process; browser mode (serve.ts) and
// Electron's IPC (electron/) call `callApi`, which refuses methods outside the contract and
// arguments of the wrong shape before any work is done. No analysis logic lives here.

import { API_METHODS, OUTPUT_FORMATS, type ApiMethod, type ApiMethods, type ApiResult } from './contract/api.ts';
import { checkShape, type Shape } from './api/args.ts';
import { refuse, type CallContext } from './api/context.ts';
import { checkStudy, evaluateStudy, runDemo } from './api/evaluate.ts';

export { checkStudy, evaluateStudy, runDemo, type CallContext };

type Handler<M extends ApiMethod> = (args: ApiMethods[M]['args'], ctx: CallContext) => Promise<ApiResult<ApiMethods[M]['result']>>;

const formats: Shape = { list: { oneOf: OUTPUT_FORMATS }, max: OUTPUT_FORMATS.length };
const overrides: Shape = { object: { deltas: { list: 'number', max: 50 }, draws: 'integer', seed: 'integer' }, optional: ['deltas', 'draws', 'seed'] };

const METHODS: { [M in ApiMethod]: { args: Shape; run: Handler<M> } } = {
  'study.check': { args: { object: { studyPath: 'string' } }, run: checkStudy },
  'study.evaluate': {
    args: { object: { studyPath: 'string', outDir: 'string', overrides, formats, workspacePath: 'string', workers: 'integer' }, optional: ['overrides', 'formats', 'workspacePath', 'workers'] },
    run: evaluateStudy,
  },
  'demo.run': { args: { object: { outDir: 'string', formats, workers: 'integer' }, optional: ['formats', 'workers'] }, run: runDemo },
};

export function isApiMethod(name: unknown): name is ApiMethod {
  return typeof name === 'string' && (API_METHODS as readonly string[]).includes(name);
}

/** Call a method by name with untrusted arguments. */
export async function callApi(method: unknown, args: unknown, ctx: CallContext = {}): Promise<ApiResult<unknown>> {
  if (!isApiMethod(method)) return refuse([{ path: 'method', message: `"${String(method)}" is not a Fenceline api method.` }]);
  const entry = METHODS[method];
  const problems = checkShape(args, entry.args, 'args');
  if (problems.length) return refuse(problems);
  return (entry.run as Handler<ApiMethod>)(args as never, ctx);
}
