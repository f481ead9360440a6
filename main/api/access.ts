// Capabilities, not paths: in the app's hosts (browser mode and Electron) the page never names an
// arbitrary file. Files enter through the user's own pick — a native dialog (Electron), the
// browser's file input or a drop (stored by the host in the workspace's uploads folder) — or
// through a study file the user picked (its data paths, relative to it). The host keeps this
// per-session allow-list in the call's HostContext (`access`); every api method that touches the
// disk asks it first and refuses with a plain message. The CLI acts for the user at a terminal
// and gives no allow-list: its paths are used as typed.
//
// The list is plain data (arrays of absolute, symlink-resolved paths) so it crosses to a job
// worker by structured clone (main/host/job-messages.ts). Paths are compared after resolving
// symbolic links, so a link inside an allowed folder cannot lead out of it, and without regard to
// letter case where the file system ignores it (Windows, macOS by default).

import { readFileSync } from 'node:fs';
import { dirname, isAbsolute, join, relative, resolve, sep } from 'node:path';
import type { ApiResult } from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import { canonicalPath } from '../output/input-clash.ts';
import type { Checked, Problem } from '../rules/types.ts';
import { SAMPLES_DIR } from '../resources.ts';
import { loadStudyFile, type LoadedStudy } from '../studyfile/load.ts';
import { refuse } from './context.ts';
import { workspaceLayout, type AccessGrants, type HostContext } from './host.ts';

export type { AccessGrants };

const inside = (root: string, p: string) => {
  const rel = relative(root, p);
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel) && !rel.startsWith(`..${sep}`));
};

/** The grants every session starts with: the workspace's own folders and the sample programs. */
export function sessionGrants(workspaceDir: string): AccessGrants {
  const l = workspaceLayout(workspaceDir);
  const own = [l.runsDir, l.studiesDir, uploadsDir(workspaceDir)].map(canonicalPath);
  return {
    readRoots: [...own, canonicalPath(SAMPLES_DIR)],
    writeRoots: own,
    readFiles: [],
    writeFiles: [],
    pickedStudies: [],
    workspacePath: canonicalPath(l.workspacePath),
    studiesDir: canonicalPath(l.studiesDir),
  };
}

export const uploadsDir = (workspaceDir: string) => join(workspaceDir, 'uploads');

export function mayRead(g: AccessGrants, path: string): boolean {
  const p = canonicalPath(path);
  return g.readFiles.includes(p) || g.writeFiles.includes(p) || g.pickedStudies.includes(p) || g.readRoots.some((r) => inside(r, p));
}

export function mayWrite(g: AccessGrants, path: string): boolean {
  const p = canonicalPath(path);
  return g.writeFiles.includes(p) || g.writeRoots.some((r) => inside(r, p));
}

/** A folder the page may list or start a dialog in: an allowed folder, or the folder of an allowed file. */
export function mayBrowse(g: AccessGrants, dir: string): boolean {
  const p = canonicalPath(dir);
  return g.readRoots.some((r) => inside(r, p)) || [...g.readFiles, ...g.writeFiles, ...g.pickedStudies].some((f) => dirname(f) === p || f === p);
}

const READ_REFUSED = (p: string) =>
  `Fenceline may not read ${p} from this window: the app opens only files you chose (with Open, or by dropping them on the window) and its own workspace folders. Choose the file again.`;
const WRITE_REFUSED = (p: string) =>
  `Fenceline may not write to ${p} from this window: the app writes only into its workspace folders and to places you chose with Save. Choose the place again.`;

/** Refuse reading `path` unless the session allows it (no allow-list: the CLI, every path). */
export function readProblem(ctx: HostContext, path: string, at: string): Problem | null {
  if (!ctx.access || mayRead(ctx.access, path)) return null;
  return { path: at, message: READ_REFUSED(resolve(path)) };
}

export function writeProblem(ctx: HostContext, path: string, at: string): Problem | null {
  if (!ctx.access || mayWrite(ctx.access, path)) return null;
  return { path: at, message: WRITE_REFUSED(resolve(path)) };
}

/** The workspace database a call may name: only the host's own. */
export function workspaceProblem(ctx: HostContext, path: string, at: string): Problem | null {
  if (!ctx.access || canonicalPath(path) === ctx.access.workspacePath) return null;
  return { path: at, message: 'The app records runs only in its own workspace file; leave the workspace out, or use the one workspace.info names.' };
}

/** Every file a study names besides itself: the unit file, joined files, the treatment's "listed in" source. */
export function studyDataPaths(study: Pick<Study, 'data' | 'columns'>, baseDir: string): Array<{ path: string; at: string }> {
  const out = [{ path: resolve(baseDir, study.data.path), at: 'data.path' }];
  (study.data.join ?? []).forEach((j, i) => out.push({ path: resolve(baseDir, j.path), at: `data.join[${i}].path` }));
  const t = study.columns.treatment;
  if (t !== undefined && typeof t === 'object') out.push({ path: resolve(baseDir, t.listedIn), at: 'columns.treatment.listedIn' });
  return out;
}

/** The program file a study names (a string `program`), read without validating the rest. */
function programFileOf(studyPath: string): string | null {
  try {
    const raw = JSON.parse(readFileSync(studyPath, 'utf8')) as unknown;
    const program = raw !== null && typeof raw === 'object' ? (raw as Record<string, unknown>).program : undefined;
    return typeof program === 'string' && program.trim() !== '' ? resolve(dirname(studyPath), program) : null;
  } catch {
    return null; // not JSON: loadStudyFile says so, without quoting the file
  }
}

/**
 * A study the user picked on the host, one of the sample programs, or one in the workspace's
 * studies folder (written only by study.save, which checks the data paths first) vouches for the
 * files it names. An uploaded study does not: its bytes came from the page.
 */
function vouches(g: AccessGrants, studyPath: string): boolean {
  const p = canonicalPath(studyPath);
  return g.pickedStudies.includes(p) || inside(canonicalPath(SAMPLES_DIR), p) || inside(g.studiesDir, p);
}

/** Data paths of a study may be read: each allowed itself, or the study vouches for them. */
export function studyFilesProblems(ctx: HostContext, study: Pick<Study, 'data' | 'columns'>, baseDir: string, studyPath?: string): Problem[] {
  if (!ctx.access) return [];
  if (studyPath !== undefined && vouches(ctx.access, studyPath)) return [];
  return studyDataPaths(study, baseDir).flatMap(({ path, at }) => { const p = readProblem(ctx, path, at); return p ? [p] : []; });
}

/** loadStudyFile behind the session's allow-list: the study file, its program file, then its data files. */
export function loadAllowedStudy(ctx: HostContext, studyPath: string, at = 'studyPath'): Checked<LoadedStudy> {
  const own = readProblem(ctx, studyPath, at);
  if (own) return { ok: false, problems: [own] };
  if (ctx.access && !vouches(ctx.access, studyPath)) {
    const program = programFileOf(resolve(studyPath));
    const p = program ? readProblem(ctx, program, 'program') : null;
    if (p) return { ok: false, problems: [p] };
  }
  const loaded = loadStudyFile(studyPath);
  if (!loaded.ok) return loaded;
  const problems = studyFilesProblems(ctx, loaded.value.study, loaded.value.baseDir, loaded.value.studyPath);
  return problems.length ? { ok: false, problems } : loaded;
}

export { canonicalPath };

export const refuseIf = (...problems: Array<Problem | null>): ApiResult<never> | null => {
  const found = problems.filter((p): p is Problem => p !== null);
  return found.length ? refuse(found) : null;
};

/** Record a file the user picked on the host (a native dialog): readable; a study also vouches for its data files. */
export function grantPicked(g: AccessGrants, path: string, purpose: 'study' | 'data'): void {
  const p = canonicalPath(path);
  if (purpose === 'study') { if (!g.pickedStudies.includes(p)) g.pickedStudies.push(p); }
  else if (!g.readFiles.includes(p)) g.readFiles.push(p);
}

/** A study that vouches (see `vouches`) lends its data files to the session, so a draft of it may name them. */
export function grantStudyFiles(g: AccessGrants, study: Pick<Study, 'data' | 'columns'>, baseDir: string, studyPath: string): void {
  if (!vouches(g, studyPath)) return;
  for (const { path } of studyDataPaths(study, baseDir)) {
    const p = canonicalPath(path);
    if (!g.readFiles.includes(p)) g.readFiles.push(p);
  }
}

/** Record the place the user chose in a save dialog: it may be written and read back. */
export function grantSaved(g: AccessGrants, path: string): void {
  const p = canonicalPath(path);
  if (!g.writeFiles.includes(p)) g.writeFiles.push(p);
}

/** Record a file the host stored from an upload (browser mode): readable, but it vouches for nothing it names. */
export function grantUploaded(g: AccessGrants, path: string): void {
  const p = canonicalPath(path);
  if (!g.readFiles.includes(p)) g.readFiles.push(p);
}
