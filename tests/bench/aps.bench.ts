// Benchmark of the propensity stage (npm run bench). Prints figures and ratios; asserts nothing.
//
// Workload (invented): 1,000,000 synthetic households; a program with an income limit looked
// up by household size AND (oldest member aged 65 or more OR income per person at most 6,000);
// three deltas; draws = 4,000. Beside it, on a 50,000-unit subsample, the method as usually
// stated: `draws` pseudo-random points uniform in every unit's ball, the rule evaluated at each.

import { readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { computeApsBlock, METHOD_SIMULATED, sliceColumns, type ApsColumns } from '../../main/design/aps.ts';
import { ballPointSet, cubeDimension, cubeToBall } from '../../main/design/ball-points.ts';
import { computePropensityParallel, defaultWorkerCount } from '../../main/design/parallel/pool.ts';
import { createRng } from '../../main/design/random.ts';
import { compileProgram } from '../../main/rules/compile.ts';
import { compilePoint } from '../../main/rules/evaluate-scalar.ts';
import { holds, verdicts } from '../../main/rules/atoms.ts';
import { evalTree } from '../../main/rules/logic.ts';
import type { CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';

const N = Number(process.env.BENCH_UNITS ?? 1_000_000);
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

function bruteForce(p: CompiledProgram, cols: DesignColumns, scales: number[], delta: number, draws: number, seed: number): Float64Array {
  const d = p.continuous.length;
  const margins = p.atoms.map((a) => (a.kind === 'compare' ? compilePoint(a.margin) : null));
  const rng = createRng(seed, 99);
  const v = new Float64Array(cubeDimension(d));
  const z = new Float64Array(d);
  const x = new Float64Array(d);
  const dv = new Float64Array(p.discrete.length);
  const state = new Uint8Array(p.atoms.length);
  const out = new Float64Array(cols.n);
  for (let r = 0; r < cols.n; r++) {
    for (let j = 0; j < dv.length; j++) dv[j] = cols.discrete[j]![r]!;
    let sum = 0;
    for (let s = 0; s < draws; s++) {
      for (let j = 0; j < v.length; j++) v[j] = rng.next();
      cubeToBall(v, d, z, 0);
      for (let j = 0; j < d; j++) x[j] = cols.continuous[j]![r]! + delta * scales[j]! * z[j]!;
      p.atoms.forEach((a, i) => {
        if (a.kind === 'member') state[i] = a.members.has(dv[a.disc]!) ? 1 : 0;
        else state[i] = holds(margins[i]!(x, dv), a.op) ? 1 : 0;
      });
      sum += evalTree(p.tree, state) ? p.offer.ifEligible : p.offer.ifIneligible;
    }
    out[r] = sum / draws;
  }
  return out;
}

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
    console.log(`  delta ${s.delta}: constant ${fmt(s.constant, 0)}, exact ${fmt(s.exact, 0)}, simulated ${fmt(s.simulated, 0)} (${fmt((100 * s.simulated) / N, 3)}%), boundary ${fmt(s.boundary, 0)}, max simulation SE ${s.maxSe.toExponential(2)}`);
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
        if (base.method[k]![i] === METHOD_SIMULATED) continue; // exact value known only off corners
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
  console.log(`    largest error against exact values (units off corners): Fenceline 0 (closed form; ${fmt(errForced, 4)} if forced to simulate), brute force ${fmt(errBrute, 4)}`);
  console.log(`    corner units (no closed form): ${simCount} unit-deltas; largest |Fenceline − brute force| ${fmt(maxDiffSim, 4)}; Monte Carlo SD bound 0.5/√S = ${fmt(r.mcSdBound, 4)}`);
  clearInterval(sampler);
  const ru = process.resourceUsage();
  console.log(`  peak memory: ${fmt(Math.max(peakRss, ru.maxRSS * 1024) / 2 ** 20, 0)} MB resident (main thread + workers)`);
  const okSpeed = tBrute / tOursSub >= 50, okTime = tAps < 10, okMem = Math.max(peakRss, ru.maxRSS * 1024) < 500 * 2 ** 20;
  const okEval = atomEvals / tVerdict >= 1e7;
  console.log(`  targets: ≥50× brute force ${okSpeed ? 'met' : 'MISSED'}; ${fmt(N, 0)} × 3 deltas < 10 s ${okTime ? 'met' : 'MISSED'}; < 500 MB ${okMem ? 'met' : 'MISSED'}; error ≤ brute force ${errForced <= errBrute ? 'met' : 'MISSED'}; ≥ 10 million criterion evaluations/s ${okEval ? 'met' : 'MISSED'}`);
}

main().catch((e) => { console.error(e); process.exit(1); });
