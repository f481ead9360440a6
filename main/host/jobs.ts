// Long calls for transports that cannot hold a call open with a progress stream (browser mode
// polls): a job runs one api call, keeps its latest progress event and its answer, and can be
// cancelled. Progress is kept, not queued, so a caller sees at most one event per poll, and
// throttled to at most 10 changes a second per job (the latest kept). Where the host gave a
// runner (browser mode), the long methods run on a worker thread (worker-runner.ts).

import { randomBytes } from 'node:crypto';
import type { ApiResult, ProgressEvent } from '../contract/api.ts';
import type { HostContext } from '../api/host.ts';
import { throttleProgress } from './progress-throttle.ts';

export type CallFn = (method: unknown, args: unknown, ctx: HostContext) => Promise<ApiResult<unknown>>;

export interface JobView {
  state: 'running' | 'done';
  progress: ProgressEvent | null;
  result?: ApiResult<unknown>;
}

interface Job {
  controller: AbortController;
  progress: ProgressEvent | null;
  result?: ApiResult<unknown>;
  finishedAt?: number;
}

/** Answers kept this long after the work ends, for a caller that polls late. */
const KEEP_MS = 10 * 60_000;
const MAX_JOBS = 100;

export class JobTable {
  private readonly jobs = new Map<string, Job>();

  constructor(private readonly call: CallFn, private readonly host: Omit<HostContext, 'signal' | 'onProgress'>, private readonly onFault: (e: unknown) => ApiResult<unknown>) {}

  start(method: unknown, args: unknown): string {
    this.sweep();
    const id = randomBytes(12).toString('hex');
    const job: Job = { controller: new AbortController(), progress: null };
    this.jobs.set(id, job);
    const progress = throttleProgress((p) => { job.progress = p; });
    const ctx: HostContext = { ...this.host, signal: job.controller.signal, onProgress: (p) => progress.push(p) };
    this.call(method, args, ctx)
      .catch((e: unknown) => this.onFault(e))
      .then((result) => { progress.flush(); job.result = result; job.finishedAt = Date.now(); });
    return id;
  }

  view(id: string): JobView | null {
    const job = this.jobs.get(id);
    if (!job) return null;
    return job.result ? { state: 'done', progress: job.progress, result: job.result } : { state: 'running', progress: job.progress };
  }

  cancel(id: string): boolean {
    const job = this.jobs.get(id);
    if (!job) return false;
    job.controller.abort();
    return true;
  }

  cancelAll(): void {
    for (const job of this.jobs.values()) job.controller.abort();
  }

  private sweep(): void {
    const now = Date.now();
    for (const [id, job] of this.jobs) if (job.finishedAt !== undefined && now - job.finishedAt > KEEP_MS) this.jobs.delete(id);
    if (this.jobs.size < MAX_JOBS) return;
    for (const [id, job] of this.jobs) if (job.finishedAt !== undefined) this.jobs.delete(id);
  }
}
