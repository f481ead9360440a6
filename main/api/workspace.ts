// The app's workspace: where it is (chosen by the host), the recently opened study files, the
// runs recorded in the workspace file (main/store), and one recorded run's results.

import { readFileSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';
import type {
  ApiResult, RecentStudy, RunExportedMemo, RunExportMemoArgs, StudyFingerprint, StudyFingerprintArgs, WorkspaceInfo, WorkspaceRecent, WorkspaceRun, WorkspaceRunArgs,
} from '../contract/api.ts';
import { Cancelled } from '../design/propensity.ts';
import { exportStoredMemo } from '../pipeline/record.ts';
import { studyFingerprint } from '../studyfile/fingerprint.ts';
import { validateStudy } from '../studyfile/validate.ts';
import { refuseIf, writeProblem } from './access.ts';
import { storedRunView } from './figures.ts';
import type { Results } from '../contract/results.ts';
import { writeFilesAtomically } from '../output/write-files.ts';
import { openWorkspace } from '../store/workspace.ts';
import { AVAILABLE_MEMO_FORMATS } from '../report/memo-names.ts';
import { refuse } from './context.ts';
import { NO_WORKSPACE, workspaceLayout, type HostContext } from './host.ts';
import { ensureFindings } from '../report/findings/index.ts';

const MAX_RECENT = 12;

function readRecent(path: string): RecentStudy[] {
  try {
    const list: unknown = JSON.parse(readFileSync(path, 'utf8'));
    if (!Array.isArray(list)) return [];
    return list.filter((r): r is RecentStudy =>
      r !== null && typeof r === 'object' && typeof r.path === 'string' && typeof r.title === 'string' && typeof r.openedAt === 'string');
  } catch {
    return []; // no list yet, or a damaged one: start a new list rather than refuse to open studies
  }
}

/** Put a study file at the top of the recent list (nothing happens without a workspace). */
export function rememberStudy(ctx: HostContext, path: string, title: string): void {
  if (!ctx.workspaceDir) return;
  const file = workspaceLayout(ctx.workspaceDir).recentPath;
  const list = [{ path, title, openedAt: new Date().toISOString() }, ...readRecent(file).filter((r) => r.path !== path)].slice(0, MAX_RECENT);
  try {
    writeFilesAtomically(dirname(file), [{ name: basename(file), content: JSON.stringify(list, null, 2) + '\n' }]);
  } catch {
    // The recent list is a convenience; a read-only workspace must not stop the study opening.
  }
}

export async function workspaceInfo(_args: Record<string, never>, ctx: HostContext = {}): Promise<ApiResult<WorkspaceInfo>> {
  if (!ctx.workspaceDir) return refuse([{ path: '', message: NO_WORKSPACE }]);
  const l = workspaceLayout(ctx.workspaceDir);
  return {
    ok: true,
    value: {
      host: ctx.host ?? 'cli', dir: l.dir, workspacePath: l.workspacePath, runsDir: l.runsDir, studiesDir: l.studiesDir,
      memoFormats: [...AVAILABLE_MEMO_FORMATS], dialogs: ctx.dialogs !== undefined,
    },
  };
}

export async function recentWork(_args: Record<string, never>, ctx: HostContext = {}): Promise<ApiResult<WorkspaceRecent>> {
  if (!ctx.workspaceDir) return refuse([{ path: '', message: NO_WORKSPACE }]);
  const l = workspaceLayout(ctx.workspaceDir);
  const studies = readRecent(l.recentPath);
  const opened = openWorkspace(l.workspacePath);
  if (!opened.ok) return refuse(opened.problems);
  const ws = opened.value;
  try {
    const names = ws.listStudies();
    const runs = ws.listRuns();
    if (!names.ok) return refuse(names.problems);
    if (!runs.ok) return refuse(runs.problems);
    const nameOf = new Map(names.value.map((s) => [s.studyId, s.name]));
    return {
      ok: true,
      value: {
        studies,
        runs: runs.value
          .slice()
          .sort((a, b) => b.finishedAt.localeCompare(a.finishedAt))
          .slice(0, MAX_RECENT)
          .map((r) => ({ runId: r.runId, studyName: nameOf.get(r.studyId) ?? `study ${r.studyId}`, finishedAt: r.finishedAt, status: r.status })),
      },
    };
  } finally {
    ws.close();
  }
}

export async function recordedRun(args: WorkspaceRunArgs, ctx: HostContext = {}): Promise<ApiResult<WorkspaceRun>> {
  if (!ctx.workspaceDir) return refuse([{ path: '', message: NO_WORKSPACE }]);
  const opened = openWorkspace(workspaceLayout(ctx.workspaceDir).workspacePath);
  if (!opened.ok) return refuse(opened.problems);
  const ws = opened.value;
  try {
    const run = ws.getRun(args.runId);
    if (!run.ok) return refuse(run.problems.map((p) => ({ ...p, path: 'runId' })));
    const study = ws.getStudy(run.value.studyId, run.value.studyVersion);
    return {
      ok: true,
      value: {
        runId: run.value.runId,
        studyName: study.ok ? study.value.name : `study ${run.value.studyId}`,
        finishedAt: run.value.finishedAt,
        study: run.value.studyJson,
        results: ensureFindings(run.value.results as Results) as Results,
        status: run.value.status,
        studySha256: run.value.studySha256,
        outDir: run.value.outDir,
        files: run.value.files,
        hasUnits: run.value.hasUnits,
      },
    };
  } finally {
    ws.close();
  }
}

/** Write a stored run's memo again into a folder the analyst chose; the study is not run again. */
export async function exportRunMemo(args: RunExportMemoArgs, ctx: HostContext = {}): Promise<ApiResult<RunExportedMemo>> {
  const denied = refuseIf(writeProblem(ctx, args.outDir, 'outDir'));
  if (denied) return denied;
  const stored = storedRunView(args.runId, ctx);
  if (!stored.ok) return refuse(stored.problems);
  const outDir = resolve(args.outDir);
  try {
    const files = await exportStoredMemo(stored.value.view, outDir, {
      formats: args.formats, startedAt: new Date().toISOString(),
      ...(ctx.onProgress ? { onProgress: ctx.onProgress } : {}), ...(ctx.signal ? { signal: ctx.signal } : {}),
    });
    if (!files.ok) return refuse(files.problems);
    return { ok: true, value: { outDir, files: files.value } };
  } catch (e) {
    if (e instanceof Cancelled) return { ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: 'Writing the memo was cancelled; no file was written.' }] } };
    throw e;
  }
}

/** The content hash of a study being edited, for the screens' "out of date" check. */
export async function fingerprintStudy(args: StudyFingerprintArgs, _ctx: HostContext = {}): Promise<ApiResult<StudyFingerprint>> {
  const checked = validateStudy(args.study);
  if (!checked.ok) return { ok: true, value: { sha256: null } };
  return { ok: true, value: { sha256: studyFingerprint(checked.value, args.baseDir ?? '/') } };
}
