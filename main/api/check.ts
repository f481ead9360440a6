// The api's study check: read, map and prepare a study's data as evaluate does (the same stages,
// pipeline/prepare-study.ts) and report what a run would use, estimating nothing. Apart from
// evaluate.ts so that `check` loads the data readers and the rule only (the command line imports
// this module alone for it; tests/cli/startup-modules.test.ts).

import { resolve } from 'node:path';
import type { ApiResult, CheckArgs, CheckReport } from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import { Cancelled } from '../design/cancelled.ts';
import { prepareStudy } from '../pipeline/prepare-study.ts';
import { dataFileBytes, isStreamedStudy } from '../pipeline/stream-route.ts';
import { describeProgram } from '../rules/wording.ts';
import { loadAllowedStudy } from './access.ts';
import { cancelled, refuse, type CallContext } from './context.ts';
import type { HostContext } from './host.ts';

export async function checkStudy(args: CheckArgs, ctx: HostContext = {}): Promise<ApiResult<CheckReport>> {
  const loaded = loadAllowedStudy(ctx, args.studyPath);
  if (!loaded.ok) return refuse(loaded.problems);
  return checkValidatedStudy(loaded.value.study, loaded.value.baseDir, ctx);
}

/** Read, map and prepare a validated study's data (the same stages as evaluate) and report what will be used, estimating nothing. */
export async function checkValidatedStudy(study: Study, baseDir: string, ctx: CallContext = {}): Promise<ApiResult<CheckReport>> {
  if (isStreamedStudy(study, dataFileBytes(resolve(baseDir, study.data.path)))) return checkStreamedStudy(study, baseDir, ctx);
  let ready;
  try {
    ready = await prepareStudy(study, { baseDir, ...ctx });
  } catch (e) {
    if (e instanceof Cancelled) return cancelled(e);
    throw e;
  }
  if (!ready.ok) return refuse(ready.problems);
  const { read: { mapped, table }, prepared } = ready.value;
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

/** `check` on a streamed file: its first pass only (map, prepare, count), estimating nothing. */
async function checkStreamedStudy(study: Study, baseDir: string, ctx: CallContext): Promise<ApiResult<CheckReport>> {
  // The streamed pipeline (and DuckDB with it) loads only for a streamed file.
  const { checkStreamed } = await import('../pipeline/stream-study.ts');
  let checked;
  try {
    checked = await checkStreamed(study, { baseDir, ...(ctx.onProgress ? { onProgress: ctx.onProgress } : {}), ...(ctx.signal ? { signal: ctx.signal } : {}) });
  } catch (e) {
    if (e instanceof Cancelled) return cancelled(e);
    throw e;
  }
  if (!checked.ok) return refuse(checked.problems);
  const c = checked.value;
  return {
    ok: true,
    value: {
      title: study.title, dataFile: c.dataFile, sheet: null, rowsRead: c.rowsRead, rowsUsed: c.rowsUsed, rowsExcluded: c.rowsExcluded,
      outcomesMissing: c.outcomesMissing, fidelity: c.fidelity, eligible: c.eligible, notes: c.notes, ruleWording: describeProgram(study.program),
    },
  };
}
