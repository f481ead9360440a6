// Responsiveness of browser mode's host (issue 6, "Responsiveness"): while a 1,000,000-row run
// is in progress, the host's event loop is never blocked for more than 100 ms (the long work is
// on worker threads) and a poller sees at most 10 progress events a second.
// Workload (invented): the winter-credit rule on one CSV of households (tests/serve/single-file-study.ts),
// three deltas, draws 4,000, CR1 by office, 2 covariates, saved in the workspace, no memo files.
// The run is started as the app starts it: POST /api/jobs on a browser-mode server
// (main/serve.ts), then polled every 20 ms. The host's event-loop delay is measured with
// perf_hooks.monitorEventLoopDelay (10 ms resolution) from the start of the job to its answer.
// For comparison the same job runs once more with its work on the host's own thread (the JobTable
// without a worker runner), unless BENCH_RESPONSIVENESS_BASELINE=0.
// Prints figures and ratios; asserts nothing. BENCH_QUICK=1 (BENCH_UNITS) scales down.

import { mkdirSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { monitorEventLoopDelay, performance } from 'node:perf_hooks';
import { callApi } from '../../main/api.ts';
import { JobTable } from '../../main/host/jobs.ts';
import type { ApiResult, ProgressEvent } from '../../main/contract/api.ts';
import { startServer } from '../../main/serve.ts';
import { writeSingleFileStudy } from '../serve/single-file-study.ts';

const ROWS = Number(process.env.BENCH_UNITS ?? 1_000_000);
const TARGET_MAX_MS = 100;
const TARGET_RATE = 10;
const POLL_MS = 20;

interface Measured {
  seconds: number;
  maxMs: number;
  p99Ms: number;
  events: number;
  ratePerSecond: number;
  busiestSecond: number;
  result: ApiResult<unknown>;
}

/** Poll a job until it answers, counting each change of its progress, while the loop delay is sampled. */
async function measure(start: () => Promise<string>, poll: (id: string) => Promise<{ state: string; progress: ProgressEvent | null; result?: ApiResult<unknown> }>): Promise<Measured> {
  const h = monitorEventLoopDelay({ resolution: 10 });
  const t0 = performance.now();
  h.enable();
  const id = await start();
  const changes: number[] = [];
  let last = '';
  let view = await poll(id);
  while (view.state === 'running') {
    const now = JSON.stringify(view.progress);
    if (view.progress && now !== last) { changes.push(performance.now()); last = now; }
    await new Promise((r) => setTimeout(r, POLL_MS));
    view = await poll(id);
  }
  h.disable();
  const seconds = (performance.now() - t0) / 1000;
  let busiest = 0;
  for (let i = 0, j = 0; i < changes.length; i++) {
    while (changes[i]! - changes[j]! >= 1000) j++;
    busiest = Math.max(busiest, i - j + 1);
  }
  return {
    seconds, maxMs: h.max / 1e6, p99Ms: h.percentile(99) / 1e6,
    events: changes.length, ratePerSecond: changes.length / seconds, busiestSecond: busiest, result: view.result!,
  };
}

function report(label: string, m: Measured): void {
  const ok = m.result.ok ? 'answered ok' : `answered ${JSON.stringify(m.result).slice(0, 300)}`;
  console.log(`  ${label}: ${m.seconds.toFixed(1)} s, ${ok}`);
  console.log(`    event-loop delay of the host: max ${m.maxMs.toFixed(1)} ms (target ≤ ${TARGET_MAX_MS} ms: ${m.maxMs <= TARGET_MAX_MS ? 'met' : 'MISSED'}; ratio ${(m.maxMs / TARGET_MAX_MS).toFixed(2)}), p99 ${m.p99Ms.toFixed(1)} ms`);
  console.log(`    progress events seen by a poller every ${POLL_MS} ms: ${m.events} in ${m.seconds.toFixed(1)} s = ${m.ratePerSecond.toFixed(1)} a second on average, at most ${m.busiestSecond} in any one second (target ≤ ${TARGET_RATE}: ${m.busiestSecond <= TARGET_RATE ? 'met' : 'MISSED'})`);
}

const dir = mkdtempSync(join(tmpdir(), 'fenceline-responsiveness-bench-'));
try {
  let t = performance.now();
  // Inside the browser-mode workspace: the page may name only what the session allows (main/api/access.ts).
  const ws = join(dir, 'ws-browser');
  const studyDir = join(ws, 'studies', 'bench');
  mkdirSync(studyDir, { recursive: true });
  const studyPath = writeSingleFileStudy(studyDir, ROWS);
  console.log(`Responsiveness benchmark: ${ROWS.toLocaleString('en-US')} households (CSV ${(statSync(join(studyDir, 'applicants.csv')).size / 2 ** 20).toFixed(1)} MB, written in ${((performance.now() - t) / 1000).toFixed(1)} s), deltas 0.05, 0.1, 0.2, draws 4000, saved in the workspace`);

  const srv = await startServer({ port: 0, rendererDir: join(dir, 'renderer'), workspaceDir: ws });
  const post = async (path: string, body: unknown) =>
    (await fetch(`http://127.0.0.1:${srv.port}${path}`, { method: 'POST', headers: { 'Content-Type': 'application/json', 'X-Fenceline-Token': srv.token }, body: JSON.stringify(body) })).json();
  const args = (name: string) => name === 'worker'
    ? { studyPath, outDir: join(ws, 'runs', `out-${name}`), formats: [], workspacePath: join(ws, 'workspace.fenceline') }
    : { studyPath, outDir: join(dir, `out-${name}`), formats: [], workspacePath: join(dir, `ws-${name}.fenceline`) };
  let worker: Measured;
  try {
    worker = await measure(
      async () => ((await post('/api/jobs', { method: 'study.evaluate', args: args('worker') })) as { jobId: string }).jobId,
      async (id) => (await post(`/api/jobs/${id}`, {})) as Awaited<ReturnType<Parameters<typeof measure>[1]>>,
    );
  } finally {
    await srv.close();
  }
  report('browser mode (job on a worker thread, polled over HTTP)', worker);

  if (process.env.BENCH_RESPONSIVENESS_BASELINE !== '0') {
    t = performance.now();
    const jobs = new JobTable(callApi, { host: 'browser', workspaceDir: join(dir, 'ws-inline') }, (e) => { throw e; });
    const inline = await measure(async () => jobs.start('study.evaluate', args('inline')), async (id) => jobs.view(id)! as never);
    report('for comparison, the same job on the host\'s own thread (no worker runner)', inline);
    console.log(`  ratio of the longest stall, own thread / worker: ${(inline.maxMs / worker.maxMs).toFixed(0)}×`);
  }
  console.log(`  peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB (this process; worker threads included)`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
