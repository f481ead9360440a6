// Wild cluster bootstrap (main/estimate/wild-bootstrap.ts; Davidson & MacKinnon 2010 WRE):
// (1) size with 12 clusters — the rejection rate of a true null H0: β = 0 at 5% over many
//     invented studies, beside the CR1 Wald test with normal and with t(G − 1) critical values
//     (Cameron, Gelbach & Miller 2008 document the over-rejection of the first); target 3–8%;
// (2) speed — the full bootstrap (p-value and test-inversion interval, 9,999 draws, 24 clusters)
//     against the headline estimator on the same units, as a ratio.
// Run: npx tsx tests/bench/wild-bootstrap.bench.ts (BENCH_QUICK=1: 100 studies, 100,000 units).
// Prints figures; asserts nothing. Seeds are fixed, so the figures repeat exactly.

import { performance } from 'node:perf_hooks';
import { estimateApsIv } from '../../main/estimate/aps-iv.ts';
import { factorOfferDesign, withVariance } from '../../main/estimate/offer-design.ts';
import { tCritical } from '../../main/estimate/student-t.ts';
import { subsetClusters } from '../../main/estimate/subset.ts';
import { prepareWildBootstrap, wildClusterBootstrap } from '../../main/estimate/wild-bootstrap.ts';
import { rng } from '../estimate/random.ts';

const QUICK = process.env.BENCH_QUICK === '1';
const STUDIES = Number(process.env.BENCH_WILD_STUDIES ?? (QUICK ? 100 : 1000));
const G = 12;

/** One invented study: G clusters of unequal size (10–150 units), APS on (0.1, 0.9), a binary
 * offer drawn with the APS, take-up driven by the offer and by a cluster-correlated trait that
 * also moves the outcome (so OLS would be biased), heteroskedastic errors, and an effect that
 * differs by cluster around a mean of 0 (the null is true on average over clusters; the
 * cluster-specific effects make the 2SLS scores correlated within clusters, which is what
 * clustering must handle). */
function study(seed: number, g: number, scale = 1) {
  const r = rng(seed);
  const sizes = Array.from({ length: g }, () => Math.round(scale * (10 + 140 * r.uniform() ** 2)));
  const n = sizes.reduce((a, b) => a + b, 0);
  const aps = new Float64Array(n);
  const z = new Float64Array(n);
  const d = new Float64Array(n);
  const y = new Float64Array(n);
  const cl = new Int32Array(n);
  let i = 0;
  sizes.forEach((size, c) => {
    const shock = r.normal();
    const slope = 0.5 * r.normal();
    const effect = r.normal();
    for (let j = 0; j < size; j++, i++) {
      const p = 0.1 + 0.8 * r.uniform();
      const u = shock + r.normal();
      aps[i] = p;
      z[i] = r.uniform() < p ? 1 : 0;
      d[i] = -0.6 + 1.4 * z[i]! + 0.5 * u + r.normal() > 0 ? 1 : 0;
      y[i] = effect * d[i]! + p + slope * (p - 0.5) + u * (0.5 + p);
      cl[i] = c;
    }
  });
  return { n, aps, z, d, y, cl };
}

function designOf(s: ReturnType<typeof study>) {
  const idx = Int32Array.from({ length: s.n }, (_, i) => i);
  const clusters = subsetClusters({ codes: s.cl, count: s.cl[s.n - 1]! + 1 }, idx);
  return withVariance(factorOfferDesign({ name: 'Z', values: s.z }, [{ name: 'APS', values: s.aps }]), clusters);
}

// (1) size
let rejectBoot = 0;
let rejectNormal = 0;
let rejectT = 0;
const tCrit = tCritical(0.95, G - 1);
let t0 = performance.now();
for (let k = 0; k < STUDIES; k++) {
  const s = study(900001 + k, G);
  const boot = prepareWildBootstrap({ design: designOf(s), y: s.y, d: s.d, seed: k + 1 });
  if (boot.pValue(0) <= 0.05) rejectBoot++;
  const t = Math.abs(boot.estimate / boot.se);
  if (t > 1.959963984540054) rejectNormal++;
  if (t > tCrit) rejectT++;
}
const pct = (x: number) => `${((100 * x) / STUDIES).toFixed(1)}%`;
const mcse = Math.sqrt((0.05 * 0.95) / STUDIES);
console.log(`Size at 5%, ${G} clusters, ${STUDIES} invented studies with a true effect of 0 (Monte Carlo s.e. ≈ ${(100 * mcse).toFixed(1)} points):`);
console.log(`  wild cluster bootstrap (WRE, Rademacher, all 2^${G} = ${2 ** G} sign vectors): ${pct(rejectBoot)}   target 3–8%`);
console.log(`  CR1 Wald with normal critical values: ${pct(rejectNormal)}`);
console.log(`  CR1 Wald with t(${G - 1}) critical values: ${pct(rejectT)}`);
console.log(`  (${((performance.now() - t0) / 1000).toFixed(1)} s)`);

// (2) speed: 24 clusters, sampled draws (2^24 > 9,999), p-value and interval, against the headline estimator
const units = Number(process.env.BENCH_UNITS ?? 1_000_000);
const big = study(424242, 24, units / (24 * 50));
t0 = performance.now();
const est = estimateApsIv({
  outcomes: [{ column: 'Y', values: big.y }],
  offer: { name: 'Z', values: big.z },
  treatment: { name: 'D', values: big.d },
  propensity: { deltas: [0.1], aps: [big.aps] },
  clusters: big.cl,
});
const tEst = performance.now() - t0;
t0 = performance.now();
const full = wildClusterBootstrap({ design: designOf(big), y: big.y, d: big.d, seed: 1 });
const tBoot = performance.now() - t0;
t0 = performance.now();
const boot = prepareWildBootstrap({ design: designOf(big), y: big.y, d: big.d, seed: 1 });
const tPrep = performance.now() - t0;
t0 = performance.now();
const evals = 20;
for (let k = 0; k < evals; k++) boot.pValue(k * 0.01);
const tEval = (performance.now() - t0) / evals;
console.log(`\nSpeed, ${big.n.toLocaleString('en')} units in 24 clusters, ${full.reps} draws (${full.weights}):`);
console.log(`  headline estimator (no bootstrap): ${(tEst / 1000).toFixed(2)} s; estimate ${est.outcomes[0]!.byDelta[0]!.estimate!.toFixed(4)}`);
console.log(`  bootstrap p-value and interval: ${(tBoot / 1000).toFixed(2)} s (${(tBoot / tEst).toFixed(2)}× the headline estimator); p = ${full.p.toFixed(4)}, interval [${full.ci.map((v) => (v === null ? '∞' : v.toFixed(4))).join(', ')}]`);
console.log(`  of which: per-cluster sums (one pass over the units, factorization included) ${(tPrep / 1000).toFixed(2)} s; one p-value over ${full.reps} draws ${tEval.toFixed(1)} ms`);
