// Long api calls off the host's main thread (docs/architecture.md, "Long work"): browser mode
// and the Electron shell put a runner in the call's context, and callApi hands the methods that
// read large files or estimate to it after checking their arguments. Each call gets its own
// worker thread (a job worker; the propensity pool starts its own workers from inside it).
// Progress comes back at most 10 a second; cancelling sends a message that aborts the worker's
// AbortController, and terminates the thread if it has not answered within a grace period.

import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { ApiMethod, ApiResult } from '../contract/api.ts';
import type { FromJobWorker, ToJobWorker, WorkerHost } from './job-messages.ts';
import type { WorkerRunner } from '../api/host.ts';

export { WORKER_METHODS } from '../api/host.ts';
export type { WorkerRunner };

export interface WorkerRunnerOptions {
  /** The worker script (default: the built job-worker.js beside this module, else the development entry). */
  workerUrl?: URL;
  /** How long a cancelled call may take to stop by itself before its thread is terminated. */
  cancelGraceMs?: number;
}

/** An internal fault inside a worker, rethrown on the host with the worker's stack for the log. */
export class WorkerFault extends Error {
  constructor(message: string, readonly workerStack?: string) {
    super(message);
    this.name = 'WorkerFault';
    if (workerStack) this.stack = `WorkerFault (in the job worker): ${workerStack}`;
  }
}

const CANCELLED_BY_TERMINATE = 'The work was stopped.';

export function jobWorkerUrl(): URL {
  const built = new URL('./job-worker.js', import.meta.url);
  return existsSync(fileURLToPath(built)) ? built : new URL('./job-worker-entry.mjs', import.meta.url);
}

export function createWorkerRunner(options: WorkerRunnerOptions = {}): WorkerRunner {
  const graceMs = options.cancelGraceMs ?? 5_000;
  return (method, args, ctx) => new Promise<ApiResult<unknown>>((resolve, reject) => {
    const worker = new Worker(options.workerUrl ?? jobWorkerUrl());
    let settled = false;
    let killTimer: ReturnType<typeof setTimeout> | undefined;
    const finish = (settle: () => void) => {
      if (settled) return;
      settled = true;
      if (killTimer) clearTimeout(killTimer);
      ctx.signal?.removeEventListener('abort', onAbort);
      void worker.terminate();
      settle();
    };
    const onAbort = () => {
      const cancel: ToJobWorker = { type: 'cancel' };
      worker.postMessage(cancel);
      // Last resort: a stage that does not look at the signal (a long synchronous loop) is stopped by force.
      killTimer = setTimeout(() => finish(() => resolve({ ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: CANCELLED_BY_TERMINATE }] } })), graceMs);
    };
    worker.on('message', (msg: FromJobWorker) => {
      if (msg.type === 'progress') { if (!settled) ctx.onProgress?.(msg.progress); return; }
      if (msg.type === 'answer') { finish(() => resolve(msg.result)); return; }
      finish(() => reject(new WorkerFault(msg.message, msg.stack)));
    });
    worker.on('error', (e) => finish(() => reject(e)));
    worker.on('exit', (code) => finish(() => reject(new WorkerFault(`the job worker stopped (exit code ${code}) before answering`))));
    const host: WorkerHost = { ...(ctx.host ? { host: ctx.host } : {}), ...(ctx.workspaceDir ? { workspaceDir: ctx.workspaceDir } : {}) };
    const call: ToJobWorker = { type: 'call', method, args, host };
    worker.postMessage(call);
    if (ctx.signal?.aborted) onAbort();
    else ctx.signal?.addEventListener('abort', onAbort, { once: true });
  });
}
