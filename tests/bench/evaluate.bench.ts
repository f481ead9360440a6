// Benchmark of the whole evaluate (main/api evaluateStudy, no memo formats): read a 200,000-row
// CSV like the winter-credit sample, map the columns, compute the propensity scores at three
// deltas, estimate, run every design check, write results.json and units.csv.
// Targets: under 10 s; and at most 0.05× brute-force APS alone on the same units (4,000
// pseudo-random points in every unit's ball at each delta, the rule evaluated at each:
// tests/bench/brute-force.ts), the brute force timed on the first BENCH_BRUTE_UNITS units
// (default 20,000) on one thread and scaled linearly to all units (its cost is the same for
// every unit: draws × deltas rule evaluations).
// Prints figures; asserts nothing. BENCH_QUICK=1 (or BENCH_EVALUATE_ROWS, BENCH_BRUTE_UNITS) scales down.

import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { sliceColumns } from '../../main/design/aps.ts';
import { prepareDesign } from '../../main/design/propensity.ts';
import { prepareStudy } from '../../main/pipeline/prepare-study.ts';
import { validateStudy } from '../../main/studyfile/validate.ts';
import { singleFileStudy, writeSingleFileStudy } from '../serve/single-file-study.ts';
import { bruteForce } from './brute-force.ts';

const QUICK = process.env.BENCH_QUICK === '1';
const ROWS = Number(process.env.BENCH_EVALUATE_ROWS ?? (QUICK ? 20_000 : 200_000));
const BRUTE = Math.min(ROWS, Number(process.env.BENCH_BRUTE_UNITS ?? (QUICK ? 2_000 : 20_000)));
const TARGET_SECONDS = 10;
const TARGET_RATIO = 0.05;
const load = () => loadavg().map((l) => l.toFixed(2)).join(', ');

const dir = mkdtempSync(join(tmpdir(), 'fenceline-evaluate-bench-'));
try {
  // the winter-credit sample's rule on one CSV of invented households (shared with the job-worker tests)
  const studyPath = writeSingleFileStudy(dir, ROWS, 2026);
  const study = singleFileStudy();
  console.log(`Evaluate benchmark: ${ROWS.toLocaleString('en-US')} households (CSV ${(statSync(join(dir, 'applicants.csv')).size / 1024 / 1024).toFixed(1)} MB), deltas ${study.settings.deltas.join(', ')}, draws ${study.settings.draws}; load average ${load()}`);
  const t = performance.now();
  const r = await evaluateStudy({ studyPath, outDir: join(dir, 'out'), formats: [] });
  const seconds = (performance.now() - t) / 1000;
  if (!r.ok) throw new Error(r.error.problems.map((p) => p.message).join('\n'));
  const stages = Object.entries(r.value.timings).map(([k, ms]) => `${k} ${(ms / 1000).toFixed(2)} s`).join(', ');
  console.log(`  whole evaluate: ${seconds.toFixed(2)} s (target < ${TARGET_SECONDS} s: ${seconds < TARGET_SECONDS ? 'met' : 'MISSED'}); stages: ${stages}`);
  console.log(`  peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB (this process; worker threads included)`);
  const d = r.value.results.outcomes[0]!.byDelta[1]!;
  console.log(`  (sanity) delta ${d.delta}: n = ${d.n}, estimate ${d.estimate?.toFixed(1)}, 95% CI ${d.ci?.map((v) => v.toFixed(1)).join(' to ')}`);

  // The comparator: brute force on the same units as the pipeline prepared them, with the same scales.
  const valid = validateStudy(study);
  if (!valid.ok) throw new Error(JSON.stringify(valid.problems));
  const ready = await prepareStudy(valid.value, { baseDir: dir });
  if (!ready.ok) throw new Error(JSON.stringify(ready.problems));
  const { program, prepared } = ready.value;
  const settings = { deltas: study.settings.deltas, draws: study.settings.draws, seed: study.settings.seed };
  const design = prepareDesign(program, prepared.cols, settings);
  if (!design.ok) throw new Error(JSON.stringify(design.problems));
  const scales = design.value.scales.map((s) => s.scale);
  const sub = sliceColumns(prepared.cols, 0, BRUTE);
  const tb = performance.now();
  for (const [k, delta] of settings.deltas.entries()) bruteForce(program, sub, scales, delta, settings.draws, settings.seed + k);
  const bruteSub = (performance.now() - tb) / 1000;
  const bruteAll = (bruteSub * prepared.cols.n) / BRUTE;
  const ratio = seconds / bruteAll;
  console.log(`  brute-force APS alone (one thread): ${bruteSub.toFixed(2)} s on ${BRUTE.toLocaleString('en-US')} units × ${settings.deltas.length} deltas × ${settings.draws} draws, scaled linearly to the ${prepared.cols.n.toLocaleString('en-US')} units: ${bruteAll.toFixed(1)} s`);
  console.log(`  ratio whole evaluate / brute-force APS alone: ${ratio.toFixed(4)} (target ≤ ${TARGET_RATIO}: ${ratio <= TARGET_RATIO ? 'met' : 'MISSED'}; ratio to target ${(ratio / TARGET_RATIO).toFixed(2)})`);
  console.log(`  load average at the end: ${load()}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
