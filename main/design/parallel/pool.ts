// The propensity stage on worker threads (node:worker_threads). The work is cut into the same
// blocks as the single-threaded path and each block is computed by the same pure function, so
// the numbers are identical for any number of workers.

import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { CompiledProgram, DesignColumns } from '../../rules/ir.ts';
import type { Checked } from '../../rules/types.ts';
import { allocateApsColumns, computeApsBlock, placeBlock, sliceColumns, type ApsSettings } from '../aps.ts';
import {
  Cancelled, DEFAULT_BLOCK, finishResult, prepareDesign,
  type PropensityOptions, type PropensityResult,
} from '../propensity.ts';
import type { FromWorker, ToWorker, WorkerTask } from './messages.ts';

export interface PoolOptions extends Omit<PropensityOptions, 'signal'> {
  /** Number of worker threads; 0 computes on the calling thread. Default: available cores. */
  workers?: number;
  signal?: AbortSignal;
}

function workerUrl(): URL {
  const built = new URL('./worker.js', import.meta.url);
  return existsSync(fileURLToPath(built)) ? built : new URL('./worker-entry.mjs', import.meta.url);
}

export function defaultWorkerCount(): number {
  return Math.max(1, Math.min(8, availableParallelism()));
}

export async function computePropensityParallel(
  program: CompiledProgram,
  cols: DesignColumns,
  settings: ApsSettings,
  options: PoolOptions = {},
): Promise<Checked<PropensityResult>> {
  const prepared = prepareDesign(program, cols, settings);
  if (!prepared.ok) return prepared;
  const block = options.blockSize ?? DEFAULT_BLOCK;
  const blocks: Array<[number, number]> = [];
  for (let s = 0; s < cols.n; s += block) blocks.push([s, Math.min(cols.n, s + block)]);
  const workers = Math.min(options.workers ?? defaultWorkerCount(), blocks.length);
  const out = allocateApsColumns(cols.n, settings.deltas);
  const scales = prepared.value.scales.map((s) => s.scale);
  const report = (done: number) => options.onProgress?.({ stage: 'propensity', done, total: cols.n });
  report(0);

  if (workers <= 1) {
    let done = 0;
    for (const [s, e] of blocks) {
      if (options.signal?.aborted) throw new Cancelled();
      placeBlock(out, computeApsBlock(program, sliceColumns(cols, s, e), scales, settings, prepared.value.points), s);
      done += e - s;
      report(done);
      await new Promise((resolve) => setImmediate(resolve));
    }
    return { ok: true, value: finishResult(program, out, prepared.value, settings) };
  }

  const pool = Array.from({ length: workers }, () => new Worker(workerUrl()));
  const init: ToWorker = {
    type: 'init',
    program: program.program,
    scales,
    settings,
    points: { ...prepared.value.points, points: prepared.value.points.points },
  };
  for (const w of pool) w.postMessage(init);

  try {
    await new Promise<void>((resolve, reject) => {
      let next = 0;
      let finished = 0;
      let done = 0;
      const onAbort = () => reject(new Cancelled());
      options.signal?.addEventListener('abort', onAbort, { once: true });
      const send = (w: Worker) => {
        if (next >= blocks.length || options.signal?.aborted) return;
        const id = next++;
        const [s, e] = blocks[id]!;
        const slice = sliceColumns(cols, s, e);
        const task: WorkerTask = {
          type: 'task', id, n: e - s,
          continuous: slice.continuous.map((c) => c.slice()),
          discrete: slice.discrete.map((c) => c.slice()),
        };
        w.postMessage(task, [...task.continuous, ...task.discrete].map((a) => a.buffer as ArrayBuffer));
      };
      for (const w of pool) {
        w.on('message', (msg: FromWorker) => {
          if (msg.type === 'failed') { reject(new Error(`propensity worker failed: ${msg.message}\n${msg.stack ?? ''}`)); return; }
          const start = blocks[msg.id]![0];
          placeBlock(out, { n: 0, deltas: settings.deltas, aps: msg.aps, se: msg.se, method: msg.method, straddle: msg.straddle, refined: msg.refined }, start);
          done += blocks[msg.id]![1] - start;
          report(done);
          if (++finished === blocks.length) { options.signal?.removeEventListener('abort', onAbort); resolve(); }
          else send(w);
        });
        w.on('error', reject);
        send(w);
      }
    });
  } finally {
    await Promise.all(pool.map((w) => w.terminate()));
  }
  return { ok: true, value: finishResult(program, out, prepared.value, settings) };
}
