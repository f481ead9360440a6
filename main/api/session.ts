// The app's session kept in the workspace folder: the open study with its unsaved edits, the
// current step, the run shown and a run in progress — saved by the screens (debounced) and read
// back when the window is reloaded, goes Back, or the renderer crashed, so nothing the analyst did
// is lost. One small JSON file, written atomically; the renderer's state is untrusted data, kept
// as it came and handed back, never interpreted here.

import { readFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import type { ApiResult, SessionLoaded, SessionSaveArgs, SessionSaved } from '../contract/api.ts';
import { writeFilesAtomically } from '../output/write-files.ts';
import { refuse } from './context.ts';
import { NO_WORKSPACE, type HostContext } from './host.ts';

/** A session is a study and a few choices: far below this (a study file is at most 20 MB). */
export const MAX_SESSION_BYTES = 5 * 2 ** 20;

const sessionFile = (workspaceDir: string) => join(workspaceDir, 'session.json');

export async function saveSession(args: SessionSaveArgs, ctx: HostContext = {}): Promise<ApiResult<SessionSaved>> {
  if (!ctx.workspaceDir) return refuse([{ path: '', message: NO_WORKSPACE }]);
  const savedAt = new Date().toISOString();
  const text = JSON.stringify({ savedAt, state: args.state });
  if (text === undefined || Buffer.byteLength(text) > MAX_SESSION_BYTES) {
    return refuse([{ path: 'args.state', message: 'The open study is too large to keep between sessions; save it as a study file instead.' }]);
  }
  const file = sessionFile(ctx.workspaceDir);
  try {
    writeFilesAtomically(dirname(file), [{ name: basename(file), content: text + '\n' }]);
  } catch (e) {
    return refuse([{ path: '', message: `Your work could not be kept in the workspace folder (${(e as NodeJS.ErrnoException).code ?? 'write error'}). Save the study as a file to be safe.` }]);
  }
  return { ok: true, value: { savedAt } };
}

export async function loadSession(_args: Record<string, never>, ctx: HostContext = {}): Promise<ApiResult<SessionLoaded>> {
  if (!ctx.workspaceDir) return refuse([{ path: '', message: NO_WORKSPACE }]);
  try {
    const parsed = JSON.parse(readFileSync(sessionFile(ctx.workspaceDir), 'utf8')) as { savedAt?: unknown; state?: unknown };
    if (typeof parsed.savedAt !== 'string') return { ok: true, value: { state: null, savedAt: null } };
    return { ok: true, value: { state: parsed.state ?? null, savedAt: parsed.savedAt } };
  } catch {
    return { ok: true, value: { state: null, savedAt: null } }; // none yet, or damaged: start afresh
  }
}
