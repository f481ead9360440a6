// Long api calls on worker threads (main/host/worker-runner.ts, job-worker.ts): the answer is the
// same as in-process, progress comes back at most 10 a second, cancelling stops the work (by
// message, or by terminating a thread that does not listen), an input problem comes back as a
// problem and an internal fault as a plain message. The propensity pool starts its own workers
// inside the job worker (workers: 2), so nesting is exercised too.

import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { JobTable } from '../../main/host/jobs.ts';
import { createWorkerRunner, WORKER_METHODS, type WorkerRunner } from '../../main/host/worker-runner.ts';
import type { ApiResult, EvaluateReport, ProgressEvent } from '../../main/contract/api.ts';
import { startServer } from '../../main/serve.ts';
import { SAMPLE_DIR } from '../app/helpers.ts';
import { writeSingleFileStudy } from './single-file-study.ts';

const scratch = () => mkdtempSync(join(tmpdir(), 'fenceline-jobs-'));
const runInWorker = createWorkerRunner();
let studyPath: string;
beforeAll(() => { studyPath = writeSingleFileStudy(scratch(), 20_000); });

describe('callApi hands the long methods to the host\'s runner after checking them', () => {
  const spy = (): { runner: WorkerRunner; calls: string[] } => {
    const calls: string[] = [];
    return { calls, runner: async (method) => { calls.push(method); return { ok: true, value: 'from the runner' }; } };
  };
  it('a long method goes to the runner, a short one stays on this thread', async () => {
    const s = spy();
    expect(await callApi('study.evaluate', { studyPath: '/x/study.json', outDir: '/x/out' }, { runInWorker: s.runner })).toEqual({ ok: true, value: 'from the runner' });
    const samples = await callApi('samples.list', {}, { runInWorker: s.runner });
    expect(samples.ok && samples.value).not.toBe('from the runner');
    expect(s.calls).toEqual(['study.evaluate']);
    for (const m of ['study.evaluate', 'study.check', 'data.preview', 'data.check', 'figure.map']) expect(WORKER_METHODS.has(m as never), m).toBe(true);
  });
  it('arguments of the wrong shape are refused before anything is sent to a worker', async () => {
    const s = spy();
    const r = await callApi('study.evaluate', { studyPath: 3, outDir: '/x' }, { runInWorker: s.runner });
    expect(r).toMatchObject({ ok: false, error: { kind: 'input', problems: [{ path: 'args.studyPath' }] } });
    expect(s.calls).toEqual([]);
  });
});

describe('a job on a worker thread', () => {
  it('answers with the same numbers as the in-process run (results.json identical)', async () => {
    const here = await callApi('study.evaluate', { studyPath, outDir: join(scratch(), 'out'), formats: [], workers: 0 });
    const there = await callApi('study.evaluate', { studyPath, outDir: join(scratch(), 'out'), formats: [], workers: 2 }, { runInWorker });
    expect(here.ok && there.ok).toBe(true);
    const a = (here as { value: EvaluateReport }).value.results;
    const b = (there as { value: EvaluateReport }).value.results;
    expect(b.study.rowsUsed).toBe(20_000);
    expect(JSON.stringify(b)).toBe(JSON.stringify(a));
  });

  it('sends progress through the stages, at most 10 events a second', async () => {
    const events: Array<ProgressEvent & { at: number }> = [];
    const t0 = performance.now();
    const r = await callApi('study.evaluate', { studyPath: join(SAMPLE_DIR, 'study.json'), outDir: join(scratch(), 'out'), formats: [] }, {
      runInWorker, onProgress: (p) => events.push({ ...p, at: performance.now() }),
    });
    const seconds = (performance.now() - t0) / 1000;
    expect(r.ok).toBe(true);
    const stages = new Set(events.map((e) => e.stage));
    expect([...stages]).toEqual(expect.arrayContaining(['import', 'propensity']));
    expect(events.at(-1)).toMatchObject({ stage: 'checks', done: 1, total: 1 }); // the last event is delivered, not dropped
    // the worker sends at most one event per 100 ms of its own work, which is shorter than this call
    expect(events.length).toBeLessThanOrEqual(Math.ceil(seconds * 10) + 1);
  });

  it('stops when cancelled and answers "cancelled"', async () => {
    const controller = new AbortController();
    let firstStage = '';
    const r = await callApi('study.evaluate', { studyPath: join(SAMPLE_DIR, 'study.json'), outDir: join(scratch(), 'out'), formats: [] }, {
      runInWorker, signal: controller.signal, onProgress: (p) => { if (!firstStage) { firstStage = p.stage; controller.abort(); } },
    });
    expect(firstStage).toBe('import');
    expect(r).toMatchObject({ ok: false, error: { kind: 'cancelled' } });
  });

  it('terminates a worker that does not stop by itself', async () => {
    const stuck = createWorkerRunner({ workerUrl: new URL('./fixtures/stuck-job-worker.mjs', import.meta.url), cancelGraceMs: 200 });
    const controller = new AbortController();
    const t0 = performance.now();
    const r = await stuck('study.evaluate', {}, { signal: controller.signal, onProgress: () => controller.abort() });
    expect(r).toMatchObject({ ok: false, error: { kind: 'cancelled', problems: [{ message: 'The work was stopped.' }] } });
    expect(performance.now() - t0).toBeLessThan(5_000);
  });

  it('answers an input problem with the problem', async () => {
    const r = await callApi('study.evaluate', { studyPath: join(scratch(), 'no-such-study.json'), outDir: join(scratch(), 'out') }, { runInWorker });
    expect(r).toMatchObject({ ok: false, error: { kind: 'input', problems: [{ message: expect.stringMatching(/no-such-study\.json was not found/) }] } });
  });

  it('a folder that cannot take the outputs is an input problem, answered from the worker', async () => {
    const blocker = join(scratch(), 'a-file');
    writeFileSync(blocker, 'not a folder');
    const r = await callApi('study.evaluate', { studyPath, outDir: join(blocker, 'out'), formats: [] }, { runInWorker });
    expect(r).toMatchObject({ ok: false, error: { kind: 'input', problems: [{ path: 'outDir', message: expect.stringMatching(/is a file, not a folder/) }] } });
  });

  it('turns an internal fault into a plain message (the details go to the log)', async () => {
    const faulty = createWorkerRunner({ workerUrl: new URL('./fixtures/faulty-job-worker.mjs', import.meta.url) });
    const args = { studyPath, outDir: join(scratch(), 'out'), formats: [] };
    await expect(callApi('study.evaluate', args, { runInWorker: faulty })).rejects.toThrow(/a bug inside the estimation/);
    const logged: unknown[] = [];
    const plain: ApiResult<unknown> = { ok: false, error: { kind: 'input', problems: [{ path: '', message: 'Something went wrong inside Fenceline.' }] } };
    const jobs = new JobTable(callApi, { runInWorker: faulty }, (e) => { logged.push(e); return plain; });
    const id = jobs.start('study.evaluate', args);
    let view = jobs.view(id);
    while (view?.state === 'running') { await new Promise((r) => setTimeout(r, 50)); view = jobs.view(id); }
    expect(view?.result).toEqual(plain);
    expect(String((logged[0] as Error).stack)).toMatch(/in the job worker/);
  });
});

describe('a job worker kept warm for the next call (warmSpare)', () => {
  const warmFlag = new URL('./fixtures/warm-flag-job-worker.mjs', import.meta.url);
  const call = async (runner: WorkerRunner) => (await runner('study.check', { studyPath }, {})) as ApiResult<{ warm: boolean; threadId: number }>;

  it('gives each call the thread started ahead of it, and starts the next one when the call ends', async () => {
    const runner = createWorkerRunner({ workerUrl: warmFlag, warmSpare: true });
    const first = await call(runner);
    const second = await call(runner);
    expect(first).toMatchObject({ ok: true, value: { warm: true } });
    expect(second).toMatchObject({ ok: true, value: { warm: true } });
    // still one call per thread: the spare taken by the first call is not the second's
    if (first.ok && second.ok) expect(second.value.threadId).not.toBe(first.value.threadId);
  });

  it('starts no thread ahead unless asked (the default)', async () => {
    expect(await call(createWorkerRunner({ workerUrl: warmFlag }))).toMatchObject({ ok: true, value: { warm: false } });
  });

  it('warms the real job worker up without changing its answer', async () => {
    const warm = createWorkerRunner({ warmSpare: true });
    await new Promise((r) => setTimeout(r, 200)); // the call arrives while the spare warms up
    const [a, b] = [await callApi('study.check', { studyPath }, { runInWorker: warm }), await callApi('study.check', { studyPath }, { runInWorker })];
    expect(a).toEqual(b);
  });
});

describe('browser mode runs jobs on worker threads', () => {
  it('a job started over HTTP is answered, the server answering polls while it runs', async () => {
    const dir = scratch();
    const srv = await startServer({ port: 0, rendererDir: join(dir, 'renderer'), workspaceDir: join(dir, 'ws') });
    // The page may name only what the session allows: a study in the workspace's studies folder.
    const inWorkspace = join(dir, 'ws', 'studies', 'one');
    mkdirSync(inWorkspace, { recursive: true });
    const allowedStudy = writeSingleFileStudy(inWorkspace, 20_000);
    try {
      const post = async (path: string, body: unknown) => (await fetch(`http://127.0.0.1:${srv.port}${path}`, { method: 'POST', headers: { 'X-Fenceline-Token': srv.token }, body: JSON.stringify(body) })).json();
      const { jobId } = await post('/api/jobs', { method: 'study.check', args: { studyPath: allowedStudy } }) as { jobId: string };
      let polls = 0;
      let view: { state: string; result?: ApiResult<{ rowsUsed: number }> } = { state: 'running' };
      while (view.state === 'running') { view = await post(`/api/jobs/${jobId}`, {}) as typeof view; polls++; await new Promise((r) => setTimeout(r, 20)); }
      expect(view.result).toMatchObject({ ok: true, value: { rowsUsed: 20_000 } });
      expect(polls).toBeGreaterThan(1);
    } finally {
      await srv.close();
    }
  });
});
