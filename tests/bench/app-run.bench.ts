// Benchmark of the app's run of a sample study, memo included (npm run bench). Prints figures and
// ratios; asserts nothing.
//
// Workload (invented): sample-programs/apprentice-voucher (16,000 applicants in one workbook, one
// cut-off, deltas 0.1, 0.2, 0.4, draws 4,000), evaluated with the memo formats the app writes
// (pdf, html, docx, xlsx) and the run saved in the workspace — as the app's Run step does it in
// browser mode: the bundled server started as `npm run serve` starts it (node scripts/launch.mjs
// serve, in a child process), the job POSTed to /api/jobs and polled every 20 ms; the figure is the
// time from the POST to the job's answer. Target: ≤ 4 s.
// Comparators in the same run: the same evaluate in this process without the server (from the
// sources, modules warmed by one untimed run first, so it shows the work itself; the difference is
// the server's and the job worker's share), and `node -e 1` (Node's own start on this machine now).
// Each is run REPEAT times, interleaved, and the median kept. After each browser-mode run the
// benchmark waits BENCH_APP_RUN_PAUSE_MS (default 8 s) — as an analyst reads a result before the
// next run — so that the job worker the server starts ahead for the next call (worker-runner.ts,
// warmSpare) has warmed up, and its warm-up does not run against the in-process comparator. The
// in-process runs also print where their time goes (the pipeline's stage timings, then the memo's
// steps from its progress).
// BENCH_QUICK=1 runs each twice instead of five times.

import { spawn, spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { createInterface } from 'node:readline';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { AVAILABLE_MEMO_FORMATS } from '../../main/report/memo-names.ts';
import type { ApiResult, ProgressEvent } from '../../main/contract/api.ts';
import { ensureNodeBundles } from '../../scripts/build-node.mjs';

const ROOT = join(import.meta.dirname, '..', '..');
const SAMPLE = join(ROOT, 'sample-programs', 'apprentice-voucher');
const REPEAT = Number(process.env.BENCH_APP_RUN_REPEAT ?? (process.env.BENCH_QUICK === '1' ? 2 : 5));
const TARGET_SECONDS = 4;
const POLL_MS = 20;
const PAUSE_MS = Number(process.env.BENCH_APP_RUN_PAUSE_MS ?? 8000);
const formats = [...AVAILABLE_MEMO_FORMATS];

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s[Math.floor(s.length / 2)]!; };
const load = () => loadavg().map((l) => l.toFixed(2)).join(', ');

const dir = mkdtempSync(join(tmpdir(), 'fenceline-app-run-bench-'));
const ws = join(dir, 'ws');
const studyDir = join(ws, 'studies', 'apprentice-voucher');
mkdirSync(studyDir, { recursive: true });
for (const f of ['study.json', 'applicants.xlsx']) copyFileSync(join(SAMPLE, f), join(studyDir, f));
const studyPath = join(studyDir, 'study.json');

interface Server { port: number; token: string; stop: () => void }

/** The bundled browser-mode server in a child process; its one stdout line is the address with the token. */
async function startBundledServer(): Promise<Server> {
  const child = spawn(process.execPath, ['scripts/launch.mjs', 'serve', '--port', '0', '--workspace', ws], { cwd: ROOT, stdio: ['ignore', 'pipe', 'inherit'] });
  const line = await new Promise<string>((resolve, reject) => {
    createInterface({ input: child.stdout! }).once('line', resolve);
    child.once('exit', (code) => reject(new Error(`the server stopped (exit ${code}) before printing its address`)));
  });
  const m = /^http:\/\/127\.0\.0\.1:(\d+)\/#token=(\S+)$/.exec(line.trim());
  if (!m) throw new Error(`unexpected first line from the server: ${line}`);
  return { port: Number(m[1]), token: m[2]!, stop: () => child.kill('SIGTERM') };
}

let serial = 0;
const args = () => ({ studyPath, outDir: join(ws, 'runs', `run-${++serial}`), formats, workspacePath: join(ws, 'workspace.fenceline') });

async function viaServer(srv: Server): Promise<number> {
  const post = async (path: string, body: unknown) =>
    (await fetch(`http://127.0.0.1:${srv.port}${path}`, { method: 'POST', headers: { 'Content-Type': 'application/json', 'X-Fenceline-Token': srv.token }, body: JSON.stringify(body) })).json();
  const t0 = performance.now();
  const { jobId } = (await post('/api/jobs', { method: 'study.evaluate', args: args() })) as { jobId: string };
  let view = (await post(`/api/jobs/${jobId}`, {})) as { state: string; result?: ApiResult<unknown> };
  while (view.state === 'running') {
    await new Promise((r) => setTimeout(r, POLL_MS));
    view = (await post(`/api/jobs/${jobId}`, {})) as { state: string; result?: ApiResult<unknown> };
  }
  const seconds = (performance.now() - t0) / 1000;
  if (!view.result?.ok) throw new Error(`the job answered ${JSON.stringify(view).slice(0, 400)}`);
  return seconds;
}

/** The same evaluate in this process; returns the wall time and where it went. */
async function inProcess(): Promise<{ seconds: number; stages: string }> {
  const steps: string[] = [];
  const t0 = performance.now();
  let last = t0;
  let lastKey = '';
  const onProgress = (p: ProgressEvent) => {
    if (p.stage !== 'memo') return;
    const key = `memo ${p.done}/${p.total}`;
    if (key === lastKey) return;
    const now = performance.now();
    if (p.done > 0) steps.push(`${p.done === 1 ? 'figures' : `format ${p.done - 1}`} ${((now - last) / 1000).toFixed(2)} s`);
    last = now;
    lastKey = key;
  };
  const r = await evaluateStudy(args(), { onProgress });
  const seconds = (performance.now() - t0) / 1000;
  if (!r.ok) throw new Error(r.error.problems.map((p) => p.message).join('\n'));
  const timed = Object.entries(r.value.timings).map(([k, ms]) => `${k} ${(ms / 1000).toFixed(2)} s`).join(', ');
  return { seconds, stages: `${timed}; memo (${formats.join(', ')} in this order): ${steps.join(', ')}` };
}

function nodeE1(): number {
  const t = performance.now();
  spawnSync(process.execPath, ['-e', '1']);
  return (performance.now() - t) / 1000;
}

try {
  const rebuilt = await ensureNodeBundles({ quiet: true });
  console.log(`App run benchmark: sample-programs/apprentice-voucher (16,000 invented applicants), formats ${formats.join(', ')}, saved in the workspace; bundles ${rebuilt ? 'rebuilt first' : 'up to date'}; ${REPEAT} runs each, interleaved, median kept`);
  console.log(`  load average at the start: ${load()} (${process.env.BENCH_NOTE ?? '2 cores'})`);
  const srv = await startBundledServer();
  const times = { server: [] as number[], inProcess: [] as number[], node: [] as number[] };
  const stages: string[] = [];
  try {
    await inProcess(); // warm this process's modules; meanwhile the server's first job worker warms up
    for (let i = 0; i < REPEAT; i++) {
      times.server.push(await viaServer(srv));
      await new Promise((r) => setTimeout(r, PAUSE_MS));
      const r = await inProcess();
      times.inProcess.push(r.seconds);
      stages.push(r.stages);
      times.node.push(nodeE1());
    }
  } finally {
    srv.stop();
  }
  const server = median(times.server), own = median(times.inProcess), node = median(times.node);
  console.log(`  browser mode, POST /api/jobs to the answer: ${server.toFixed(2)} s (runs: ${times.server.map((s) => s.toFixed(2)).join(', ')}); target ≤ ${TARGET_SECONDS} s: ${server <= TARGET_SECONDS ? 'met' : 'MISSED'} (ratio to target ${(server / TARGET_SECONDS).toFixed(2)})`);
  console.log(`  the same evaluate in this process: ${own.toFixed(2)} s (runs: ${times.inProcess.map((s) => s.toFixed(2)).join(', ')}); server / in-process ${(server / own).toFixed(2)}×`);
  console.log(`  node -e 1: ${node.toFixed(3)} s; browser-mode run = ${(server / node).toFixed(1)}× node -e 1`);
  console.log(`  where the in-process time went (each run): \n    ${stages.join('\n    ')}`);
  console.log(`  load average at the end: ${load()}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
