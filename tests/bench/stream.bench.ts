// Benchmark of the streamed path (main/pipeline/stream-study.ts) on a file beyond one sheet:
// 20,000,000 rows of an invented rental-rebate file written as Parquet by DuckDB's own SQL
// generator (tests/stream/helpers.ts, seeded), three deltas, CR1 standard errors with one
// control. Each measurement runs in its own child process so that its peak resident memory
// (VmHWM of /proc/self/status, proc(5)) is its own. Figures:
//   - the streamed evaluate: wall time and peak memory (target < 2 GB);
//   - comparators in the same run: DuckDB alone summing the same columns (the read limit), and
//     DuckDB's chunks handed to JavaScript as typed columns with nothing computed (the read
//     limit of this design);
//   - agreement: on the first 1,000,000 rows, the streamed estimate against the in-memory path
//     (the same rows as .csv), largest relative difference of effect, SE and first stage.
// Prints figures; asserts nothing. BENCH_QUICK=1 (or BENCH_STREAM_ROWS, BENCH_STREAM_SUBSET) scales down.

import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';
import { peakResidentMB } from './peak-memory.ts';

const QUICK = process.env.BENCH_QUICK === '1';
const ROWS = Number(process.env.BENCH_STREAM_ROWS ?? (QUICK ? 200_000 : 20_000_000));
const SUBSET = Math.min(ROWS, Number(process.env.BENCH_STREAM_SUBSET ?? (QUICK ? 50_000 : 1_000_000)));
const TARGET_MB = 2048;
const COLUMNS = ['ID', 'INCOME', 'SIZE', 'AGE', 'REGION', 'RECEIVED', 'OUTCOME'];


interface Summary { estimate: number | null; se: number | null; fs: number | null; fsSe: number | null; n: number }
interface Measured { seconds: number; peakMB: number; detail: string; byDelta?: Summary[]; timings?: Record<string, number> }

async function child(kind: string, dir: string, file: string): Promise<void> {
  const { inventedStudy, streamed, inMemory, writeStudy } = await import('../stream/helpers.ts');
  const { openColumnar } = await import('../../main/data/columnar/duckdb-source.ts');
  const t = performance.now();
  let detail = '';
  let byDelta: Summary[] | undefined;
  let timings: Record<string, number> | undefined;
  const summarize = (r: { outcomes: Array<{ byDelta: Array<{ estimate: number | null; se: number | null; n: number; firstStage: { coef: number; se: number } | null }> }> }) =>
    r.outcomes[0]!.byDelta.map((b) => ({ estimate: b.estimate, se: b.se, fs: b.firstStage?.coef ?? null, fsSe: b.firstStage?.se ?? null, n: b.n }));
  if (kind === 'scan' || kind === 'read') {
    const opened = await openColumnar(join(dir, file));
    if (!opened.ok) throw new Error(opened.problems[0]!.message);
    const source = opened.value;
    if (kind === 'scan') detail = `sum ${(await source.scanOnly(COLUMNS.filter((c) => c !== 'REGION'))).toExponential(3)}`;
    else {
      let rows = 0;
      for await (const chunk of source.chunks(COLUMNS.map((name) => ({ name, as: name === 'ID' || name === 'REGION' ? 'text' as const : 'number' as const })))) rows += chunk.rows;
      detail = `${rows.toLocaleString('en-US')} rows`;
    }
    source.close();
  } else if (kind === 'memory') {
    const results = await inMemory(writeStudy(dir, 'memory.json', inventedStudy(file)));
    byDelta = summarize(results);
    detail = `${results.study.rowsUsed.toLocaleString('en-US')} units used`;
  } else {
    const run = await streamed(writeStudy(dir, `${kind}.json`, inventedStudy(file)), 262_144);
    if (!run.ok) throw new Error(run.problems[0]!.message);
    byDelta = summarize(run.value.results);
    timings = run.value.timings;
    detail = `${run.value.results.study.rowsUsed.toLocaleString('en-US')} units used`;
  }
  const seconds = (performance.now() - t) / 1000;
  process.stdout.write(JSON.stringify({ seconds, peakMB: peakResidentMB(), detail, ...(byDelta ? { byDelta } : {}), ...(timings ? { timings } : {}) } satisfies Measured) + '\n');
}

function measure(kind: string, dir: string, file: string): Measured {
  const r = spawnSync(process.execPath, ['--import', 'tsx', fileURLToPath(import.meta.url), '--child', kind, dir, file], { encoding: 'utf8', maxBuffer: 1 << 22 });
  if (r.status !== 0) throw new Error(`${kind} on ${file} failed:\n${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as Measured;
}

const rel = (a: number | null, b: number | null) => (a === null || b === null ? (a === b ? 0 : Infinity) : a === b ? 0 : Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b)));

async function main(): Promise<void> {
  const { duckdb, inventedRowsSql } = await import('../stream/helpers.ts');
  const keep = process.env.BENCH_STREAM_DIR;
  if (keep) mkdirSync(keep, { recursive: true });
  const dir = keep ?? mkdtempSync(join(tmpdir(), 'fenceline-stream-bench-'));
  try {
    const big = join(dir, 'rebate.parquet');
    let t = performance.now();
    if (!keep || !statSync(big, { throwIfNoEntry: false })) {
      await duckdb(`COPY (${inventedRowsSql(ROWS, 2026)}) TO '${big}' (FORMAT parquet)`);
    }
    await duckdb(
      `COPY (SELECT * FROM read_parquet('${big}') LIMIT ${SUBSET}) TO '${join(dir, 'subset.parquet')}' (FORMAT parquet)`,
      `COPY (SELECT * FROM read_parquet('${big}') LIMIT ${SUBSET}) TO '${join(dir, 'subset.csv')}' (FORMAT csv, HEADER)`,
    );
    console.log(`Streamed evaluate benchmark: ${ROWS.toLocaleString('en-US')} rows of invented data as Parquet (${(statSync(big).size / 1024 / 1024).toFixed(0)} MB, written by DuckDB in ${((performance.now() - t) / 1000).toFixed(1)} s), deltas 0.05, 0.1, 0.2, CR1 (97 clusters), one control`);
    t = performance.now();
    const scan = measure('scan', dir, 'rebate.parquet');
    console.log(`  comparator, DuckDB alone summing the ${COLUMNS.length - 1} numeric columns: ${scan.seconds.toFixed(2)} s, peak ${scan.peakMB.toFixed(0)} MB`);
    const read = measure('read', dir, 'rebate.parquet');
    console.log(`  comparator, DuckDB chunks read into typed columns (nothing computed): ${read.seconds.toFixed(2)} s, peak ${read.peakMB.toFixed(0)} MB (${read.detail})`);
    const full = measure('stream', dir, 'rebate.parquet');
    const stages = Object.entries(full.timings ?? {}).map(([k, ms]) => `${k} ${(ms / 1000).toFixed(1)} s`).join(', ');
    console.log(`  streamed evaluate: ${full.seconds.toFixed(1)} s (${(full.seconds / read.seconds).toFixed(1)}× the read limit, ${(full.seconds / scan.seconds).toFixed(1)}× DuckDB alone); stages: ${stages}`);
    console.log(`  peak resident memory ${full.peakMB.toFixed(0)} MB (target < ${TARGET_MB} MB: ${full.peakMB < TARGET_MB ? 'met' : 'MISSED'}); ${full.detail}`);
    full.byDelta?.forEach((b, k) => console.log(`    delta ${[0.05, 0.1, 0.2][k]}: n = ${b.n.toLocaleString('en-US')}, estimate ${b.estimate?.toFixed(3)} (SE ${b.se?.toFixed(3)}), first stage ${b.fs?.toFixed(4)}`));
    const sub = measure('subset', dir, 'subset.parquet');
    const mem = measure('memory', dir, 'subset.csv');
    let worst = 0;
    sub.byDelta!.forEach((b, k) => {
      const m = mem.byDelta![k]!;
      worst = Math.max(worst, rel(b.estimate, m.estimate), rel(b.se, m.se), rel(b.fs, m.fs), rel(b.fsSe, m.fsSe), b.n === m.n ? 0 : Infinity);
    });
    console.log(`  agreement on the first ${SUBSET.toLocaleString('en-US')} rows: largest relative difference streamed vs in-memory (effect, SE, first stage and its SE, 3 deltas) ${worst.toExponential(2)} (target ≤ 1e-9: ${worst <= 1e-9 ? 'met' : 'MISSED'})`);
    console.log(`    streamed ${sub.seconds.toFixed(1)} s, peak ${sub.peakMB.toFixed(0)} MB; in memory (.csv) ${mem.seconds.toFixed(1)} s, peak ${mem.peakMB.toFixed(0)} MB`);
    console.log(`  bench total ${((performance.now() - t) / 1000).toFixed(0)} s`);
  } finally {
    if (!keep) rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === '--child') await child(process.argv[3]!, process.argv[4]!, process.argv[5]!);
else await main();
