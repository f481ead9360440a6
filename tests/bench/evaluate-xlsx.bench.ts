// Benchmark of the whole evaluate of a workbook (main/api evaluateStudy, no memo formats) against
// exceljs's streaming WorkbookReader merely reading the same workbook (every cell visited, nothing
// else: tests/bench/exceljs-reader.ts). Prints figures and ratios; asserts nothing.
//
// Workload (invented): 300,000 households of the winter-credit generator
// (main/sample-data/winter-credit.ts; ids made unique per chunk as in tests/serve/single-file-study.ts)
// written as one .xlsx by exceljs's streaming WorkbookWriter with shared strings (as
// tests/bench/import.bench.ts writes its workbook); the sample study's rule, treatment and decision
// columns, clustered by office, two covariates, deltas 0.05, 0.1, 0.2, draws 4,000, default
// worker threads. The whole evaluate reads, maps, prepares, computes the propensity scores,
// estimates, runs every check and writes results.json and units.csv; it is timed as a user runs
// it, `node scripts/launch.mjs cli evaluate … --formats none` (the bundles, Node's start included)
// in a child process, while exceljs reads in this process (no start counted: the comparison is
// the stricter for it). Then the same evaluate once more in this process from the sources, for
// its stage split (its propensity workers load TypeScript through tsx, so its total is not the figure).
// Target: whole evaluate ≤ 1.0× exceljs's reading alone. Each is run BENCH_XLSX_REPEAT times
// (default 1), interleaved, the fastest kept. BENCH_QUICK=1 (or BENCH_XLSX_ROWS) scales down.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import ExcelJS from 'exceljs';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { winterCreditRows } from '../../main/sample-data/winter-credit.ts';
import { ensureNodeBundles } from '../../scripts/build-node.mjs';
import { singleFileStudy } from '../serve/single-file-study.ts';
import { exceljsAlone } from './exceljs-reader.ts';

const ROWS = Number(process.env.BENCH_XLSX_ROWS ?? (process.env.BENCH_QUICK === '1' ? 30_000 : 300_000));
const REPEAT = Math.max(1, Number(process.env.BENCH_XLSX_REPEAT ?? 1));
const TARGET_RATIO = 1.0;
const CHUNK = 100_000;
const TIME = '/usr/bin/time';
const ROOT = join(import.meta.dirname, '..', '..');
const load = () => loadavg().map((l) => l.toFixed(2)).join(', ');

async function writeWorkbook(path: string): Promise<void> {
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: path, useSharedStrings: true, useStyles: false });
  const ws = wb.addWorksheet('Applicants');
  for (let start = 0, chunk = 0; start < ROWS; start += CHUNK, chunk++) {
    const part = winterCreditRows(Math.min(CHUNK, ROWS - start), 2026 + chunk);
    const header = Object.keys(part[0]!) as Array<keyof (typeof part)[number]>;
    if (start === 0) ws.addRow(header).commit();
    for (const r of part) ws.addRow(header.map((h) => (h === 'APPLICANT_ID' ? `${chunk}-${r[h]}` : r[h]))).commit();
  }
  ws.commit();
  await wb.commit();
}

const dir = mkdtempSync(join(tmpdir(), 'fenceline-evaluate-xlsx-bench-'));
try {
  const xlsx = join(dir, 'applicants.xlsx');
  let t = performance.now();
  await writeWorkbook(xlsx);
  const study = { ...singleFileStudy(), data: { path: 'applicants.xlsx' } };
  const studyPath = join(dir, 'study.json');
  writeFileSync(studyPath, JSON.stringify(study, null, 2));
  console.log(`Evaluate-a-workbook benchmark: ${ROWS.toLocaleString('en-US')} invented households, .xlsx ${(statSync(xlsx).size / 2 ** 20).toFixed(1)} MB (written in ${((performance.now() - t) / 1000).toFixed(1)} s), deltas ${study.settings.deltas.join(', ')}, draws ${study.settings.draws}, no memo; ${REPEAT} run(s) each, fastest kept`);
  console.log(`  load average at the start: ${load()}`);
  await ensureNodeBundles({ quiet: true });
  const evaluate: number[] = [];
  const exceljs: number[] = [];
  const evaluateCpu: number[] = [];
  const exceljsCpu: number[] = [];
  let cells = 0;
  for (let i = 0; i < REPEAT; i++) {
    t = performance.now();
    // through /usr/bin/time where there is one, for the child's CPU time (user + system) beside its wall time
    const args = [process.execPath, 'scripts/launch.mjs', 'cli', 'evaluate', studyPath, '--out', join(dir, `out-${i}`), '--formats', 'none', '--quiet'];
    const cli = existsSync(TIME) ? spawnSync(TIME, ['-f', 'cpu %U %S', ...args], { cwd: ROOT, encoding: 'utf8' }) : spawnSync(args[0]!, args.slice(1), { cwd: ROOT, encoding: 'utf8' });
    evaluate.push((performance.now() - t) / 1000);
    if (cli.status !== 0) throw new Error(`cli evaluate failed (exit ${cli.status}): ${cli.stderr}`);
    const cpu = /cpu ([\d.]+) ([\d.]+)\s*$/.exec(cli.stderr ?? '');
    if (cpu) evaluateCpu.push(Number(cpu[1]) + Number(cpu[2]));
    t = performance.now();
    const c0 = process.cpuUsage();
    cells = await exceljsAlone(xlsx);
    const c1 = process.cpuUsage(c0);
    exceljs.push((performance.now() - t) / 1000);
    exceljsCpu.push((c1.user + c1.system) / 1e6);
  }
  const ev = Math.min(...evaluate), ex = Math.min(...exceljs);
  console.log(`  whole evaluate (cli, bundles): ${ev.toFixed(2)} s (runs: ${evaluate.map((x) => x.toFixed(2)).join(', ')})`);
  console.log(`  exceljs WorkbookReader reading it alone: ${ex.toFixed(2)} s (${cells.toLocaleString('en-US')} cells visited; runs: ${exceljs.map((x) => x.toFixed(2)).join(', ')})`);
  console.log(`  ratio whole evaluate / exceljs reading: ${(ev / ex).toFixed(2)}× (target ≤ ${TARGET_RATIO.toFixed(1)}×: ${ev / ex <= TARGET_RATIO ? 'met' : 'MISSED'}; ratio to target ${(ev / ex / TARGET_RATIO).toFixed(2)})`);
  if (evaluateCpu.length) {
    const evc = Math.min(...evaluateCpu), exc = Math.min(...exceljsCpu);
    console.log(`  CPU time (user + system, all threads): whole evaluate ${evc.toFixed(2)} s, exceljs ${exc.toFixed(2)} s; ratio ${(evc / exc).toFixed(2)}× (less moved by other work on the machine than the wall times)`);
  }
  t = performance.now();
  const r = await evaluateStudy({ studyPath, outDir: join(dir, 'out-split'), formats: [] });
  if (!r.ok) throw new Error(r.error.problems.map((p) => p.message).join('\n'));
  const stages = Object.entries(r.value.timings).map(([k, ms]) => `${k} ${(ms / 1000).toFixed(2)} s`).join(', ');
  console.log(`  stage split (the same evaluate in this process, from the sources: ${((performance.now() - t) / 1000).toFixed(2)} s): ${stages}`);
  console.log(`  load average at the end: ${load()}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
