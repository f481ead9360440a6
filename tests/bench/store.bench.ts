// Benchmark of the workspace file (main/store). Prints figures and ratios; asserts nothing.
//
// Workload (invented): 1,000,000 rows x 20 f64 columns (pseudo-random numbers, ~3% NaN), one
// i32 column and one text ID column. Times the import, then a cold reopen of the file and a
// full load of the dataset, against the 1 s target for reopen + load.

import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { openWorkspace } from '../../main/store/workspace.ts';
import type { DatasetColumnInput } from '../../main/store/types.ts';
import { createRng } from '../../main/design/random.ts';

const ROWS = Number(process.env.BENCH_STORE_ROWS ?? 1_000_000);
const F64_COLUMNS = 20;
const TARGET_SECONDS = 1;

/** Cheap reproducible filler: the project's seeded generator (main/design/random.ts), 32 bits a draw. */
function filler(seed: number): () => number {
  const rng = createRng(seed);
  return () => rng.nextUint32() / 4294967296;
}

function makeColumns(): { rowNumbers: Int32Array; columns: DatasetColumnInput[] } {
  const next = filler(20250301);
  const rowNumbers = new Int32Array(ROWS);
  for (let i = 0; i < ROWS; i++) rowNumbers[i] = i + 2; // row 1 holds the headers
  const columns: DatasetColumnInput[] = [];
  for (let c = 0; c < F64_COLUMNS; c++) {
    const v = new Float64Array(ROWS);
    for (let i = 0; i < ROWS; i++) v[i] = next() < 0.03 ? Number.NaN : next() * 100_000;
    columns.push({ name: `X${c + 1}`, kind: 'f64', values: v });
  }
  const size = new Int32Array(ROWS);
  for (let i = 0; i < ROWS; i++) size[i] = 1 + Math.floor(next() * 8);
  columns.push({ name: 'HH_SIZE', kind: 'i32', values: size });
  const ids: string[] = new Array<string>(ROWS);
  for (let i = 0; i < ROWS; i++) ids[i] = `A-${(1_000_000 + i).toString(36).toUpperCase()}`;
  columns.push({ name: 'APPLICANT_ID', kind: 'text', values: ids });
  return { rowNumbers, columns };
}

function must<T>(r: { ok: true; value: T } | { ok: false; problems: Array<{ message: string }> }): T {
  if (!r.ok) throw new Error(r.problems.map((p) => p.message).join('\n'));
  return r.value;
}

const dir = mkdtempSync(join(tmpdir(), 'fenceline-store-bench-'));
const file = join(dir, 'bench.fenceline');
try {
  const data = makeColumns();

  let t = performance.now();
  const ws = must(openWorkspace(file));
  const id = must(ws.importDataset({
    sourceName: 'bench.xlsx', sheet: 'Applicants', sha256: 'ab'.repeat(32), importedAt: new Date().toISOString(), ...data,
  }));
  ws.close();
  const importSeconds = (performance.now() - t) / 1000;
  const mb = statSync(file).size / 1e6;

  const loads: number[] = [];
  const gc = (globalThis as { gc?: () => void }).gc;
  for (let rep = 0; rep < 3; rep++) {
    gc?.(); // with --expose-gc: start each load without the previous one's garbage
    t = performance.now();
    const again = must(openWorkspace(file));
    const loaded = must(again.loadDataset(id));
    loads.push((performance.now() - t) / 1000);
    if (loaded.rowNumbers.length !== ROWS || loaded.columns.length !== F64_COLUMNS + 2) throw new Error('benchmark load came back with the wrong shape');
    again.close();
  }
  const best = Math.min(...loads);
  const worst = Math.max(...loads);
  const ratio = (x: number): string => (x / TARGET_SECONDS).toFixed(2);

  console.log(`store benchmark: ${ROWS.toLocaleString('en-US')} rows x ${F64_COLUMNS} f64 + 1 i32 + 1 text column`);
  console.log(`  import (open, write, close):  ${importSeconds.toFixed(2)} s`);
  console.log(`  file size:                    ${mb.toFixed(1)} MB`);
  console.log(`  reopen + load, 3 times:       ${loads.map((x) => x.toFixed(3)).join(' s, ')} s`);
  console.log(`  ratio to the ${TARGET_SECONDS} s target:       best ${ratio(best)}, worst ${ratio(worst)}`);
  console.log('  (the file was just written, so the operating system has it cached; a cold disk adds read time)');
} finally {
  rmSync(dir, { recursive: true, force: true });
}
