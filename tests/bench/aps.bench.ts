// Benchmark of the propensity stage (npm run bench). Prints figures and ratios; asserts nothing.
//
// Workload (invented): 1,000,000 synthetic households; a program with an income limit looked
// up by household size AND (oldest member aged 65 or more OR income per person at most 6,000);
// three deltas; draws = 4,000. Beside it, on a 50,000-unit subsample, the method as usually
// stated: `draws` pseudo-random points uniform in every unit's ball, the rule evaluated at each.
//
// Corner workload (invented): units crowded round the corner of "income at most 30,000 AND aged 65
// or more AND savings at most 20,000" (three continuous inputs, so d = 3): most balls are crossed
// by the income and age limits together (two criteria: exact corners in the disk marginal), some
// also by the savings limit (three: slices of the 3-ball marginal). The exact-corner path against
// the same units forced through the quasi-Monte Carlo simulation (`simulateAll`), one thread,
// time and accuracy in the same run. BENCH_CORNER_UNITS (BENCH_QUICK=1: 2,000) sets the size.

import { readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { computeApsBlock, METHOD_EXACT_CORNER, METHOD_SIMULATED, sliceColumns, type ApsColumns } from '../../main/design/aps.ts';
import { ballPointSet } from '../../main/design/ball-points.ts';
import { computePropensityParallel, defaultWorkerCount } from '../../main/design/parallel/pool.ts';
import { createRng } from '../../main/design/random.ts';
import { compileProgram } from '../../main/rules/compile.ts';
import { verdicts } from '../../main/rules/atoms.ts';
import type { DesignColumns } from '../../main/rules/ir.ts';
import { bruteForce } from './brute-force.ts';

const N = Number(process.env.BENCH_UNITS ?? 1_000_000);
const N_CORNER = Number(process.env.BENCH_CORNER_UNITS ?? (process.env.BENCH_QUICK === '1' ? 2_000 : 20_000));
const SUB = Math.min(N, Number(process.env.BENCH_BRUTE_UNITS ?? 50_000));
const DELTAS = [0.05, 0.1, 0.2];
const DRAWS = 4000;
const SEED = 1;

// the sample program's rule (sample-programs/winter-credit, invented): read, not restated
const program = JSON.parse(readFileSync(new URL('../../sample-programs/winter-credit/study.json', import.meta.url), 'utf8')).program;

function synthetic(n: number): DesignColumns {
  const rng = createRng(20261201, 1);
  const income = new Float64Array(n);
  const age = new Float64Array(n);
  const size = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = 1 + Math.min(5, Math.floor(-Math.log(1 - rng.next()) * 1.6));
    size[i] = s;
    // log-normal-ish income rising with size (Box–Muller normal)
    const g = Math.sqrt(-2 * Math.log(1 - rng.next())) * Math.cos(2 * Math.PI * rng.next());
    income[i] = Math.round(Math.exp(Math.log(16000 + 5000 * s) + 0.55 * g));
    age[i] = 18 + rng.next() * 72;
  }
  return { n, continuous: [income, age], discrete: [size] };
}

let peakRss = process.memoryUsage().rss;
const sampler = setInterval(() => { peakRss = Math.max(peakRss, process.memoryUsage().rss); }, 20);

const fmt = (x: number, digits = 2) => x.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: digits });

async function main() {
  const compiled = compileProgram(program);
  if (!compiled.ok) throw new Error(JSON.stringify(compiled.problems));
  const p = compiled.value;
  const t0 = performance.now();
  const cols = synthetic(N);
  const tData = performance.now() - t0;
  const workers = defaultWorkerCount();

  // ---- the compiled rule over whole columns (one thread)
  verdicts(p, sliceColumns(cols, 0, Math.min(N, 10000))); // warm-up
  const tv = performance.now();
  const v = verdicts(p, cols);
  const tVerdict = (performance.now() - tv) / 1000;
  const atomEvals = p.atoms.length * N;

  const t1 = performance.now();
  const res = await computePropensityParallel(p, cols, { deltas: DELTAS, draws: DRAWS, seed: SEED }, { workers });
  const tAps = (performance.now() - t1) / 1000;
  if (!res.ok) throw new Error(JSON.stringify(res.problems));
  const r = res.value;
  const scales = r.scales.map((s) => s.scale);

  console.log(`Fenceline propensity benchmark — ${fmt(N, 0)} invented units, deltas ${DELTAS.join(', ')}, draws ${DRAWS}, ${workers} workers (node ${process.version}, ${process.platform}/${process.arch})`);
  console.log(`  synthetic data: ${fmt(tData / 1000)} s`);
  console.log(`  rule verdicts at every unit's own inputs (one thread): ${fmt(tVerdict, 3)} s, ${fmt(atomEvals / tVerdict / 1e6, 1)} million criterion evaluations/s, ${fmt(N / tVerdict / 1e6, 1)} million units/s; eligible ${fmt((100 * v.eligible.reduce((a, b) => a + b, 0)) / N, 1)}%`);
  console.log(`  propensity stage: ${fmt(tAps)} s wall, ${fmt(N / tAps, 0)} units/s (${fmt((N * DELTAS.length) / tAps, 0)} unit-deltas/s)`);
  for (const s of r.summary) {
    console.log(`  delta ${s.delta}: constant ${fmt(s.constant, 0)}, exact ${fmt(s.exact, 0)}, simulated ${fmt(s.simulated, 0)} (${fmt((100 * s.simulated) / N, 3)}%), boundary ${fmt(s.boundary, 0)}, max stated error ${s.maxSe.toExponential(2)}; corner units ${fmt(s.corner, 0)} of which exact ${fmt(s.cornerExact, 0)}; refined ${fmt(s.refined, 0)}, still 0 or 1 after refinement ${fmt(s.refinedAtBound, 0)}`);
  }

  // ---- brute force on a subsample, single thread, and Fenceline on the same units single thread
  const sub = sliceColumns(cols, 0, SUB);
  const t2 = performance.now();
  const ours = computeApsBlock(p, sub, scales, r.settings, ballPointSet(p.continuous.length, DRAWS, SEED));
  const tOursSub = (performance.now() - t2) / 1000;
  const forced = computeApsBlock(p, sub, scales, r.settings, ballPointSet(p.continuous.length, DRAWS, SEED), { simulateAll: true });
  const t3 = performance.now();
  const brute = DELTAS.map((delta, k) => bruteForce(p, sub, scales, delta, DRAWS, SEED + k));
  const tBrute = (performance.now() - t3) / 1000;

  const maxErr = (est: (k: number, i: number) => number, base: ApsColumns) => {
    let worst = 0;
    for (let k = 0; k < DELTAS.length; k++) {
      for (let i = 0; i < SUB; i++) {
        if (base.method[k]![i] === METHOD_SIMULATED) continue; // exact value known only where not simulated
        worst = Math.max(worst, Math.abs(est(k, i) - base.aps[k]![i]!));
      }
    }
    return worst;
  };
  const errBrute = maxErr((k, i) => brute[k]![i]!, ours);
  const errForced = maxErr((k, i) => forced.aps[k]![i]!, ours);
  let maxDiffSim = 0;
  let simCount = 0;
  for (let k = 0; k < DELTAS.length; k++) for (let i = 0; i < SUB; i++) if (ours.method[k]![i] === METHOD_SIMULATED) {
    simCount++;
    maxDiffSim = Math.max(maxDiffSim, Math.abs(ours.aps[k]![i]! - brute[k]![i]!));
  }
  console.log(`  subsample of ${fmt(SUB, 0)} units, one thread:`);
  console.log(`    brute force (draws in every ball): ${fmt(tBrute)} s; Fenceline: ${fmt(tOursSub, 3)} s; speed ratio ${fmt(tBrute / tOursSub, 0)}×`);
  console.log(`    largest error against exact values (units not simulated): Fenceline 0 (closed form or exact corner; ${fmt(errForced, 4)} if forced to simulate), brute force ${fmt(errBrute, 4)}`);
  console.log(`    simulated units (non-linear criteria, or more than 3 directions): ${simCount} unit-deltas; largest |Fenceline − brute force| ${fmt(maxDiffSim, 4)}; Monte Carlo SD bound 0.5/√S = ${fmt(r.mcSdBound, 4)}`);
  cornerWorkload();
  clearInterval(sampler);
  const ru = process.resourceUsage();
  console.log(`  peak memory: ${fmt(Math.max(peakRss, ru.maxRSS * 1024) / 2 ** 20, 0)} MB resident (main thread + workers)`);
  const okSpeed = tBrute / tOursSub >= 50, okTime = tAps < 10, okMem = Math.max(peakRss, ru.maxRSS * 1024) < 500 * 2 ** 20;
  const okEval = atomEvals / tVerdict >= 1e7;
  console.log(`  targets: ≥50× brute force ${okSpeed ? 'met' : 'MISSED'}; ${fmt(N, 0)} × 3 deltas < 10 s ${okTime ? 'met' : 'MISSED'}; < 500 MB ${okMem ? 'met' : 'MISSED'}; error ≤ brute force ${errForced <= errBrute ? 'met' : 'MISSED'}; ≥ 10 million criterion evaluations/s ${okEval ? 'met' : 'MISSED'}`);
}

/** Units near the corner of two (sometimes three) linear limits: exact corners against simulation. */
function cornerWorkload(): void {
  const compiled = compileProgram({
    name: 'Corner benchmark program (invented)',
    variables: [
      { key: 'income', label: 'Income', type: 'continuous', column: 'INCOME', scale: 5000 },
      { key: 'age', label: 'Age', type: 'continuous', column: 'AGE', scale: 10 },
      { key: 'savings', label: 'Savings', type: 'continuous', column: 'SAVINGS', scale: 10000 },
    ],
    rule: { all: [
      { value: 'income', op: '<=', limit: 30000 },
      { value: 'age', op: '>=', limit: 65 },
      { value: 'savings', op: '<=', limit: 20000 },
    ] },
    offer: { ifEligible: 1, ifIneligible: 0 },
  });
  if (!compiled.ok) throw new Error(JSON.stringify(compiled.problems));
  const p = compiled.value;
  const deltas = [0.1, 0.2];
  const rng = createRng(20261202, 3);
  const n = N_CORNER;
  const income = new Float64Array(n), age = new Float64Array(n), savings = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    income[i] = 30000 + (rng.next() - 0.5) * 2 * 0.2 * 5000; // within the largest delta of both limits
    age[i] = 65 + (rng.next() - 0.5) * 2 * 0.2 * 10;
    savings[i] = rng.next() * 60000;
  }
  const cols: DesignColumns = { n, continuous: [income, age, savings], discrete: [] };
  const scales = [5000, 10, 10000];
  const settings = { deltas, draws: DRAWS, seed: SEED };
  const points = ballPointSet(3, DRAWS, SEED);
  computeApsBlock(p, sliceColumns(cols, 0, Math.min(n, 200)), scales, settings, points); // warm-up
  computeApsBlock(p, sliceColumns(cols, 0, Math.min(n, 200)), scales, settings, points, { simulateAll: true });
  const t0 = performance.now();
  const exact = computeApsBlock(p, cols, scales, settings, points);
  const tExact = (performance.now() - t0) / 1000;
  const t1 = performance.now();
  const sim = computeApsBlock(p, cols, scales, settings, points, { simulateAll: true });
  const tSim = (performance.now() - t1) / 1000;
  let corners2 = 0, corners3 = 0, maxErr = 0, sumSq = 0, count = 0, maxStated = 0, covered = 0;
  for (let k = 0; k < deltas.length; k++) {
    for (let i = 0; i < n; i++) {
      if (exact.method[k]![i] !== METHOD_EXACT_CORNER) continue;
      if (exact.straddle[k]![i] === 0b111) corners3++; else corners2++;
      const e = Math.abs(sim.aps[k]![i]! - exact.aps[k]![i]!);
      maxErr = Math.max(maxErr, e);
      sumSq += e * e;
      count++;
      if (e <= 3 * sim.se[k]![i]! + 1e-12) covered++;
      maxStated = Math.max(maxStated, exact.se[k]![i]!);
    }
  }
  console.log(`  corner workload: ${fmt(n, 0)} invented units round the corner of three linear limits (d = 3), deltas ${deltas.join(', ')}, draws ${DRAWS}, one thread`);
  console.log(`    exact corners: ${fmt(corners2, 0)} unit-deltas with two criteria crossing, ${fmt(corners3, 0)} with three`);
  console.log(`    exact-corner path ${fmt(tExact, 2)} s; the same units simulated ${fmt(tSim, 2)} s; ratio simulated / exact ${fmt(tSim / tExact, 2)}×`);
  console.log(`    simulation against the exact values: largest error ${fmt(maxErr, 4)}, root mean square ${(Math.sqrt(sumSq / Math.max(1, count))).toExponential(2)}, within 3 of its SEs ${fmt((100 * covered) / Math.max(1, count), 1)}%; largest stated error of the exact path ${maxStated.toExponential(1)}`);
}

main().catch((e) => { console.error(e); process.exit(1); });
