// Cross-check for the simplest design: one running variable, one deterministic cut-off. The
// classic regression-discontinuity estimate beside the APS estimate (they target the same
// effect at the cut-off, so they should agree within their noise):
//   - local-linear fits on each side with the triangular kernel K(u) = max(0, 1 − |u|/h)
//     (Hahn, Todd & Van der Klaauw 2001, Econometrica 69:201–209; Imbens & Lemieux 2008,
//     J. Econometrics 142:615–635, §4);
//   - the jump in the outcome at the cut-off, and for a fuzzy design (take-up not equal to the
//     offer) the ratio of the outcome jump to the take-up jump. Both are the coefficient on Z of
//     a kernel-weighted regression on [1, Z, u, Z·u], u = x − c (the ratio is the 2SLS with Z as
//     the instrument and the same controls in both stages: Imbens & Lemieux 2008, §4.3), so the
//     regression core (tsls.ts) gives the estimate and its heteroskedasticity-robust SE (HC1 of
//     the weighted fit, or CR1 with clusters; with CR1 the interval and p-value refer to t(G − 1),
//     G the clusters within the bandwidth — student-t.ts). This is the conventional SE, not the robust
//     bias-corrected interval of Calonico, Cattaneo & Titiunik (2014), which is not implemented.
//   - bandwidth: Imbens & Kalyanaraman (2012), "Optimal bandwidth choice for the regression
//     discontinuity estimator", REStud 79(3):933–959, the three-step plug-in with regularization
//     described at ikBandwidth. ALL ITS CONSTANTS ARE FROM MEMORY ([M] in METHOD.md §4) and must
//     be checked against the paper: C_K = 3.4375, pilot 1.84·S_X·N^(−1/5), 3.56 and exponent 1/7
//     in the second-derivative pilot, 0.01 floor on m'''², regularization constant 2160. For a
//     fuzzy design the sharp (outcome) bandwidth is used; IK 2012 §5 give a fuzzy-specific one,
//     not implemented here.

import { EstimateInputError } from './errors.ts';
import { ols } from './ols.ts';
import { tsls } from './tsls.ts';
import { referenceFor } from './student-t.ts';
import { formatNumber } from './subset.ts';
import type { ClusterIds, EstimateWarning, NamedColumn } from './types.ts';
import type { CompiledProgram } from '../rules/ir.ts';
import type { Comparator } from '../rules/types.ts';

/** Triangular-kernel constant C_K of the IK bandwidth (IK 2012; FROM MEMORY). */
export const IK_KERNEL_CONSTANT = 3.4375;
/** Pilot bandwidth factor h1 = 1.84·S_X·N^(−1/5) (IK 2012; FROM MEMORY). */
export const IK_PILOT_FACTOR = 1.84;
/** Second-derivative pilot constant (IK 2012; FROM MEMORY). */
export const IK_CURVATURE_PILOT_FACTOR = 3.56;
/** Regularization constant r = 2160·σ²/(N₂·h₂⁴) (IK 2012; FROM MEMORY). */
export const IK_REGULARIZATION_CONSTANT = 2160;
/** Floor on the squared third derivative in the curvature pilot (IK 2012; FROM MEMORY). */
export const IK_THIRD_DERIVATIVE_FLOOR = 0.01;

export interface IkBandwidth {
  h: number;
  /** Intermediate quantities, for the record. */
  pilot: number;
  density: number;
  varianceBelow: number;
  varianceAbove: number;
  thirdDerivative: number;
  curvaturePilotBelow: number;
  curvaturePilotAbove: number;
  secondDerivativeBelow: number;
  secondDerivativeAbove: number;
  regularizationBelow: number;
  regularizationAbove: number;
}

function sampleVariance(y: readonly number[]): number {
  const n = y.length;
  if (n < 2) return NaN;
  let m = 0;
  for (const v of y) m += v;
  m /= n;
  let s = 0;
  for (const v of y) s += (v - m) ** 2;
  return s / (n - 1);
}

/** Second derivative at u = 0 from a quadratic fit of y on (u, u²) over the given rows (uniform kernel). */
function quadraticCurvature(u: readonly number[], y: readonly number[]): number {
  const fit = ols({ name: 'outcome', values: Float64Array.from(y) }, [
    { name: 'u', values: Float64Array.from(u) },
    { name: 'u2', values: Float64Array.from(u, (v) => v * v) },
  ]);
  return 2 * (fit.coefficients.find((c) => c.name === 'u2')?.estimate ?? 0);
}

/**
 * Imbens–Kalyanaraman (2012) bandwidth for the sharp local-linear estimate with the triangular
 * kernel. `above[i]` marks the units on the offered side (IK's X ≥ c). From memory (see header):
 *   1. h1 = 1.84·S_X·N^(−1/5); f̂ = (N₋ + N₊)/(2N·h1) with N∓ the units within h1 on each side;
 *      σ̂²∓ the sample variances of Y there.
 *   2. m̂''' = 6·γ̂₄ from the global regression Y ~ 1 + 1{above} + u + u² + u³; on each side
 *      h₂∓ = 3.56·(σ̂²∓ / (f̂·max(m̂'''², 0.01)))^(1/7)·N∓^(−1/7) (N∓ all units on that side);
 *      m̂''∓ = twice the u² coefficient of a quadratic fit on that side within h₂∓.
 *   3. r̂∓ = 2160·σ̂²∓/(N₂∓·h₂∓⁴), N₂∓ the units within h₂∓; then
 *      h = C_K·[(σ̂²₋ + σ̂²₊) / (f̂·((m̂''₊ − m̂''₋)² + r̂₊ + r̂₋))]^(1/5)·N^(−1/5).
 */
export function ikBandwidth(x: Float64Array, y: Float64Array, cutoff: number, above: Uint8Array): IkBandwidth {
  const n = x.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += x[i]!;
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (x[i]! - mean) ** 2;
  const sx = Math.sqrt(ss / (n - 1));
  const h1 = IK_PILOT_FACTOR * sx * Math.pow(n, -1 / 5);
  const yl: number[] = [];
  const yr: number[] = [];
  for (let i = 0; i < n; i++) {
    const u = x[i]! - cutoff;
    if (Math.abs(u) > h1) continue;
    (above[i] ? yr : yl).push(y[i]!);
  }
  const density = (yl.length + yr.length) / (2 * n * h1);
  const varianceBelow = sampleVariance(yl);
  const varianceAbove = sampleVariance(yr);

  const u = Float64Array.from(x, (v) => v - cutoff);
  const cubic = ols({ name: 'outcome', values: y }, [
    { name: 'above', values: Float64Array.from(above) },
    { name: 'u', values: u },
    { name: 'u2', values: u.map((v) => v * v) },
    { name: 'u3', values: u.map((v) => v * v * v) },
  ]);
  const thirdDerivative = 6 * (cubic.coefficients.find((c) => c.name === 'u3')?.estimate ?? 0);
  const m3sq = Math.max(thirdDerivative * thirdDerivative, IK_THIRD_DERIVATIVE_FLOOR);
  let nBelow = 0;
  for (let i = 0; i < n; i++) if (!above[i]) nBelow++;
  const nAbove = n - nBelow;
  const pilot2 = (variance: number, count: number) =>
    IK_CURVATURE_PILOT_FACTOR * Math.pow(variance / (density * m3sq), 1 / 7) * Math.pow(count, -1 / 7);
  const curvaturePilotBelow = pilot2(varianceBelow, nBelow);
  const curvaturePilotAbove = pilot2(varianceAbove, nAbove);
  const sideRows = (isAbove: boolean, h2: number) => {
    const us: number[] = [];
    const ys: number[] = [];
    for (let i = 0; i < n; i++) if ((above[i] === 1) === isAbove && Math.abs(u[i]!) <= h2) (us.push(u[i]!), ys.push(y[i]!));
    return { us, ys };
  };
  const below2 = sideRows(false, curvaturePilotBelow);
  const above2 = sideRows(true, curvaturePilotAbove);
  if (below2.us.length < 4 || above2.us.length < 4) {
    throw new EstimateInputError('too-few-units', 'Too few units near the cut-off on one side to choose a bandwidth for the local-linear cross-check.');
  }
  const secondDerivativeBelow = quadraticCurvature(below2.us, below2.ys);
  const secondDerivativeAbove = quadraticCurvature(above2.us, above2.ys);
  const regularizationBelow = (IK_REGULARIZATION_CONSTANT * varianceBelow) / (below2.us.length * curvaturePilotBelow ** 4);
  const regularizationAbove = (IK_REGULARIZATION_CONSTANT * varianceAbove) / (above2.us.length * curvaturePilotAbove ** 4);
  const h =
    IK_KERNEL_CONSTANT *
    Math.pow(
      (varianceBelow + varianceAbove) /
        (density * ((secondDerivativeAbove - secondDerivativeBelow) ** 2 + regularizationAbove + regularizationBelow)),
      1 / 5,
    ) *
    Math.pow(n, -1 / 5);
  return {
    h,
    pilot: h1,
    density,
    varianceBelow,
    varianceAbove,
    thirdDerivative,
    curvaturePilotBelow,
    curvaturePilotAbove,
    secondDerivativeBelow,
    secondDerivativeAbove,
    regularizationBelow,
    regularizationAbove,
  };
}

export interface LocalLinearInput {
  /** The running variable. */
  running: Float64Array;
  cutoff: number;
  outcome: Float64Array;
  /** Z: 1 on the offered side of the cut-off. */
  offer: Float64Array;
  /** D; omitted for a sharp design (the jump in the outcome is the estimate). */
  treatment?: Float64Array;
  /** Given bandwidth; default: Imbens–Kalyanaraman (2012). */
  bandwidth?: number;
  clusters?: ClusterIds;
  level?: number;
}

export interface LocalLinearResult {
  bandwidth: number;
  bandwidthSource: 'IK 2012' | 'given';
  ik: IkBandwidth | null;
  /** Units with positive kernel weight on each side. */
  unitsOffered: number;
  unitsNotOffered: number;
  outcomeJump: { coef: number; se: number };
  takeUpJump: { coef: number; se: number } | null;
  estimate: number;
  se: number;
  ci: [number, number];
  p: number;
  /** Clusters within the bandwidth when the SE is cluster-robust (CR1), else null. */
  clusters: number | null;
  warnings: EstimateWarning[];
}

export function localLinear(input: LocalLinearInput): LocalLinearResult {
  const warnings: EstimateWarning[] = [];
  const level = input.level ?? 0.95;
  const n0 = input.running.length;
  // Units with every value observed; the others are counted.
  const keep: number[] = [];
  for (let i = 0; i < n0; i++) {
    if (Number.isFinite(input.running[i]!) && Number.isFinite(input.outcome[i]!) && Number.isFinite(input.offer[i]!) && (!input.treatment || Number.isFinite(input.treatment[i]!))) keep.push(i);
  }
  if (keep.length < n0) {
    warnings.push({ code: 'local-linear-missing', message: `${n0 - keep.length} unit(s) with a missing value are left out of the local-linear cross-check.` });
  }
  const pick = (v: ArrayLike<number>) => Float64Array.from(keep, (i) => v[i]!);
  const x = pick(input.running);
  const y = pick(input.outcome);
  const z = pick(input.offer);
  const above = Uint8Array.from(z, (v) => (v === 1 ? 1 : 0));
  let ik: IkBandwidth | null = null;
  let h = input.bandwidth;
  if (h === undefined) {
    ik = ikBandwidth(x, y, input.cutoff, above);
    h = ik.h;
  }
  if (!(h > 0) || !Number.isFinite(h)) {
    throw new EstimateInputError('bad-option', `The local-linear bandwidth must be a positive number; got ${String(h)}.`);
  }
  const rows: number[] = [];
  for (let j = 0; j < x.length; j++) if (Math.abs(x[j]! - input.cutoff) < h) rows.push(j);
  let offered = 0;
  for (const j of rows) offered += above[j]!;
  const notOffered = rows.length - offered;
  if (offered < 3 || notOffered < 3) {
    throw new EstimateInputError(
      'too-few-units',
      `Within the bandwidth ${formatNumber(h)} of the cut-off there are ${offered} offered and ${notOffered} not-offered units; the local-linear cross-check needs at least 3 on each side.`,
    );
  }
  if (offered < 10 || notOffered < 10) {
    warnings.push({ code: 'few-per-side', message: `The local-linear cross-check rests on ${offered} offered and ${notOffered} not-offered units within the bandwidth.` });
  }
  // Kernel-weighted regression as OLS/2SLS on rows multiplied by √w (no separate intercept).
  const sw = rows.map((j) => Math.sqrt(1 - Math.abs(x[j]! - input.cutoff) / h!));
  const col = (name: string, f: (j: number) => number): NamedColumn => ({ name, values: Float64Array.from(rows, (j, r) => sw[r]! * f(j)) });
  const controls = [col('constant', () => 1), col('distance', (j) => x[j]! - input.cutoff), col('distance on the offered side', (j) => z[j]! * (x[j]! - input.cutoff))];
  const outcome = col('outcome', (j) => y[j]!);
  const instrument = col('offer', (j) => z[j]!);
  const clusters = input.clusters ? rows.map((j) => (input.clusters as ArrayLike<number | string>)[keep[j]!]!) : undefined;
  const options = { intercept: false, ...(clusters ? { clusters: clusters as ClusterIds } : {}) };
  const rf = ols(outcome, [...controls, instrument], options);
  const rfz = rf.coefficients.find((c) => c.name === 'offer')!;
  const outcomeJump = { coef: rfz.estimate, se: rfz.se };
  // Normal reference with HC1; t(G − 1) with CR1 and G clusters in the bandwidth (student-t.ts).
  const ref = referenceFor(level, rf.clusters);
  const critical = ref.critical;
  // the estimate with its inference, shared by the sharp and fuzzy designs
  const result = (est: { estimate: number; se: number }, takeUpJump: LocalLinearResult['takeUpJump'], extra: EstimateWarning[]): LocalLinearResult => ({
    bandwidth: h,
    bandwidthSource: ik ? 'IK 2012' : 'given',
    ik,
    unitsOffered: offered,
    unitsNotOffered: notOffered,
    outcomeJump,
    takeUpJump,
    estimate: est.estimate,
    se: est.se,
    ci: [est.estimate - critical * est.se, est.estimate + critical * est.se],
    p: ref.p(est.estimate / est.se),
    clusters: rf.clusters,
    warnings: [...warnings, ...extra],
  });
  if (!input.treatment) return result(rfz, null, []);
  const dAll = pick(input.treatment);
  const fit = tsls({ outcome, endogenous: [col('take-up', (j) => dAll[j]!)], instruments: [instrument], controls }, options);
  const first = fit.firstStages[0]!.fit.coefficients.find((c) => c.name === 'offer')!;
  const effect = fit.coefficients.find((c) => c.name === 'take-up')!;
  return result(effect, { coef: first.estimate, se: first.se }, fit.warnings);
}

export type SingleCutoff =
  | { applicable: true; variable: number; key: string; cutoff: number; op: Comparator }
  | { applicable: false; reason: string };

/** The cross-check, or why it cannot be computed on these data (never a throw for the data's sake). */
export type LocalLinearCheck = { ok: true; value: LocalLinearResult } | { ok: false; reason: string };

/**
 * localLinear for data that may be degenerate (a constant or missing outcome, take-up that never
 * changes, values near the largest double): a refusal of the inputs, or an estimate that is not a
 * finite number, becomes a "not estimable" answer with its reason.
 */
export function tryLocalLinear(input: LocalLinearInput): LocalLinearCheck {
  let r: LocalLinearResult;
  try {
    r = localLinear(input);
  } catch (e) {
    if (e instanceof EstimateInputError) return { ok: false, reason: e.message };
    throw e;
  }
  if (!Number.isFinite(r.estimate) || !Number.isFinite(r.se)) {
    return { ok: false, reason: 'The local-linear cross-check has no finite estimate on these data (the outcome or take-up does not vary near the cut-off, or its values are too large to add up).' };
  }
  return { ok: true, value: r };
}

/**
 * Whether the program is one running variable with one deterministic cut-off (`value op limit`
 * with a fixed number as the limit, offer 1/0), the case where the local-linear cross-check applies.
 */
export function singleCutoff(program: CompiledProgram): SingleCutoff {
  if (program.continuous.length !== 1) return { applicable: false, reason: 'the formula uses more or fewer than one continuous variable' };
  const { ifEligible, ifIneligible } = program.offer;
  const deterministic = (ifEligible === 1 && ifIneligible === 0) || (ifEligible === 0 && ifIneligible === 1);
  if (!deterministic) return { applicable: false, reason: 'the offer is a lottery, not a deterministic cut-off' };
  if (program.atoms.length !== 1 || program.tree.t !== 'atom') return { applicable: false, reason: 'the formula has more than one criterion' };
  const atom = program.atoms[0]!;
  if (atom.kind !== 'compare' || atom.op === '==' || atom.op === '!=') return { applicable: false, reason: 'the criterion is not an inequality' };
  const m = atom.margin;
  if (m.k === 'sub' && m.a.k === 'cont' && m.b.k === 'const') {
    return { applicable: true, variable: m.a.i, key: program.continuous[m.a.i]!.key, cutoff: m.b.v, op: atom.op };
  }
  return { applicable: false, reason: 'the criterion is not a variable compared with a fixed number' };
}
