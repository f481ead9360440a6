// Messages between the host's main thread and a job worker (main/host/job-worker.ts): plain,
// structured-clone-safe data only. The host sends one call and perhaps a cancel; the worker
// answers with progress events (at most 10 a second), then one answer or one fault.

import type { AccessGrants } from '../api/access.ts';
import type { ApiResult, AppHost, ProgressEvent } from '../contract/api.ts';

/** The part of the host's context a worker can use (no dialogs, no functions). */
export interface WorkerHost {
  host?: AppHost;
  workspaceDir?: string;
  /** A copy of the session's allow-list as it stood when the call began. */
  access?: AccessGrants;
}

export interface JobCall { type: 'call'; method: string; args: unknown; host: WorkerHost }
export interface JobCancel { type: 'cancel' }
export type ToJobWorker = JobCall | JobCancel;

export interface JobProgress { type: 'progress'; progress: ProgressEvent }
export interface JobAnswer { type: 'answer'; result: ApiResult<unknown> }
/** An internal fault (an exception, not an input problem): the host logs it and answers plainly. */
export interface JobFault { type: 'fault'; message: string; stack?: string }
export type FromJobWorker = JobProgress | JobAnswer | JobFault;
