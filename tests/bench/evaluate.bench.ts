// Benchmark of the whole evaluate (main/api evaluateStudy, no memo formats): read a
// 100,000-row CSV like the winter-credit sample, map the columns, compute the propensity
// scores at three deltas, estimate, run every design check, write results.json and units.csv.
// Target: under 10 s. Prints figures; asserts nothing. BENCH_QUICK=1 (or BENCH_EVALUATE_ROWS) scales down.

import { mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { winterCreditRows } from '../../main/data/synthetic/winter-credit.ts';

const ROWS = Number(process.env.BENCH_EVALUATE_ROWS ?? (process.env.BENCH_QUICK === '1' ? 20_000 : 100_000));
const TARGET_SECONDS = 10;

const study = {
  fenceline: 1,
  title: 'Winter energy credit, benchmark (invented data)',
  program: {
    name: 'Winter Energy Credit (invented example)',
    unit: 'household',
    variables: [
      { key: 'income', label: 'Annual household income', type: 'continuous', unit: 'USD', column: 'HH_INCOME', scale: 10000 },
      { key: 'size', label: 'People in household', type: 'discrete', column: 'HH_SIZE' },
      { key: 'age', label: 'Age of oldest member', type: 'continuous', unit: 'years', column: 'AGE_MAX', scale: 10 },
    ],
    rule: {
      all: [
        { value: 'income', op: '<=', limit: { by: 'size', table: { '1': 21000, '2': 28000, '3': 35000 }, else: '35000 + 7000 * (size - 3)' } },
        { any: [{ value: 'age', op: '>=', limit: 65 }, { value: 'income / size', op: '<=', limit: 6000 }] },
      ],
    },
    offer: { ifEligible: 1, ifIneligible: 0 },
  },
  data: { path: 'applicants.csv' },
  columns: {
    id: 'APPLICANT_ID',
    outcomes: [{ column: 'ARREARS_MARCH', label: 'Utility arrears in March (USD)' }],
    treatment: 'RECEIVED',
    decision: 'OFFERED',
    cluster: 'OFFICE',
    covariates: ['ARREARS_PRIOR', 'RENTER'],
  },
  settings: { deltas: [0.05, 0.1, 0.2], draws: 4000, seed: 1 },
};

const dir = mkdtempSync(join(tmpdir(), 'fenceline-evaluate-bench-'));
try {
  const rows = winterCreditRows(ROWS, 2026);
  const header = Object.keys(rows[0]!) as Array<keyof (typeof rows)[number]>;
  const csv = [header.join(','), ...rows.map((r) => header.map((h) => String(r[h])).join(','))].join('\r\n') + '\r\n';
  writeFileSync(join(dir, 'applicants.csv'), csv);
  writeFileSync(join(dir, 'study.json'), JSON.stringify(study, null, 2));
  console.log(`Evaluate benchmark: ${ROWS.toLocaleString('en-US')} households (CSV ${(statSync(join(dir, 'applicants.csv')).size / 1024 / 1024).toFixed(1)} MB), deltas ${study.settings.deltas.join(', ')}, draws ${study.settings.draws}`);
  const t = performance.now();
  const r = await evaluateStudy({ studyPath: join(dir, 'study.json'), outDir: join(dir, 'out'), formats: [] });
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
