// npm run bench: every tests/bench/*.bench.ts in turn, each in its own Node process through tsx.
// The benchmarks print figures and ratios against their targets and assert nothing; this script
// only reports a benchmark that crashed (exit status 1 at the end). BENCH_QUICK=1 scales the
// workloads down (a smoke run); docs/benchmarks.md holds the figures of full runs.
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const benchDir = join(root, 'tests/bench');
const files = readdirSync(benchDir).filter((f) => f.endsWith('.bench.ts')).sort();

const env = { ...process.env };
if (env.BENCH_QUICK === '1') {
  // sizes the existing benchmarks read (each keeps its own default otherwise)
  env.BENCH_UNITS ??= '100000';
  env.BENCH_BRUTE_UNITS ??= '5000';
  env.BENCH_STORE_ROWS ??= '100000';
}

const failed = [];
for (const file of files) {
  process.stdout.write(`\n=== ${file} ===\n`);
  const started = Date.now();
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(benchDir, file)], { cwd: root, env, stdio: 'inherit' });
  const seconds = ((Date.now() - started) / 1000).toFixed(1);
  if (r.status !== 0) {
    failed.push(file);
    process.stdout.write(`--- ${file} did not finish (exit ${r.status ?? r.signal}) after ${seconds} s\n`);
  } else process.stdout.write(`--- ${file}: ${seconds} s\n`);
}
process.stdout.write(`\n${files.length - failed.length} of ${files.length} benchmarks ran to the end${failed.length ? `; did not finish: ${failed.join(', ')}` : ''}.\n`);
process.exit(failed.length ? 1 : 0);
