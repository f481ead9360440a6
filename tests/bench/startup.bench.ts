// Benchmark of the command line's start (scripts/launch.mjs running the bundles of
// scripts/build-node.mjs). Prints figures and ratios against the targets; asserts nothing.
//
//   comparator:   node -e 1 (Node's own start, on this machine, in this run)
//   cli --help:   node scripts/launch.mjs cli --help — what `npm run cli -- --help` runs, without
//                 npm's own start (shown apart: npm run --silent cli -- --help)
//                 target ≤ 8× node -e 1
//   cli check:    node scripts/launch.mjs cli check sample-programs/apprentice-voucher/study.json
//                 (an invented workbook of 16,000 rows) — target ≤ 1 s; its ratio to node -e 1 shown too
//   before:       the same two through tsx from the sources (how `npm run cli` started until now)
//
// The bundles are brought up to date first (a rebuild is not part of any figure). Each command
// runs REPEAT times, interleaved with the others, and the median wall time is kept.
// BENCH_QUICK=1 runs each 3 times instead of 9.

import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { ensureNodeBundles } from '../../scripts/build-node.mjs';

const ROOT = join(import.meta.dirname, '..', '..');
const REPEAT = Number(process.env.BENCH_STARTUP_REPEAT ?? (process.env.BENCH_QUICK === '1' ? 3 : 9));
const TARGET_HELP_RATIO = 8;
const TARGET_CHECK_SECONDS = 1;
const STUDY = 'sample-programs/apprentice-voucher/study.json';
const node = process.execPath;

const COMMANDS: Array<{ key: string; label: string; cmd: string; args: string[] }> = [
  { key: 'node', label: 'node -e 1', cmd: node, args: ['-e', '1'] },
  { key: 'help', label: 'cli --help (node scripts/launch.mjs)', cmd: node, args: ['scripts/launch.mjs', 'cli', '--help'] },
  { key: 'check', label: 'cli check (node scripts/launch.mjs)', cmd: node, args: ['scripts/launch.mjs', 'cli', 'check', STUDY, '--quiet'] },
  { key: 'npmHelp', label: 'npm run --silent cli -- --help', cmd: 'npm', args: ['run', '--silent', 'cli', '--', '--help'] },
  { key: 'tsxHelp', label: 'before: tsx main/cli.ts --help', cmd: node, args: ['--import', 'tsx', 'main/cli.ts', '--help'] },
  { key: 'tsxCheck', label: 'before: tsx main/cli.ts check', cmd: node, args: ['--import', 'tsx', 'main/cli.ts', 'check', STUDY, '--quiet'] },
];

function timeOnce(cmd: string, args: string[]): number {
  const t = performance.now();
  const r = spawnSync(cmd, args, { cwd: ROOT, stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' });
  const seconds = (performance.now() - t) / 1000;
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed (exit ${r.status}): ${r.stderr}`);
  return seconds;
}

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s[Math.floor(s.length / 2)]!; };

const rebuilt = await ensureNodeBundles({ quiet: true });
console.log(`bundles ${rebuilt ? 'rebuilt before timing' : 'up to date'}; ${REPEAT} runs of each, interleaved, median kept`);
for (const c of COMMANDS) timeOnce(c.cmd, c.args); // warm the file cache
const times = new Map<string, number[]>(COMMANDS.map((c) => [c.key, []]));
for (let i = 0; i < REPEAT; i++) for (const c of COMMANDS) times.get(c.key)!.push(timeOnce(c.cmd, c.args));
const med = new Map([...times].map(([k, v]) => [k, median(v)]));
const base = med.get('node')!;

const fmt = (s: number) => `${s.toFixed(3)} s`;
for (const c of COMMANDS) {
  const s = med.get(c.key)!;
  console.log(`${c.label.padEnd(40)} ${fmt(s).padStart(9)}   ${(s / base).toFixed(1).padStart(5)}× node -e 1`);
}
const help = med.get('help')! / base;
const check = med.get('check')!;
console.log(`\ncli --help: ${help.toFixed(1)}× node -e 1 (target ≤ ${TARGET_HELP_RATIO}×; ratio to target ${(help / TARGET_HELP_RATIO).toFixed(2)})`);
console.log(`cli check: ${fmt(check)} (target ≤ ${TARGET_CHECK_SECONDS} s; ratio to target ${(check / TARGET_CHECK_SECONDS).toFixed(2)}; ${(check / base).toFixed(1)}× node -e 1)`);
console.log(`against tsx from the sources: --help ${(med.get('tsxHelp')! / med.get('help')!).toFixed(1)}× faster, check ${(med.get('tsxCheck')! / check).toFixed(1)}× faster`);
