// Local-linear cross-check and the Imbens–Kalyanaraman (2012) bandwidth (main/estimate/
// local-linear.ts). Checked here:
//   - IK behaviour: on average the bandwidth is near the infeasible AMSE-optimal bandwidth
//     h* = C_K·[(σ²₋ + σ²₊)/(f(c)·(m''₊ − m''₋)²)]^(1/5)·N^(−1/5) computed from the known design
//     (IK 2012, the optimal-bandwidth expression their plug-in estimates; C_K from memory), and it
//     is wider when the conditional means are straight lines;
//   - exact equivariance implied by the formula: h(a·X) = a·h(X) and h is unchanged by Y → b·Y
//     (a, b powers of two so that the rescaling is exact in floating point);
//   - the sharp estimate recovers a known jump (linear sides: no smoothing bias); the fuzzy
//     estimate is exactly the ratio of the outcome and take-up jumps (indirect least squares;
//     Imbens & Lemieux 2008, §4.3); the kernel-weighted fit equals an explicit weighted least
//     squares computed with ml-matrix;
//   - beside the APS estimate on the same 1-D design, the two agree within their noise.
import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { computePropensity } from '../../main/design/propensity.ts';
import { estimateApsIv } from '../../main/estimate/aps-iv.ts';
import { ikBandwidth, IK_KERNEL_CONSTANT, localLinear, singleCutoff } from '../../main/estimate/local-linear.ts';
import { tCritical, twoSidedTP } from '../../main/estimate/student-t.ts';
import { verdicts } from '../../main/rules/atoms.ts';
import { compile, cont, disc } from '../design/helpers.ts';
import { column, rng } from './random.ts';

/** X ~ U(−1, 1) (f(0) = 1/2), m₋(x) = −x², m₊(x) = 1 + x + x² (m''₊ − m''₋ = 4), σ = 1. */
function quadraticDesign(seed: number, n: number) {
  const r = rng(seed);
  const x = column(n, () => -1 + 2 * r.uniform());
  const above = Uint8Array.from(x, (v) => (v >= 0 ? 1 : 0));
  const y = column(n, (i) => (x[i]! >= 0 ? 1 + x[i]! + x[i]! ** 2 : -(x[i]! ** 2)) + r.normal());
  return { x, y, above };
}
const hStar = (n: number) => IK_KERNEL_CONSTANT * Math.pow((1 + 1) / (0.5 * 16), 1 / 5) * Math.pow(n, -1 / 5);

describe('Imbens–Kalyanaraman bandwidth', () => {
  it('is near the AMSE-optimal bandwidth of the known design (mean over 8 seeded samples of N = 40,000)', () => {
    const reps = 8;
    let sum = 0;
    for (let s = 0; s < reps; s++) {
      const d = quadraticDesign(100 + s, 40000);
      sum += ikBandwidth(d.x, d.y, 0, d.above).h / hStar(40000);
    }
    // The curvature estimates are noisy (a few percent of h per sample); the regularization
    // terms pull h slightly below h*.
    expect(sum / reps).toBeGreaterThan(0.9);
    expect(sum / reps).toBeLessThan(1.03);
  });

  it('the intermediate estimates are near the design’s values (f(0) = 0.5, σ² = 1, m′′ = ∓2)', () => {
    const d = quadraticDesign(3, 40000);
    const ik = ikBandwidth(d.x, d.y, 0, d.above);
    expect(ik.density).toBeGreaterThan(0.45);
    expect(ik.density).toBeLessThan(0.55);
    expect(ik.varianceBelow).toBeGreaterThan(0.9);
    expect(ik.varianceAbove).toBeLessThan(1.1);
    expect(ik.secondDerivativeAbove - ik.secondDerivativeBelow).toBeGreaterThan(3.2);
    expect(ik.secondDerivativeAbove - ik.secondDerivativeBelow).toBeLessThan(4.8);
    expect(ik.regularizationAbove).toBeGreaterThan(0);
  });

  it('is equivariant: h(X/4) = h(X)/4, and h(X, 8·Y) = h(X, Y) (while the 0.01 floor on m‴² does not bind)', () => {
    const d = quadraticDesign(4, 5000);
    const ik = ikBandwidth(d.x, d.y, 0, d.above);
    const h = ik.h;
    expect(ik.thirdDerivative ** 2).toBeGreaterThan(0.01);
    expect(ikBandwidth(d.x.map((v) => v / 4), d.y, 0, d.above).h / (h / 4)).toBeCloseTo(1, 9);
    expect(ikBandwidth(d.x, d.y.map((v) => 8 * v), 0, d.above).h / h).toBeCloseTo(1, 9);
  });

  it('is wider when the two sides are straight lines (curvature only from noise and regularization)', () => {
    const r = rng(5);
    const n = 20000;
    const x = column(n, () => -1 + 2 * r.uniform());
    const above = Uint8Array.from(x, (v) => (v >= 0 ? 1 : 0));
    const yLinear = column(n, (i) => above[i]! + 0.5 * x[i]! + r.normal());
    const curved = quadraticDesign(6, n);
    expect(ikBandwidth(x, yLinear, 0, above).h).toBeGreaterThan(1.5 * ikBandwidth(curved.x, curved.y, 0, curved.above).h);
  });
});

describe('local-linear estimate', () => {
  it('sharp design with straight sides: recovers the jump of 1 within 3 SE', () => {
    const r = rng(7);
    const n = 8000;
    const x = column(n, () => -1 + 2 * r.uniform());
    const z = x.map((v) => (v < 0 ? 1 : 0)); // offered below the cut-off (e.g. income ≤ limit)
    const y = column(n, (i) => 2 + z[i]! - 0.7 * x[i]! + r.normal());
    const ll = localLinear({ running: x, cutoff: 0, outcome: y, offer: z });
    expect(ll.bandwidthSource).toBe('IK 2012');
    expect(Math.abs(ll.estimate - 1)).toBeLessThan(3 * ll.se);
    expect(ll.takeUpJump).toBeNull();
  });

  it('kernel-weighted fit = explicit weighted least squares (ml-matrix), jump = difference of the side intercepts', () => {
    const r = rng(8);
    const n = 600;
    const x = column(n, () => -1 + 2 * r.uniform());
    const z = x.map((v) => (v >= 0 ? 1 : 0));
    const y = column(n, (i) => z[i]! * 0.5 + x[i]! + r.normal());
    const h = 0.6;
    const ll = localLinear({ running: x, cutoff: 0, outcome: y, offer: z, bandwidth: h });
    const rows = [...Array(n).keys()].filter((i) => Math.abs(x[i]!) < h);
    const X = new Matrix(rows.map((i) => [1, z[i]!, x[i]!, z[i]! * x[i]!]));
    const W = Matrix.diag(rows.map((i) => 1 - Math.abs(x[i]!) / h));
    const Y = Matrix.columnVector(rows.map((i) => y[i]!));
    const beta = inverse(X.transpose().mmul(W).mmul(X)).mmul(X.transpose().mmul(W).mmul(Y));
    expect(ll.estimate).toBeCloseTo(beta.get(1, 0), 10);
    // HC1 sandwich of the weighted fit: (X'WX)⁻¹ X'W diag(e²) W X (X'WX)⁻¹ · N/(N−K).
    const e = Y.sub(X.mmul(beta)).to1DArray();
    const bread = inverse(X.transpose().mmul(W).mmul(X));
    const meat = X.transpose().mmul(Matrix.diag(rows.map((i, j) => (1 - Math.abs(x[i]!) / h) ** 2 * e[j]! ** 2))).mmul(X);
    const v = bread.mmul(meat).mmul(bread).mul(rows.length / (rows.length - 4));
    expect(ll.se / Math.sqrt(v.get(1, 1))).toBeCloseTo(1, 9);
  });

  it('with clusters: CR1, the cluster count within the bandwidth, and t(G − 1) intervals (Cameron, Gelbach & Miller 2008)', () => {
    const r = rng(81);
    const n = 800;
    const x = column(n, () => -1 + 2 * r.uniform());
    const z = x.map((v) => (v >= 0 ? 1 : 0));
    const y = column(n, (i) => z[i]! * 0.5 + x[i]! + r.normal());
    const g = Array.from({ length: n }, (_, i) => i % 9);
    const ll = localLinear({ running: x, cutoff: 0, outcome: y, offer: z, bandwidth: 0.6, clusters: g });
    expect(ll.clusters).toBe(9);
    const c = tCritical(0.95, 8);
    expect(ll.ci[1] - ll.estimate).toBeCloseTo(c * ll.se, 10);
    expect(ll.p).toBeCloseTo(twoSidedTP(ll.estimate / ll.se, 8), 12);
    expect(localLinear({ running: x, cutoff: 0, outcome: y, offer: z, bandwidth: 0.6 }).clusters).toBeNull();
  });

  it('fuzzy design: estimate = outcome jump / take-up jump exactly', () => {
    const r = rng(9);
    const n = 6000;
    const x = column(n, () => -1 + 2 * r.uniform());
    const z = x.map((v) => (v >= 0 ? 1 : 0));
    const u = column(n, () => r.normal());
    const d = column(n, (i) => (-0.5 + 1.5 * z[i]! + u[i]! > 0 ? 1 : 0));
    const y = column(n, (i) => 2 * d[i]! + 0.5 * x[i]! + u[i]! + r.normal());
    const ll = localLinear({ running: x, cutoff: 0, outcome: y, offer: z, treatment: d });
    expect(ll.estimate).toBeCloseTo(ll.outcomeJump.coef / ll.takeUpJump!.coef, 12);
    expect(Math.abs(ll.estimate - 2)).toBeLessThan(3 * ll.se);
  });

  it('agrees with the APS estimate on the same one-cut-off study within their noise', () => {
    const program = compile([cont('x', 1)], { value: 'x', op: '<=', limit: 0 });
    expect(singleCutoff(program)).toEqual({ applicable: true, variable: 0, key: 'x', cutoff: 0, op: '<=' });
    const r = rng(10);
    const n = 20000;
    const x = column(n, () => -2 + 4 * r.uniform());
    const cols = { n, continuous: [x], discrete: [] };
    const z = Float64Array.from(verdicts(program, cols).eligible);
    const u = column(n, () => r.normal());
    const d = column(n, (i) => (-0.5 + 1.5 * z[i]! + u[i]! > 0 ? 1 : 0));
    const y = column(n, (i) => 1 + 2 * d[i]! + 0.8 * x[i]! + u[i]! + r.normal());
    const ps = computePropensity(program, cols, { deltas: [0.25], draws: 64, seed: 1 });
    if (!ps.ok) throw new Error('propensity failed');
    const aps = estimateApsIv({ outcomes: [{ column: 'Y', values: y }], offer: { name: 'Z', values: z }, treatment: { name: 'D', values: d }, propensity: ps.value }).outcomes[0]!.byDelta[0]!;
    const ll = localLinear({ running: x, cutoff: 0, outcome: y, offer: z, treatment: d });
    expect(Math.abs(aps.estimate! - ll.estimate)).toBeLessThan(3 * Math.hypot(aps.se!, ll.se));
  });

  it('applies only to one continuous variable with one deterministic fixed cut-off', () => {
    expect(singleCutoff(compile([cont('x', 1)], { value: 'x', op: '<=', limit: 0 }, { ifEligible: 0.5, ifIneligible: 0 }))).toMatchObject({ applicable: false, reason: expect.stringMatching(/lottery/) });
    expect(singleCutoff(compile([cont('x', 1), cont('a', 1)], { value: 'x', op: '<=', limit: 0 }))).toMatchObject({ applicable: false });
    expect(
      singleCutoff(compile([cont('x', 1), disc('s')], { value: 'x', op: '<=', limit: { by: 's', table: { '1': 1, '2': 2 } } })),
    ).toMatchObject({ applicable: false, reason: expect.stringMatching(/fixed number/) });
  });

  it('too few units within the bandwidth is an error in words', () => {
    const x = Float64Array.from([-0.9, -0.5, 0.01, 0.5, 0.9]);
    expect(() => localLinear({ running: x, cutoff: 0, outcome: x, offer: x.map((v) => (v >= 0 ? 1 : 0)), bandwidth: 0.1 })).toThrow(
      /needs at least 3 on each side/,
    );
  });
});
