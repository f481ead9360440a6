// What the host of an app call provides besides progress and cancellation: which host it is,
// the workspace folder (chosen by the host, never by the renderer), and native dialogs where
// the host has them (Electron). Browser mode and the CLI have no dialogs.

import { join } from 'node:path';
import type { ApiMethod, ApiResult, AppHost, DialogArgs } from '../contract/api.ts';
import type { CallContext } from './context.ts';

/** What the session may touch on disk (checked by access.ts): capabilities, not paths. */
export interface AccessGrants {
  /** Folders whose files may be read (the workspace's own folders, the sample programs, folders the user chose). */
  readRoots: string[];
  /** Folders where files may be written or replaced (runs, studies, uploads, folders the user chose for outputs). */
  writeRoots: string[];
  /** Single files the user picked or uploaded (read). */
  readFiles: string[];
  /** Single files the user chose in a save dialog (write, and read back). */
  writeFiles: string[];
  /** Study files the user picked on the host (a native dialog): their data and program paths are theirs too. */
  pickedStudies: string[];
  /** The one workspace database the host chose. */
  workspacePath: string;
  /** The workspace's studies folder (see `vouches`). */
  studiesDir: string;
}


/** Methods that read a whole data file, open the workspace or estimate: never on the host's main thread. */
export const WORKER_METHODS: ReadonlySet<ApiMethod> = new Set<ApiMethod>(['study.check', 'study.evaluate', 'demo.run', 'data.preview', 'data.check', 'figure.map', 'figure.edge', 'workspace.run', 'run.exportMemo']);

/** Runs one long call on a worker thread (main/host/worker-runner.ts implements it; the api only knows its type). */
export type WorkerRunner = (method: ApiMethod, args: unknown, ctx: HostContext) => Promise<ApiResult<unknown>>;

export interface HostDialogs {
  openFile(args: DialogArgs): Promise<string | null>;
  saveFile(args: DialogArgs): Promise<string | null>;
}

export interface HostContext extends CallContext {
  host?: AppHost;
  /** Folder of the workspace: the study files the app saves, run folders, the workspace file. */
  workspaceDir?: string;
  dialogs?: HostDialogs;
  /** The session's allow-list (access.ts): present in the app's hosts, absent for the CLI (which uses paths as typed). */
  access?: AccessGrants;
  /** Runs the long methods (main/host/worker-runner.ts, WORKER_METHODS) on a worker thread; absent (the CLI, inside a worker): in-process. */
  runInWorker?: WorkerRunner;
}

export interface WorkspaceLayout {
  dir: string;
  /** The better-sqlite3 workspace file (studies, datasets, runs). */
  workspacePath: string;
  runsDir: string;
  studiesDir: string;
  /** Recently opened study files (a small JSON list). */
  recentPath: string;
}

export function workspaceLayout(dir: string): WorkspaceLayout {
  return {
    dir,
    workspacePath: join(dir, 'workspace.fenceline'),
    runsDir: join(dir, 'runs'),
    studiesDir: join(dir, 'studies'),
    recentPath: join(dir, 'recent.json'),
  };
}

export const NO_WORKSPACE = 'This window has no workspace folder (the app was started without one). Restart it with npm start.';
