// Manipulation check at a cut-off: is the density of the running variable continuous there?
// If applicants could nudge their values across the limit (under-report income, say), the
// density jumps at the cut-off and units on either side are no longer comparable.
//
// Test: McCrary (2008), "Manipulation of the running variable in the regression discontinuity
// design: a density test", J. Econometrics 142(2):698–714 (docs METHOD.md §3; the constants below
// are FROM MEMORY, marked [M] there, to be checked against the paper):
//   1. a fine histogram with bin width b = 2·σ̂·n^(−1/2), the cut-off on a bin edge; bin mid-points
//      X_j and normalized heights Y_j = (count in bin j)/(n·b);
//   2. on each side, a local-linear regression of Y_j on X_j − c with the triangular kernel
//      K(u) = max(0, 1 − |u|), bandwidth h; the intercepts are the densities f̂⁻ and f̂⁺ at c;
//   3. θ = ln f̂⁺ − ln f̂⁻ with SE = √((1/(n·h))·(24/5)·(1/f̂⁺ + 1/f̂⁻)), referred to N(0, 1).
// Bandwidth when not given (McCrary 2008 §III.A, from memory): on each side fit a global quartic
// in X_j to the Y_j, take σ̃² its mean squared residual and f̃'' its second derivative, and set
// h = 3.348·[σ̃²·(range of that side)/Σ_j f̃''(X_j)²]^(1/5); h is the average of the two sides,
// capped at the wider side's range.
//
// Where the limit varies with a discrete variable (an income limit by household size), the test
// is run on the margin value − limit at 0, which puts every cell's cut-off at the same place
// (densityChecksForProgram). Not implemented: the local-polynomial test of Cattaneo, Jansson and
// Ma (2020), JASA 115:1449–1455.

import { normalCritical, twoSidedNormalP } from './inference.ts';
import { ols } from './ols.ts';
import { formatNumber } from './subset.ts';
import type { EstimateWarning } from './types.ts';
import type { CompiledProgram, DesignColumns, IrNode } from '../rules/ir.ts';
import { evalColumn } from '../rules/evaluate-columns.ts';
import { criterionShortName } from '../rules/short-name.ts';

/** Bandwidth constant for the triangular kernel (McCrary 2008; FROM MEMORY). */
export const MCCRARY_BANDWIDTH_CONSTANT = 3.348;
/** Bin-width rule b = BIN_FACTOR·σ̂·n^(−1/2) (McCrary 2008; FROM MEMORY). */
export const MCCRARY_BIN_FACTOR = 2;
/** Asymptotic variance constant of θ̂ for the triangular kernel (McCrary 2008; FROM MEMORY). */
export const MCCRARY_VARIANCE_CONSTANT = 24 / 5;
/** More bins than this means the data are too spread out for a histogram test (common practice). */
const MAX_BINS = 2_000_000;

export interface DensityTestOptions {
  binWidth?: number;
  bandwidth?: number;
  level?: number;
}

export interface DensityTestResult {
  cutoff: number;
  /** Units with a finite value (others are excluded and counted in `excluded`). */
  n: number;
  excluded: number;
  binWidth: number;
  bandwidth: number | null;
  bandwidthSource: 'given' | 'McCrary 2008 rule';
  /** Estimated density just below and at-or-above the cut-off. */
  densityBelow: number | null;
  densityAbove: number | null;
  /** θ = ln f̂⁺ − ln f̂⁻ (0 when there is no jump). */
  logDifference: number | null;
  se: number | null;
  z: number | null;
  p: number | null;
  ci: [number, number] | null;
  /** Units within one bandwidth below / above the cut-off. */
  unitsBelow: number;
  unitsAbove: number;
  warnings: EstimateWarning[];
}

interface Histogram {
  first: number; // index of the first bin (bin j covers [c + j·b, c + (j+1)·b))
  heights: Float64Array;
}

function histogram(x: Float64Array, c: number, b: number): Histogram | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < x.length; i++) {
    const j = Math.floor((x[i]! - c) / b);
    if (j < lo) lo = j;
    if (j > hi) hi = j;
  }
  if (hi - lo + 1 > MAX_BINS) return null;
  const counts = new Float64Array(hi - lo + 1);
  for (let i = 0; i < x.length; i++) {
    const j = Math.floor((x[i]! - c) / b) - lo;
    counts[j] = counts[j]! + 1;
  }
  const scale = 1 / (x.length * b);
  for (let j = 0; j < counts.length; j++) counts[j] = counts[j]! * scale;
  return { first: lo, heights: counts };
}

/** Bins of one side as (distance of the mid-point from c, height). */
function side(h: Histogram, b: number, above: boolean): { u: Float64Array; y: Float64Array } {
  const us: number[] = [];
  const ys: number[] = [];
  for (let j = 0; j < h.heights.length; j++) {
    const bin = h.first + j;
    if (above !== bin >= 0) continue;
    us.push((bin + 0.5) * b);
    ys.push(h.heights[j]!);
  }
  return { u: Float64Array.from(us), y: Float64Array.from(ys) };
}

/** McCrary's bandwidth for one side (see header); null when it cannot be computed. */
function sideBandwidth(s: { u: Float64Array; y: Float64Array }): number | null {
  const m = s.u.length;
  if (m < 6) return null;
  const pow = (p: number) => ({ name: `u^${p}`, values: s.u.map((u) => u ** p) });
  const fit = ols({ name: 'height', values: s.y }, [pow(1), pow(2), pow(3), pow(4)]);
  const coef = (name: string) => fit.coefficients.find((c) => c.name === name)?.estimate ?? 0;
  const c2 = coef('u^2');
  const c3 = coef('u^3');
  const c4 = coef('u^4');
  let sumF2 = 0;
  for (let j = 0; j < m; j++) {
    const u = s.u[j]!;
    const f2 = 2 * c2 + 6 * c3 * u + 12 * c4 * u * u;
    sumF2 += f2 * f2;
  }
  const sigma2 = fit.rss / m;
  let range = 0;
  for (let j = 0; j < m; j++) range = Math.max(range, Math.abs(s.u[j]!));
  if (!(sumF2 > 0)) return range;
  return MCCRARY_BANDWIDTH_CONSTANT * Math.pow((sigma2 * range) / sumF2, 1 / 5);
}

/** Local-linear intercept at u = 0 with triangular weights; null with fewer than 3 bins in reach. */
function localLinearIntercept(s: { u: Float64Array; y: Float64Array }, h: number): number | null {
  const rows: number[] = [];
  for (let j = 0; j < s.u.length; j++) if (Math.abs(s.u[j]!) < h) rows.push(j);
  if (rows.length < 3) return null;
  const sw = rows.map((j) => Math.sqrt(1 - Math.abs(s.u[j]!) / h));
  // Weighted least squares as OLS on rows multiplied by √w (no separate intercept).
  const fit = ols(
    { name: 'height', values: Float64Array.from(rows, (j, r) => sw[r]! * s.y[j]!) },
    [
      { name: 'density at the cut-off', values: Float64Array.from(sw) },
      { name: 'slope', values: Float64Array.from(rows, (j, r) => sw[r]! * s.u[j]!) },
    ],
    { intercept: false },
  );
  return fit.coefficients.find((c) => c.name === 'density at the cut-off')?.estimate ?? null;
}

/** McCrary (2008) density test at `cutoff` (see header). Values that are not finite are excluded and counted. */
export function mccraryTest(values: Float64Array, cutoff: number, options: DensityTestOptions = {}): DensityTestResult {
  const warnings: EstimateWarning[] = [];
  const finite = values.filter((v) => Number.isFinite(v));
  const n = finite.length;
  const excluded = values.length - n;
  const critical = normalCritical(options.level ?? 0.95);
  const result: DensityTestResult = {
    cutoff,
    n,
    excluded,
    binWidth: NaN,
    bandwidth: null,
    bandwidthSource: options.bandwidth === undefined ? 'McCrary 2008 rule' : 'given',
    densityBelow: null,
    densityAbove: null,
    logDifference: null,
    se: null,
    z: null,
    p: null,
    ci: null,
    unitsBelow: 0,
    unitsAbove: 0,
    warnings,
  };
  if (excluded > 0) warnings.push({ code: 'density-missing', message: `${excluded} unit(s) have no usable value and are left out of the density check.` });
  let below = 0;
  for (let i = 0; i < n; i++) if (finite[i]! < cutoff) below++;
  if (n < 20 || below < 5 || n - below < 5) {
    warnings.push({
      code: 'density-too-few-units',
      message: `The density check at ${formatNumber(cutoff)} needs units on both sides of the cut-off; there are ${below} below and ${n - below} at or above it.`,
    });
    return result;
  }
  let mean = 0;
  for (let i = 0; i < n; i++) mean += finite[i]!;
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (finite[i]! - mean) ** 2;
  const sd = Math.sqrt(ss / (n - 1));
  const b = options.binWidth ?? (MCCRARY_BIN_FACTOR * sd) / Math.sqrt(n);
  result.binWidth = b;
  const hist = histogram(finite, cutoff, b);
  if (!hist) {
    warnings.push({ code: 'density-too-spread', message: `The values around ${formatNumber(cutoff)} are too spread out for the density check (more than ${MAX_BINS} histogram bins); check for extreme values.` });
    return result;
  }
  const left = side(hist, b, false);
  const right = side(hist, b, true);
  let h = options.bandwidth;
  if (h === undefined) {
    const hl = sideBandwidth(left);
    const hr = sideBandwidth(right);
    const rangeL = left.u.length ? Math.abs(left.u[0]!) + b / 2 : 0;
    const rangeR = right.u.length ? Math.abs(right.u[right.u.length - 1]!) + b / 2 : 0;
    if (hl === null || hr === null) {
      warnings.push({ code: 'density-few-bins', message: `Too few histogram bins on one side of ${formatNumber(cutoff)} to choose a bandwidth; the whole range of the data is used.` });
      h = Math.max(rangeL, rangeR);
    } else {
      // McCrary's rule gives one bandwidth per side; we take the smaller, and never more than half
      // the shorter side's range of data: a wider window runs the local-linear fit into a side's
      // support end, where a curved density (e.g. income per person rising from 0) biases the
      // intercept and the test rejects on smooth data (seen on invented log-normal incomes; our
      // choice, no published source — the bandwidth is reported so it can be varied).
      h = Math.min(hl, hr, Math.min(rangeL, rangeR) / 2);
    }
  }
  result.bandwidth = h;
  for (let i = 0; i < n; i++) {
    const u = finite[i]! - cutoff;
    if (u < 0 && u > -h) result.unitsBelow++;
    else if (u >= 0 && u < h) result.unitsAbove++;
  }
  const fMinus = localLinearIntercept(left, h);
  const fPlus = localLinearIntercept(right, h);
  result.densityBelow = fMinus;
  result.densityAbove = fPlus;
  if (fMinus === null || fPlus === null) {
    warnings.push({ code: 'density-few-bins', message: `Fewer than 3 histogram bins lie within the bandwidth on one side of ${formatNumber(cutoff)}; the density check is not possible there.` });
    return result;
  }
  if (!(fMinus > 0) || !(fPlus > 0)) {
    warnings.push({ code: 'density-zero', message: `The estimated density on one side of ${formatNumber(cutoff)} is zero or negative, so the log difference is undefined; look at the histogram instead.` });
    return result;
  }
  const theta = Math.log(fPlus) - Math.log(fMinus);
  const se = Math.sqrt((1 / (n * h)) * MCCRARY_VARIANCE_CONSTANT * (1 / fPlus + 1 / fMinus));
  result.logDifference = theta;
  result.se = se;
  result.z = theta / se;
  result.p = twoSidedNormalP(theta / se);
  result.ci = [theta - critical * se, theta + critical * se];
  return result;
}

export interface ProgramDensityCheck extends DensityTestResult {
  /** Atom index and JSON path of the criterion (program.rule...). */
  atom: number;
  path: string;
  /** True when the limit varies with a discrete variable: tested on value − limit at 0. */
  onMargin: boolean;
  /** What is tested, in words. */
  description: string;
}

/**
 * A density test at the cut-off of every inequality criterion of the rule that moves with a
 * continuous variable, on the margin value − limit (0 is the cut-off; for a fixed limit this is
 * the same test as on the value at the limit, shifted).
 */
export function densityChecksForProgram(program: CompiledProgram, cols: DesignColumns, options: DensityTestOptions = {}): ProgramDensityCheck[] {
  const out: ProgramDensityCheck[] = [];
  for (const atom of program.atoms) {
    if (atom.kind !== 'compare' || !atom.dependsOnContinuous) continue;
    if (atom.op === '==' || atom.op === '!=') continue;
    const margin = evalColumn(atom.margin, cols);
    const onMargin = usesDiscrete(atom.margin);
    const what = criterionShortName(atom.condition);
    const test = mccraryTest(margin, 0, options);
    out.push({
      ...test,
      atom: atom.index,
      path: atom.path,
      onMargin,
      description: onMargin ? `"${what}": density of value − limit at 0 (the limit varies by group)` : `"${what}": density of value − limit at 0`,
    });
  }
  return out;
}

function usesDiscrete(node: IrNode): boolean {
  switch (node.k) {
    case 'const':
    case 'cont':
      return false;
    case 'disc':
    case 'lookup':
      return true;
    case 'neg':
      return usesDiscrete(node.a);
    case 'min':
    case 'max':
      return node.args.some(usesDiscrete);
    default:
      return usesDiscrete(node.a) || usesDiscrete(node.b);
  }
}
