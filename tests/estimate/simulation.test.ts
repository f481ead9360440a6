// Simulations with a known true effect (invented, seeded data-generating processes in
// simulations.ts): the propensity stage (main/design, modest draws) feeds the APS estimator,
// and over 50 replications per process
//   - the APS estimate recovers the truth: its mean is within 3 Monte Carlo standard errors;
//   - the naive OLS does not: its mean is more than 5 Monte Carlo standard errors away (take-up
//     is driven by an unobserved trait that also moves the outcome);
//   - the 95% interval covers the truth: at least 44 of 50 per process (below that has
//     probability ≈ 1% for a correctly calibrated 95% interval: Binomial(50, 0.95) lower tail),
//     and 92–98% of the 200 replications pooled over the four processes.
// The 200-replication-per-process version is tests/bench/coverage.bench.ts (prints coverage).
import { describe, expect, it } from 'vitest';
import { coverage, DGPS, type CoverageSummary } from './simulations.ts';

const R = 50;
const results: CoverageSummary[] = [];

describe(`APS estimator on simulated studies with a known effect (${R} replications each)`, () => {
  for (const dgp of DGPS) {
    it(`${dgp.name}: recovers the truth (${dgp.truth.toFixed(4)}), naive OLS does not, interval covers`, () => {
      const c = coverage(dgp, R, 1);
      results.push(c);
      const mcse = c.sdEstimate / Math.sqrt(R);
      expect(Math.abs(c.meanEstimate - dgp.truth)).toBeLessThan(3 * mcse);
      expect(Math.abs(c.meanNaive - dgp.truth)).toBeGreaterThan(5 * Math.max(mcse, c.sdNaive / Math.sqrt(R)));
      expect(c.covered).toBeGreaterThanOrEqual(44);
      expect(c.meanN).toBeGreaterThan(400);
      // Process B has balls crossing both criteria (corners); both are linear, so their APS is
      // exact (design/corners.ts) and nothing is simulated.
      expect(c.withCorners > 0).toBe(dgp.name.startsWith('B'));
      expect(c.withAllCornersExact).toBe(c.withCorners);
      expect(c.withSimulatedAps).toBe(0);
    });
  }

  it('pooled coverage of the 95% interval is between 92% and 98%', () => {
    expect(results.length).toBe(DGPS.length);
    const covered = results.reduce((a, c) => a + c.covered, 0);
    const total = results.reduce((a, c) => a + c.replications, 0);
    expect(covered / total).toBeGreaterThanOrEqual(0.92);
    expect(covered / total).toBeLessThanOrEqual(0.98);
  });
});
