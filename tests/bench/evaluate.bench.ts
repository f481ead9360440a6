// Benchmark of the whole evaluate (main/api evaluateStudy, no memo formats): read a
// 100,000-row CSV like the winter-credit sample, map the columns, compute the propensity
// scores at three deltas, estimate, run every design check, write results.json and units.csv.
// Target: under 10 s. Prints figures; asserts nothing. BENCH_QUICK=1 (or BENCH_EVALUATE_ROWS) scales down.

import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { singleFileStudy, writeSingleFileStudy } from '../serve/single-file-study.ts';

const ROWS = Number(process.env.BENCH_EVALUATE_ROWS ?? (process.env.BENCH_QUICK === '1' ? 20_000 : 100_000));
const TARGET_SECONDS = 10;

const dir = mkdtempSync(join(tmpdir(), 'fenceline-evaluate-bench-'));
try {
  // the winter-credit sample's rule on one CSV of invented households (shared with the job-worker tests)
  const studyPath = writeSingleFileStudy(dir, ROWS, 2026);
  const study = singleFileStudy();
  console.log(`Evaluate benchmark: ${ROWS.toLocaleString('en-US')} households (CSV ${(statSync(join(dir, 'applicants.csv')).size / 1024 / 1024).toFixed(1)} MB), deltas ${study.settings.deltas.join(', ')}, draws ${study.settings.draws}`);
  const t = performance.now();
  const r = await evaluateStudy({ studyPath, outDir: join(dir, 'out'), formats: [] });
  const seconds = (performance.now() - t) / 1000;
  if (!r.ok) throw new Error(r.error.problems.map((p) => p.message).join('\n'));
  const stages = Object.entries(r.value.timings).map(([k, ms]) => `${k} ${(ms / 1000).toFixed(2)} s`).join(', ');
  console.log(`  whole evaluate: ${seconds.toFixed(2)} s (target < ${TARGET_SECONDS} s: ${seconds < TARGET_SECONDS ? 'met' : 'MISSED'}); stages: ${stages}`);
  console.log(`  peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB (this process; worker threads included)`);
  const d = r.value.results.outcomes[0]!.byDelta[1]!;
  console.log(`  (sanity) delta ${d.delta}: n = ${d.n}, estimate ${d.estimate?.toFixed(1)}, 95% CI ${d.ci?.map((v) => v.toFixed(1)).join(' to ')}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
