// Complier share and complier means (main/estimate/compliers.ts). Checks:
//   - the reported share IS the first stage of the headline specification (aps-iv.ts), and the
//     complier mean IS the 2SLS coefficient of W·D on D instrumented by Z with the APS (and
//     controls) as controls, computed independently by tsls.ts, with the same HC1/CR1 SE
//     (Angrist & Pischke 2009, "Mostly Harmless Econometrics", §4.4.4);
//   - a simulation near a deterministic cut-off with a known truth where the complier share and
//     the compliers' mean vary with the running variable (invented data): the estimates recover
//     the values at the cut-off, where Abadie's κ with the APS as π does not;
//   - a pure stratified lottery with known probabilities (invented data), where κ (Abadie 2003) is
//     valid too: the 2SLS and κ complier means agree within sampling error and both recover the truth;
//   - exact κ identities and input handling.
import { describe, expect, it } from 'vitest';
import { estimateApsIv } from '../../main/estimate/aps-iv.ts';
import { abadieKappa, complierProfiles } from '../../main/estimate/compliers.ts';
import { EstimateInputError } from '../../main/estimate/errors.ts';
import { tsls } from '../../main/estimate/tsls.ts';
import { column, rng } from './random.ts';

/** 1-D cut-off at 0, x ~ U(−1, 1), Z = 1(x ≥ 0); APS on a ball of radius δ in one dimension is
 * (x + δ)/(2δ) clipped to [0, 1] (closed-form geometry, docs/method.md §1, d = 1). Near x: 20%
 * always-takers, compliers 0.5 + 0.4x, the rest never-takers; W = 10 + 20·complier + 5x + noise,
 * so at the cut-off the complier share is 0.5 and the compliers' mean of W is 30. */
function cutoffData(seed: number, n: number, delta: number) {
  const r = rng(seed);
  const x = column(n, () => 2 * r.uniform() - 1);
  const z = column(n, (i) => (x[i]! >= 0 ? 1 : 0));
  const aps = column(n, (i) => Math.min(1, Math.max(0, (x[i]! + delta) / (2 * delta))));
  const type = column(n, (i) => {
    const u = r.uniform();
    return u < 0.2 ? 0 : u < 0.2 + 0.5 + 0.4 * x[i]! ? 2 : 1; // 0 always, 1 never, 2 complier
  });
  const d = column(n, (i) => (type[i] === 0 ? 1 : type[i] === 1 ? 0 : z[i]!));
  const w = column(n, (i) => 10 + (type[i] === 2 ? 20 : 0) + 5 * x[i]! + r.normal());
  const cl = column(n, (i) => Math.floor(((x[i]! + 1) / 2) * 40) % 17);
  return { x, z, aps, d, w, cl };
}

describe('complier share and means by 2SLS (default)', () => {
  it('share = the headline first stage; complier mean = 2SLS of W·D on D by tsls.ts (HC1 and CR1)', () => {
    const s = cutoffData(1, 20000, 0.1);
    const ctrl = column(s.x.length, (i) => Math.sin(7 * i));
    for (const clusters of [undefined, Array.from(s.cl)]) {
      const prof = complierProfiles({ covariates: [{ name: 'W', values: s.w }], offer: s.z, treatment: s.d, propensity: { deltas: [0.1], aps: [s.aps] }, controls: [{ name: 'C', values: ctrl }], ...(clusters ? { clusters } : {}) })[0]!;
      const head = estimateApsIv({ outcomes: [{ column: 'W', values: s.w }], offer: { name: 'Z', values: s.z }, treatment: { name: 'D', values: s.d }, propensity: { deltas: [0.1], aps: [s.aps] }, controls: [{ name: 'C', values: ctrl }], ...(clusters ? { clusters } : {}) }).outcomes[0]!.byDelta[0]!;
      expect(prof.method).toBe('2SLS');
      expect(prof.complierShare!.coef).toBeCloseTo(head.firstStage!.coef, 12);
      expect(prof.complierShare!.se).toBeCloseTo(head.firstStage!.se, 12);
      expect(prof.clusters).toBe(head.clusters);
      const b = Array.from(s.aps.keys()).filter((i) => s.aps[i]! > 0 && s.aps[i]! < 1);
      const pick = (v: Float64Array) => Float64Array.from(b, (i) => v[i]!);
      const fit = tsls(
        { outcome: { name: 'WD', values: Float64Array.from(b, (i) => s.w[i]! * s.d[i]!) }, endogenous: [{ name: 'D', values: pick(s.d) }], instruments: [{ name: 'Z', values: pick(s.z) }], controls: [{ name: 'APS', values: pick(s.aps) }, { name: 'C', values: pick(ctrl) }] },
        clusters ? { clusters: b.map((i) => clusters[i]!) } : {},
      );
      const coef = fit.coefficients.find((c) => c.name === 'D')!;
      expect(prof.rows[0]!.compliers!.coef).toBeCloseTo(coef.estimate, 10);
      expect(prof.rows[0]!.compliers!.se).toBeCloseTo(coef.se, 10);
      expect(prof.rows[0]!.n).toBe(b.length);
    }
  });

  it('known truth near a cut-off: share 0.5 and compliers’ mean 30 at the edge; κ with π = APS is off', () => {
    const delta = 0.05;
    const s = cutoffData(2, 400000, delta);
    const prof = complierProfiles({ covariates: [{ name: 'W', values: s.w }], offer: s.z, treatment: s.d, propensity: { deltas: [delta], aps: [s.aps] } })[0]!;
    const share = prof.complierShare!;
    const mean = prof.rows[0]!.compliers!;
    expect(Math.abs(share.coef - 0.5)).toBeLessThan(4 * share.se + 0.01);
    expect(Math.abs(mean.coef - 30)).toBeLessThan(4 * mean.se + 0.2);
    expect(prof.rows[0]!.boundary!).toBeCloseTo(20, 0);
    // the method error this replaces: mean κ with the APS as π is far from the complier share.
    // In the band the APS a is uniform on (0, 1) and Z = 1(a ≥ ½), so E[κ] = 1 − 0.2·∫₀^½ da/(1 − a)
    // − 0.3·∫_½^1 da/a = 1 − 0.5·ln 2 ≈ 0.653, not 0.5 (closed form).
    let sk = 0;
    let m = 0;
    for (let i = 0; i < s.x.length; i++)
      if (s.aps[i]! > 0 && s.aps[i]! < 1) {
        sk += abadieKappa(s.d[i]!, s.z[i]!, s.aps[i]!);
        m++;
      }
    expect(Math.abs(sk / m - (1 - 0.5 * Math.LN2))).toBeLessThan(0.02);
  });

  it('without a treatment column every unit complies: share 1 with SE 0', () => {
    const s = cutoffData(3, 5000, 0.2);
    const prof = complierProfiles({ covariates: [{ name: 'W', values: s.w }], offer: s.z, propensity: { deltas: [0.2], aps: [s.aps] } })[0]!;
    expect(prof.complierShare!.coef).toBeCloseTo(1, 12);
    expect(prof.complierShare!.se).toBeLessThan(1e-10);
  });
});

describe('κ where the offer probability is known (a pure stratified lottery)', () => {
  /** Three strata with lottery probabilities 0.3, 0.5, 0.7 (the APS is that probability); complier
   * share 0.5 and complier mean of W = 30 in every stratum, so the estimator's weighting does not
   * change the target and both methods must agree. */
  function lottery(seed: number, n: number) {
    const r = rng(seed);
    const aps = column(n, () => [0.3, 0.5, 0.7][Math.floor(3 * r.uniform())]!);
    const z = column(n, (i) => (r.uniform() < aps[i]! ? 1 : 0));
    const type = column(n, () => {
      const u = r.uniform();
      return u < 0.2 ? 0 : u < 0.5 ? 1 : 2;
    });
    const d = column(n, (i) => (type[i] === 0 ? 1 : type[i] === 1 ? 0 : z[i]!));
    const w = column(n, (i) => [10, 20, 30][type[i]!]! + 3 * aps[i]! - 1.5 + r.normal());
    return { aps, z, d, w };
  }

  it('2SLS and κ complier means agree and recover the truth (30); shares ≈ 0.5', () => {
    const s = lottery(4, 120000);
    const args = { covariates: [{ name: 'W', values: s.w }], offer: s.z, treatment: s.d, propensity: { deltas: [0.1], aps: [s.aps] } };
    const two = complierProfiles(args)[0]!;
    const kap = complierProfiles({ ...args, assignmentKnown: [true] })[0]!;
    expect(kap.method).toBe('kappa');
    const a = two.rows[0]!.compliers!;
    const b = kap.rows[0]!.compliers!;
    expect(Math.abs(a.coef - b.coef)).toBeLessThan(2 * Math.max(a.se, b.se));
    expect(Math.abs(a.coef - 30)).toBeLessThan(4 * a.se);
    expect(Math.abs(b.coef - 30)).toBeLessThan(4 * b.se);
    expect(Math.abs(two.complierShare!.coef - 0.5)).toBeLessThan(4 * two.complierShare!.se);
    expect(Math.abs(kap.complierShare!.coef - 0.5)).toBeLessThan(4 * kap.complierShare!.se);
    // standard errors of the same order (both are √n-consistent for the same quantity)
    expect(b.se / a.se).toBeGreaterThan(0.5);
    expect(b.se / a.se).toBeLessThan(2);
  });

  it('mean κ equals the first-stage difference when π is the offered share (exact)', () => {
    const r = rng(1);
    const n = 1000;
    const z = column(n, () => (r.uniform() < 0.3 ? 1 : 0));
    const d = column(n, (i) => (r.uniform() < 0.15 + 0.6 * z[i]! ? 1 : 0));
    let n1 = 0;
    let d1 = 0;
    let d0 = 0;
    for (let i = 0; i < n; i++) z[i] ? (n1++, (d1 += d[i]!)) : (d0 += d[i]!);
    const aps = new Float64Array(n).fill(n1 / n);
    const args = { covariates: [], offer: z, treatment: d, propensity: { deltas: [0.1], aps: [aps] } };
    const kap = complierProfiles({ ...args, assignmentKnown: [true] })[0]!;
    expect(kap.complierShare!.coef).toBeCloseTo(d1 / n1 - d0 / (n - n1), 12);
    // with a constant APS (dropped as collinear) the first stage is that same difference
    expect(complierProfiles(args)[0]!.complierShare!.coef).toBeCloseTo(d1 / n1 - d0 / (n - n1), 12);
  });
});

describe('κ formula and input handling', () => {
  it('κ formula', () => {
    expect(abadieKappa(1, 0, 0.25)).toBeCloseTo(1 - 1 / 0.75, 15);
    expect(abadieKappa(0, 1, 0.25)).toBeCloseTo(1 - 1 / 0.25, 15);
    expect(abadieKappa(1, 1, 0.25)).toBe(1);
  });

  it('take-up recorded as an amount is refused with a message; no boundary units is a warning', () => {
    const z = Float64Array.from([0, 1, 1]);
    expect(() => complierProfiles({ covariates: [], offer: z, treatment: Float64Array.from([0, 250, 1]), propensity: { deltas: [0.1], aps: [Float64Array.from([0.5, 0.5, 0.5])] } })).toThrow(EstimateInputError);
    const none = complierProfiles({ covariates: [], offer: z, propensity: { deltas: [0.05], aps: [Float64Array.from([0, 1, 1])] } })[0]!;
    expect(none.warnings[0]!.message).toBe("No units sit near the formula's edge at delta 0.05: try a larger delta or check the scales.");
    expect(none.complierShare).toBeNull();
  });
});
