// Benchmark of the estimation stage (run: npx tsx tests/bench/estimate.bench.ts). Prints figures
// and the ratio to the 2-second target of issue 3 (§7); asserts nothing.
//
// Workload (invented): 1,000,000 units, all near the formula's edge (0 < APS < 1: the worst case
// for the estimation sample), a binary offer drawn with the APS, partial take-up, one outcome,
// 1,000 clusters and 10 pre-determined covariates. "Full estimation" = the headline estimator
// (first stage, reduced form, 2SLS, first-stage F, tF, Anderson–Rubin set, naive OLS and IV without
// the APS over all units) plus the balance checks on the 10 covariates (rows and the joint Wald
// test): once with HC1, once with CR1, and both in one run sharing the factorizations (the design
// does not depend on the variance convention).

import { performance } from 'node:perf_hooks';
import { estimateApsIv } from '../../main/estimate/aps-iv.ts';
import { balanceChecks } from '../../main/estimate/balance.ts';
import { createDesignCache, type DesignCache } from '../../main/estimate/offer-design.ts';
import { rng } from '../estimate/random.ts';

const N = Number(process.env.BENCH_UNITS ?? 1_000_000);
const TARGET_SECONDS = 2;
const COVARIATES = 10;

function synthetic(n: number) {
  const r = rng(20260101);
  const aps = new Float64Array(n);
  const z = new Float64Array(n);
  const d = new Float64Array(n);
  const y = new Float64Array(n);
  const clusters = new Float64Array(n);
  const covariates = Array.from({ length: COVARIATES }, (_, j) => ({ name: `COVARIATE_${j + 1}`, values: new Float64Array(n) }));
  for (let i = 0; i < n; i++) {
    const p = 0.02 + 0.96 * r.uniform();
    aps[i] = p;
    z[i] = r.uniform() < p ? 1 : 0;
    const u = r.normal();
    d[i] = -0.5 + 1.5 * z[i]! + u > 0 ? 1 : 0;
    y[i] = 1 + 2 * d[i]! + p + u + r.normal();
    clusters[i] = i % 1000;
    for (let j = 0; j < COVARIATES; j++) covariates[j]!.values[i] = j + p + r.normal();
  }
  return { aps, z, d, y, clusters, covariates };
}

function time<T>(label: string, f: () => T): { seconds: number; value: T } {
  const t0 = performance.now();
  const value = f();
  const seconds = (performance.now() - t0) / 1000;
  console.log(`  ${label.padEnd(46)} ${seconds.toFixed(3)} s`);
  return { seconds, value };
}

console.log(`Estimation benchmark: ${N.toLocaleString('en-US')} units, all with 0 < APS < 1, ${COVARIATES} covariates, 1,000 clusters`);
const data = time('generate data (not counted)', () => synthetic(N)).value;
const propensity = { deltas: [0.1], aps: [data.aps] };
const base = {
  outcomes: [{ column: 'OUTCOME', values: data.y }],
  offer: { name: 'OFFERED', values: data.z },
  treatment: { name: 'RECEIVED', values: data.d },
  propensity,
};
function run(label: string, cache: () => DesignCache, variances: Array<'HC1' | 'CR1'>): number {
  console.log(label);
  let total = 0;
  const shared = cache();
  for (const v of variances) {
    const clusters = v === 'CR1' ? { clusters: data.clusters } : {};
    const head = time(`headline estimator, ${v}`, () => estimateApsIv({ ...base, ...clusters, cache: shared }));
    const bal = time(`balance on ${COVARIATES} covariates, ${v}`, () => balanceChecks({ covariates: data.covariates, offer: base.offer, propensity, ...clusters, cache: shared }));
    total += head.seconds + bal.seconds;
    const b = head.value.outcomes[0]!.byDelta[0]!;
    console.log(`    check: n = ${b.n}, estimate ${b.estimate!.toFixed(4)} (truth 2), se ${b.se!.toFixed(4)}, F ${b.firstStage!.F.toFixed(0)}, AR ${JSON.stringify(b.arCi!.map((iv) => iv.map((x) => x?.toFixed(4))))}, joint balance p ${bal.value.joint[0]!.p!.toFixed(3)}`);
  }
  console.log(`  total ${total.toFixed(3)} s; target ${TARGET_SECONDS} s; ratio ${(total / TARGET_SECONDS).toFixed(2)} (below 1 meets the target)`);
  return total;
}

run('Full estimation with HC1 (headline and balance share one factorization):', createDesignCache, ['HC1']);
run('Full estimation with CR1 (headline and balance share one factorization):', createDesignCache, ['CR1']);
run('Full estimation with HC1 and then CR1, one cache for both:', createDesignCache, ['HC1', 'CR1']);
