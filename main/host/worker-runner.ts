// Long api calls off the host's main thread (docs/architecture.md, "Long work"): browser mode
// and the Electron shell put a runner in the call's context, and callApi hands the methods that
// read large files or estimate to it after checking their arguments. Each call gets its own
// worker thread (a job worker; the propensity pool starts its own workers from inside it).
// Progress comes back at most 10 a second; cancelling sends a message that aborts the worker's
// AbortController, and terminates the thread if it has not answered within a grace period.

import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
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
  /** Job workers running at once (default: the cores less one for the host, at least 1). */
  maxRunning?: number;
  /** Calls that may wait for a job worker; one more is answered "busy" at once (default 8). */
  maxWaiting?: number;
  /**
   * Keep one job worker started ahead of the next call, warming up the memo renderers while it
   * waits (job-worker.ts), and start the next one when a call ends: the app's hosts (browser mode,
   * Electron) set it; off by default (tests start many runners).
   */
  warmSpare?: boolean;
}

/** The cores less one (the host's own thread keeps answering), at least one. */
export const defaultJobWorkers = () => Math.max(1, availableParallelism() - 1);
export const DEFAULT_MAX_WAITING = 8;

export const busyMessage = (waiting: number) =>
  `Fenceline is busy — ${waiting} call${waiting === 1 ? ' is' : 's are'} waiting; try again when the current run finishes.`;

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

/**
 * One queue for every long call of a host: at most `maxRunning` job workers at once (each may
 * start propensity workers of its own), at most `maxWaiting` calls waiting in order; beyond that a
 * call is answered "busy" at once instead of starting threads without bound.
 */
export function createWorkerRunner(options: WorkerRunnerOptions = {}): WorkerRunner {
  const maxRunning = Math.max(1, options.maxRunning ?? defaultJobWorkers());
  const maxWaiting = Math.max(0, options.maxWaiting ?? DEFAULT_MAX_WAITING);
  const runOne = singleRunner(options);
  let running = 0;
  const waiting: Array<() => void> = [];
  const next = () => { running--; waiting.shift()?.(); };
  return (method, args, ctx) => {
    if (running < maxRunning) { running++; return runOne(method, args, ctx).finally(next); }
    if (waiting.length >= maxWaiting) {
      return Promise.resolve({ ok: false, error: { kind: 'input', problems: [{ path: '', message: busyMessage(waiting.length) }] } });
    }
    return new Promise<ApiResult<unknown>>((resolve, reject) => {
      const start = () => {
        ctx.signal?.removeEventListener('abort', drop);
        running++;
        runOne(method, args, ctx).finally(next).then(resolve, reject);
      };
      // A call cancelled while it waits leaves the queue without starting a thread.
      const drop = () => {
        const i = waiting.indexOf(start);
        if (i >= 0) waiting.splice(i, 1);
        resolve({ ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: CANCELLED_BY_TERMINATE }] } });
      };
      waiting.push(start);
      if (ctx.signal?.aborted) drop();
      else ctx.signal?.addEventListener('abort', drop, { once: true });
    });
  };
}

/**
 * Job worker threads, one per call; with `warmSpare`, one is started ahead and waits, unreferenced
 * (it keeps no host alive), until a call takes it — every call still gets a thread of its own.
 */
function workerSource(options: WorkerRunnerOptions): { take: () => Worker; replenish: () => void } {
  const url = () => options.workerUrl ?? jobWorkerUrl();
  let spare: Worker | null = null;
  const replenish = () => {
    if (!options.warmSpare || spare !== null) return;
    const w = new Worker(url(), { workerData: { warm: true } });
    w.unref();
    // A spare that fails or stops before its call is dropped; the next call starts its own thread.
    const drop = () => { if (spare === w) spare = null; };
    w.on('error', drop);
    w.on('exit', drop);
    spare = w;
  };
  const take = () => {
    const w = spare ?? new Worker(url());
    spare = null;
    w.ref();
    return w;
  };
  replenish();
  return { take, replenish };
}

function singleRunner(options: WorkerRunnerOptions): WorkerRunner {
  const graceMs = options.cancelGraceMs ?? 5_000;
  const workers = workerSource(options);
  return (method, args, ctx) => new Promise<ApiResult<unknown>>((resolve, reject) => {
    const worker = workers.take();
    let settled = false;
    let killTimer: ReturnType<typeof setTimeout> | undefined;
    const finish = (settle: () => void) => {
      if (settled) return;
      settled = true;
      if (killTimer) clearTimeout(killTimer);
      ctx.signal?.removeEventListener('abort', onAbort);
      void worker.terminate();
      settle();
      workers.replenish();
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
    const host: WorkerHost = { ...(ctx.host ? { host: ctx.host } : {}), ...(ctx.workspaceDir ? { workspaceDir: ctx.workspaceDir } : {}), ...(ctx.access ? { access: ctx.access } : {}) };
    const call: ToJobWorker = { type: 'call', method, args, host };
    worker.postMessage(call);
    if (ctx.signal?.aborted) onAbort();
    else ctx.signal?.addEventListener('abort', onAbort, { once: true });
  });
}
