// Wild cluster bootstrap (WRE, Davidson & MacKinnon 2010) in main/estimate/wild-bootstrap.ts,
// checked against an independent brute-force loop that, for every draw, builds the bootstrap
// sample explicitly from restricted fits done with ols.ts and refits the 2SLS with tsls.ts (CR1):
// the p-values must be equal (they are counts over the same draws). Invented data.
import { describe, expect, it } from 'vitest';
import { estimateApsIv } from '../../main/estimate/aps-iv.ts';
import { factorOfferDesign, withVariance } from '../../main/estimate/offer-design.ts';
import { ols } from '../../main/estimate/ols.ts';
import { tsls } from '../../main/estimate/tsls.ts';
import type { NamedColumn } from '../../main/estimate/types.ts';
import { bootstrapWeights, prepareWildBootstrap, wildClusterBootstrap, type WildWeights } from '../../main/estimate/wild-bootstrap.ts';
import { subsetClusters } from '../../main/estimate/subset.ts';
import { column, rng } from './random.ts';

function data(seed: number, G: number, perCluster: number, beta: number) {
  const r = rng(seed);
  const n = G * perCluster;
  const cl = column(n, (i) => Math.floor(i / perCluster));
  const shock = Array.from({ length: G }, () => r.normal());
  const aps = column(n, () => 0.15 + 0.7 * r.uniform());
  const ctrl = column(n, () => r.normal());
  const z = column(n, (i) => (r.uniform() < aps[i]! ? 1 : 0));
  const u = column(n, (i) => shock[cl[i]!]! + r.normal());
  const d = column(n, (i) => (r.uniform() < 0.1 + 0.5 * z[i]! + 0.2 * (u[i]! > 0 ? 1 : 0) ? 1 : 0));
  const y = column(n, (i) => 1 + beta * d[i]! + 0.5 * aps[i]! + 0.3 * ctrl[i]! + u[i]! * (1 + aps[i]!));
  return { n, cl, aps, ctrl, z, d, y };
}

function designOf(x: ReturnType<typeof data>) {
  const idx = Int32Array.from({ length: x.n }, (_, i) => i);
  const clusters = subsetClusters({ codes: Int32Array.from(x.cl), count: Math.max(...x.cl) + 1 }, idx);
  return withVariance(factorOfferDesign({ name: 'Z', values: x.z }, [{ name: 'APS', values: x.aps }, { name: 'C', values: x.ctrl }]), clusters);
}

/** The obviously-correct loop: restricted fits by OLS, explicit bootstrap samples, 2SLS refits. */
function bruteForceP(x: ReturnType<typeof data>, beta0: number, w: Float64Array, reps: number, G: number): number {
  const W: NamedColumn[] = [{ name: 'APS', values: x.aps }, { name: 'C', values: x.ctrl }];
  const Z: NamedColumn = { name: 'Z', values: x.z };
  const opts = { clusters: Array.from(x.cl), variance: 'CR1' as const };
  const tstat = (y: Float64Array, d: Float64Array) => {
    const fit = tsls({ outcome: { name: 'Y', values: y }, endogenous: [{ name: 'D', values: d }], instruments: [Z], controls: W }, opts);
    const b = fit.coefficients.find((c) => c.name === 'D')!;
    return (b.estimate - beta0) / b.se;
  };
  const tHat = tstat(x.y, x.d);
  // 1. restricted structural: (y − β0 D) on W
  const yr = column(x.n, (i) => x.y[i]! - beta0 * x.d[i]!);
  const rs = ols({ name: 'yr', values: yr }, W);
  const uT = rs.residuals;
  // 2. efficient first stage: D on [W, Z, ũ]; ṽ = D − Zπ̃ − Wδ̃ (the ũ term stays in ṽ)
  const fs = ols({ name: 'D', values: x.d }, [...W, Z, { name: 'u', values: uT }]);
  const coef = (name: string) => fs.coefficients.find((c) => c.name === name)!.estimate;
  const dHat = column(x.n, (i) => coef('(intercept)') + coef('APS') * x.aps[i]! + coef('C') * x.ctrl[i]! + coef('Z') * x.z[i]!);
  const vT = column(x.n, (i) => x.d[i]! - dHat[i]!);
  let exceed = 0;
  for (let b = 0; b < reps; b++) {
    const wi = (i: number) => w[b * G + x.cl[i]!]!;
    const dStar = column(x.n, (i) => dHat[i]! + wi(i) * vT[i]!);
    const yStar = column(x.n, (i) => beta0 * dStar[i]! + (yr[i]! - uT[i]!) + wi(i) * uT[i]!);
    if (Math.abs(tstat(yStar, dStar)) >= Math.abs(tHat) * (1 - 1e-9)) exceed++;
  }
  return exceed / reps;
}

describe('wild cluster bootstrap (WRE)', () => {
  const cases: Array<{ G: number; kind: WildWeights; reps: number }> = [
    { G: 8, kind: 'webb', reps: 199 },
    { G: 14, kind: 'rademacher', reps: 199 },
    { G: 7, kind: 'rademacher', reps: 199 }, // 2^7 = 128 ≤ 199: enumerated
  ];
  for (const { G, kind, reps } of cases) {
    it(`p-values equal a brute-force refit loop (G = ${G}, ${kind})`, () => {
      const x = data(100 + G, G, 25, 0.4);
      const boot = prepareWildBootstrap({ design: designOf(x), y: x.y, d: x.d, seed: 7, reps, weights: kind });
      const w = bootstrapWeights(G, reps, kind, 7);
      expect(boot.reps).toBe(w.reps);
      for (const beta0 of [0, 0.4, boot.estimate + 1.5 * boot.se, -2]) {
        expect(Math.abs(boot.pValue(beta0) - bruteForceP(x, beta0, w.w, w.reps, G))).toBeLessThan(1e-10);
      }
    });
  }

  it('the offer’s own effect (take-up = the offer): p-values equal the brute-force loop', () => {
    const x = data(77, 9, 20, 0.3);
    const y = x.y;
    const asOffer = { ...x, d: x.z, y };
    const boot = prepareWildBootstrap({ design: designOf(asOffer), y, d: x.z, seed: 11, reps: 199 });
    const w = bootstrapWeights(9, 199, 'webb', 11);
    for (const beta0 of [0, boot.estimate - 2 * boot.se]) {
      expect(Math.abs(boot.pValue(beta0) - bruteForceP(asOffer, beta0, w.w, w.reps, 9))).toBeLessThan(1e-10);
    }
  });

  it('wired into the headline estimator: at the asked delta with fewer than 50 clusters only', () => {
    const x = data(8, 20, 30, 0.2);
    const base = {
      outcomes: [{ column: 'Y', values: x.y }],
      offer: { name: 'Z', values: x.z },
      treatment: { name: 'D', values: x.d },
      propensity: { deltas: [0.1, 0.2], aps: [x.aps, x.aps] },
      controls: [{ name: 'C', values: x.ctrl }],
      clusters: x.cl,
    };
    const est = estimateApsIv({ ...base, wildBootstrap: { deltaIndex: 1, seed: 5, reps: 499 } }).outcomes[0]!;
    expect(est.byDelta[0]!.wildBootstrap).toBeNull();
    const wb = est.byDelta[1]!.wildBootstrap!;
    expect(wb).toEqual(wildClusterBootstrap({ design: designOf(x), y: x.y, d: x.d, seed: 5, reps: 499 }));
    expect(wb.weights).toBe('rademacher');
    expect(est.byDelta[1]!.clusters).toBe(20);
    expect(estimateApsIv(base).outcomes[0]!.byDelta[1]!.wildBootstrap).toBeNull();
    const many = data(9, 60, 10, 0.2);
    const est60 = estimateApsIv({ ...base, outcomes: [{ column: 'Y', values: many.y }], offer: { name: 'Z', values: many.z }, treatment: { name: 'D', values: many.d }, propensity: { deltas: [0.1], aps: [many.aps] }, controls: [], clusters: many.cl, wildBootstrap: { deltaIndex: 0, seed: 5 } });
    expect(est60.outcomes[0]!.byDelta[0]!.clusters).toBe(60);
    expect(est60.outcomes[0]!.byDelta[0]!.wildBootstrap).toBeNull();
  });

  it('estimate and se equal tsls.ts with CR1; p(β̂) = 1; same seed, same result', () => {
    const x = data(5, 10, 30, 0);
    const design = designOf(x);
    const boot = prepareWildBootstrap({ design, y: x.y, d: x.d, seed: 3, reps: 999 });
    const fit = tsls({ outcome: { name: 'Y', values: x.y }, endogenous: [{ name: 'D', values: x.d }], instruments: [{ name: 'Z', values: x.z }], controls: [{ name: 'APS', values: x.aps }, { name: 'C', values: x.ctrl }] }, { clusters: Array.from(x.cl) });
    const b = fit.coefficients.find((c) => c.name === 'D')!;
    expect(boot.estimate).toBeCloseTo(b.estimate, 10);
    expect(boot.se).toBeCloseTo(b.se, 10);
    expect(boot.weights).toBe('webb');
    expect(boot.pValue(boot.estimate)).toBe(1);
    const a = wildClusterBootstrap({ design, y: x.y, d: x.d, seed: 3, reps: 999 });
    const again = wildClusterBootstrap({ design, y: x.y, d: x.d, seed: 3, reps: 999 });
    expect(again).toEqual(a);
    // the interval contains the estimate, and its ends are where p crosses 0.05
    expect(a.ci[0]!).toBeLessThan(boot.estimate);
    expect(a.ci[1]!).toBeGreaterThan(boot.estimate);
    expect(boot.pValue(a.ci[0]! - 1e-3 * boot.se)).toBeLessThanOrEqual(0.05);
    expect(boot.pValue(a.ci[1]! + 1e-3 * boot.se)).toBeLessThanOrEqual(0.05);
    expect(boot.pValue(a.ci[1]! - 1e-3 * boot.se)).toBeGreaterThan(0.05);
  });

  it('Rademacher with 2^G ≤ reps enumerates every sign vector once', () => {
    const w = bootstrapWeights(3, 9999, 'rademacher', 1);
    expect(w.enumerated).toBe(true);
    expect(w.reps).toBe(8);
    const rows = new Set(Array.from({ length: 8 }, (_, b) => Array.from(w.w.slice(b * 3, b * 3 + 3)).join(',')));
    expect(rows.size).toBe(8);
    const drawn = bootstrapWeights(20, 500, 'webb', 1);
    expect(drawn.enumerated).toBe(false);
    expect(new Set(drawn.w).size).toBe(6);
  });
});
