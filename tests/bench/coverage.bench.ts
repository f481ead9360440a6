// Coverage of the APS estimator's 95% interval over many replications of the invented studies in
// tests/estimate/simulations.ts (run: npx tsx tests/bench/coverage.bench.ts; REPLICATIONS=…).
// Prints, per process, the coverage, the mean estimate against the truth, and the naive OLS and
// IV-without-APS means for comparison. Asserts nothing (the 50-replication version with
// assertions is tests/estimate/simulation.test.ts). Seeds 10001… differ from the test's.

import { performance } from 'node:perf_hooks';
import { coverage, DGPS } from '../estimate/simulations.ts';

const R = Math.max(200, Number(process.env.REPLICATIONS ?? 200));
console.log(`Coverage of the 95% interval, ${R} replications per process`);
let covered = 0;
for (const dgp of DGPS) {
  const t0 = performance.now();
  const c = coverage(dgp, R, 10001);
  covered += c.covered;
  const mcse = c.sdEstimate / Math.sqrt(R);
  console.log(`${dgp.name}`);
  console.log(
    `  truth ${dgp.truth.toFixed(4)}  mean APS estimate ${c.meanEstimate.toFixed(4)} (MC s.e. ${mcse.toFixed(4)}, sd ${c.sdEstimate.toFixed(4)})` +
      `  naive OLS ${c.meanNaive.toFixed(4)}  IV without APS ${c.meanIvNoControl.toFixed(4)}  boundary units ≈ ${c.meanN.toFixed(0)}`,
  );
  console.log(`  coverage ${c.covered}/${R} = ${((100 * c.covered) / R).toFixed(1)}%   (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
}
console.log(`Pooled coverage ${covered}/${R * DGPS.length} = ${((100 * covered) / (R * DGPS.length)).toFixed(1)}% (target 92–98%)`);
