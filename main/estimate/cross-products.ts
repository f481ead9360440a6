// Least squares on "what does the offer Z change, holding W fixed?" from accumulated
// cross-products, for data that arrive in chunks and never sit in memory together (the streamed
// path, main/pipeline/stream-study.ts). The regressions are those of offer-design.ts — responses
// R (an outcome, take-up, covariates) on the design [1, W..., Z] — and so are the numbers:
//
// Pass 1 (accumulate): per chunk, the means and centred co-moments of the columns [W..., Z, R...]
//   over the chunk's rows of the sample, merged into the running ones by the pairwise update of
//   Chan, Golub & LeVeque ("Algorithms for computing the sample variance: analysis and
//   recommendations", The American Statistician 37(3):242–247, 1983):
//     n = n_A + n_B, δ = μ_B − μ_A, μ = μ_A + δ·n_B/n, C = C_A + C_B + δδ'·n_A·n_B/n.
//   Centring inside each chunk keeps the sums free of the cancellation that raw sums of squares
//   suffer when a column's mean is large.
// Solve: the slopes of every response on the kept design columns solve the normal equations
//   C_XX b = C_XR (the intercept is absorbed by the centring: Frisch–Waugh–Lovell, Davidson &
//   MacKinnon 2004 §2.4), by Cholesky factorization (Golub & Van Loan, Matrix Computations,
//   4th ed., §4.2). Collinear columns are dropped in the given order, as linalg.ts does, when
//   what is left of a column after the earlier kept ones is at most `tolerance` of its centred
//   norm; the squared-norm scale of the normal equations needs a looser default (1e-7) than the
//   QR's 1e-10 (common practice: about √ε of the Gram matrix's rounding).
// Pass 2 (meat): with the coefficients fixed, each unit's weight c_i = a'(x_i − x̄), a the row of
//   C_XX⁻¹ that belongs to Z (so that b_Z = Σ c_i r_i), and its residuals e_r,i; the robust
//   covariances of the Z-coefficients are then, exactly as offer-design.ts and variance.ts,
//     HC1: N/(N−K) · Σ_i c_i² e_j,i e_l,i                (White 1980; MacKinnon & White 1985)
//     CR1: G/(G−1)·(N−1)/(N−K) · Σ_g (Σ_{i∈g} c_i e_j,i)(Σ_{i∈g} c_i e_l,i)   (Cameron & Miller 2015)
//   with K the kept columns counting the intercept and G the clusters present in the sample.
//   Memory: m×m for HC1, G×m for CR1 — bounded by the clusters, never by the rows.
// (Cameron & Trivedi, "Microeconometrics", 2005, §4.4 and §24.5; Wooldridge 2010, §4.2.3 and §5.2.)

import { smallSampleFactor } from './variance.ts';

/** Running means and centred co-moments of p columns over the rows seen so far. */
export interface CoMoments {
  p: number;
  n: number;
  mean: Float64Array;
  /** p×p row-major Σ (x − x̄)(x − x̄)' (full, symmetric). */
  c: Float64Array;
}

export function createCoMoments(p: number): CoMoments {
  return { p, n: 0, mean: new Float64Array(p), c: new Float64Array(p * p) };
}

/**
 * Add the rows `idx[0..count)` of `columns` (p arrays of one chunk, in the accumulator's column
 * order) to the running moments.
 */
export function addRows(acc: CoMoments, columns: readonly Float64Array[], idx: Int32Array, count: number): void {
  if (count === 0) return;
  const p = acc.p;
  const mb = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const x = columns[j]!;
    let s = 0;
    for (let t = 0; t < count; t++) s += x[idx[t]!]!;
    mb[j] = s / count;
  }
  const cb = new Float64Array(p * p);
  const dev = new Float64Array(p);
  for (let t = 0; t < count; t++) {
    const i = idx[t]!;
    for (let j = 0; j < p; j++) dev[j] = columns[j]![i]! - mb[j]!;
    for (let j = 0; j < p; j++) {
      const dj = dev[j]!;
      const row = j * p;
      for (let l = j; l < p; l++) cb[row + l] = cb[row + l]! + dj * dev[l]!;
    }
  }
  for (let j = 0; j < p; j++) for (let l = 0; l < j; l++) cb[j * p + l] = cb[l * p + j]!;
  mergeCoMoments(acc, { p, n: count, mean: mb, c: cb });
}

/** acc ← acc ∪ b (Chan, Golub & LeVeque 1983, the pairwise update). */
export function mergeCoMoments(acc: CoMoments, b: CoMoments): void {
  if (b.n === 0) return;
  const p = acc.p;
  if (acc.n === 0) {
    acc.n = b.n;
    acc.mean.set(b.mean);
    acc.c.set(b.c);
    return;
  }
  const n = acc.n + b.n;
  const f = (acc.n * b.n) / n;
  const delta = new Float64Array(p);
  for (let j = 0; j < p; j++) delta[j] = b.mean[j]! - acc.mean[j]!;
  for (let j = 0; j < p; j++)
    for (let l = 0; l < p; l++) acc.c[j * p + l] = acc.c[j * p + l]! + b.c[j * p + l]! + delta[j]! * delta[l]! * f;
  for (let j = 0; j < p; j++) acc.mean[j] = acc.mean[j]! + (delta[j]! * b.n) / n;
  acc.n = n;
}

/** Default relative collinearity tolerance on the centred norm for normal equations (see the header). */
export const NORMAL_EQUATIONS_TOLERANCE = 1e-7;

/** The regressions of every response on [1, design...] solved from the moments. */
export interface MomentFit {
  n: number;
  /** Design columns (indices into the first q columns) kept, in the given order. */
  kept: number[];
  dropped: number[];
  /** K: kept design columns plus the intercept. */
  k: number;
  /** Whether the last design column (Z) is kept. */
  identified: boolean;
  /** Per response: slopes on the kept columns (in kept order). */
  slopes: Float64Array[];
  /** Per response: the coefficient of Z (NaN when not identified). */
  coefZ: number[];
  /** Row of C_XX⁻¹ for Z over the kept columns (empty when not identified): c_i = a'(x_i − x̄). */
  a: Float64Array;
  /** Means of all p columns (the centring of pass 2). */
  mean: Float64Array;
}

/**
 * Solve the regressions of the responses (columns q..p−1) on [1, columns 0..q−1] from the moments.
 * Column q−1 is Z, the coefficient read off.
 */
export function solveMoments(acc: CoMoments, q: number, tolerance = NORMAL_EQUATIONS_TOLERANCE): MomentFit {
  const { p, c } = acc;
  const m = p - q;
  // Cholesky of the correlation-scaled C_XX in the given order, dropping what adds nothing.
  const scale = new Float64Array(q);
  for (let j = 0; j < q; j++) scale[j] = Math.sqrt(Math.max(0, c[j * p + j]!));
  const kept: number[] = [];
  const dropped: number[] = [];
  const l: number[][] = []; // rows of the Cholesky factor over kept columns
  const tol2 = tolerance * tolerance;
  for (let j = 0; j < q; j++) {
    if (!(scale[j]! > 0)) { dropped.push(j); continue; }
    const row: number[] = [];
    for (let a = 0; a < kept.length; a++) {
      const ka = kept[a]!;
      let s = c[j * p + ka]! / (scale[j]! * scale[ka]!);
      for (let b = 0; b < a; b++) s -= row[b]! * l[a]![b]!;
      row.push(s / l[a]![a]!);
    }
    let d = 1;
    for (const v of row) d -= v * v;
    if (!(d > tol2)) { dropped.push(j); continue; }
    row.push(Math.sqrt(d));
    l.push(row);
    kept.push(j);
  }
  const kk = kept.length;
  // Solve (S R S) b = C_XR with R = L L', S the scales: b = S⁻¹ R⁻¹ S⁻¹ C_XR.
  const solve = (rhs: Float64Array): Float64Array => {
    const y = new Float64Array(kk);
    for (let a = 0; a < kk; a++) {
      let s = rhs[a]! / scale[kept[a]!]!;
      for (let b = 0; b < a; b++) s -= l[a]![b]! * y[b]!;
      y[a] = s / l[a]![a]!;
    }
    const x = new Float64Array(kk);
    for (let a = kk - 1; a >= 0; a--) {
      let s = y[a]!;
      for (let b = a + 1; b < kk; b++) s -= l[b]![a]! * x[b]!;
      x[a] = s / l[a]![a]!;
    }
    for (let a = 0; a < kk; a++) x[a] = x[a]! / scale[kept[a]!]!;
    return x;
  };
  const identified = kk > 0 && kept[kk - 1] === q - 1;
  const slopes: Float64Array[] = [];
  const coefZ: number[] = [];
  for (let r = 0; r < m; r++) {
    const rhs = Float64Array.from(kept, (j) => c[j * p + q + r]!);
    const b = solve(rhs);
    slopes.push(b);
    coefZ.push(identified ? b[kk - 1]! : NaN);
  }
  let a: Float64Array = new Float64Array(0);
  if (identified) {
    const e = new Float64Array(kk);
    e[kk - 1] = 1;
    // C_XX⁻¹ e_Z, symmetric so it is also the row.
    a = solve(e);
  }
  return { n: acc.n, kept, dropped, k: kk + 1, identified, slopes, coefZ, a, mean: acc.mean.slice() };
}

/** Pass 2: the pieces of the robust covariance of the Z-coefficients. */
export interface OfferMeat {
  m: number;
  n: number;
  /** m×m Σ c_i² e_j,i e_l,i. */
  hc: Float64Array;
  /** With clusters: per global cluster code, the m score sums Σ_{i∈g} c_i e_j,i (G×m, G from the first pass). */
  scores: Float64Array | null;
  /** Clusters seen in the sample (1 per code). */
  seen: Uint8Array | null;
}

export function createOfferMeat(m: number, clusterCount: number | null): OfferMeat {
  return {
    m,
    n: 0,
    hc: new Float64Array(m * m),
    scores: clusterCount === null ? null : new Float64Array(clusterCount * m),
    seen: clusterCount === null ? null : new Uint8Array(clusterCount),
  };
}

/**
 * Add rows idx[0..count) to the meat, with the fit's coefficients. `columns` are the same p
 * columns (design then responses) as in pass 1; `clusters` the global cluster code of each row.
 */
export function addMeatRows(meat: OfferMeat, fit: MomentFit, columns: readonly Float64Array[], idx: Int32Array, count: number, clusters?: Int32Array): void {
  if (!fit.identified) return;
  const q = columns.length - meat.m;
  const m = meat.m;
  const kept = fit.kept;
  const kk = kept.length;
  const mean = fit.mean;
  const dev = new Float64Array(kk);
  const e = new Float64Array(m);
  for (let t = 0; t < count; t++) {
    const i = idx[t]!;
    let ci = 0;
    for (let a = 0; a < kk; a++) {
      const j = kept[a]!;
      const v = columns[j]![i]! - mean[j]!;
      dev[a] = v;
      ci += fit.a[a]! * v;
    }
    for (let r = 0; r < m; r++) {
      const b = fit.slopes[r]!;
      let s = columns[q + r]![i]! - mean[q + r]!;
      for (let a = 0; a < kk; a++) s -= b[a]! * dev[a]!;
      e[r] = s;
    }
    if (meat.scores && clusters) {
      const g = clusters[i]!;
      meat.seen![g] = 1;
      const off = g * m;
      for (let r = 0; r < m; r++) meat.scores[off + r] = meat.scores[off + r]! + ci * e[r]!;
    }
    const w = ci * ci;
    for (let r = 0; r < m; r++) for (let s2 = r; s2 < m; s2++) meat.hc[r * m + s2] = meat.hc[r * m + s2]! + w * e[r]! * e[s2]!;
  }
  meat.n += count;
}

/** Clusters present in the sample (null without clusters). */
export function clustersSeen(meat: OfferMeat): number | null {
  if (!meat.seen) return null;
  let g = 0;
  for (let c = 0; c < meat.seen.length; c++) g += meat.seen[c]!;
  return g;
}

/**
 * The robust covariance (m×m) of the Z-coefficients: CR1 when `clustered` (the meat must hold
 * clusters), else HC1.
 */
export function meatCovariance(meat: OfferMeat, k: number, clustered: boolean): { v: Float64Array; clusters: number | null } {
  const { m, n } = meat;
  const v = new Float64Array(m * m);
  if (clustered && meat.scores && meat.seen) {
    let g = 0;
    for (let c = 0; c < meat.seen.length; c++) {
      if (!meat.seen[c]) continue;
      g++;
      const off = c * m;
      for (let r = 0; r < m; r++) for (let s = r; s < m; s++) v[r * m + s] = v[r * m + s]! + meat.scores[off + r]! * meat.scores[off + s]!;
    }
    const f = smallSampleFactor(n, k, g);
    for (let r = 0; r < m; r++) for (let s = r; s < m; s++) { v[r * m + s] = v[r * m + s]! * f; v[s * m + r] = v[r * m + s]!; }
    return { v, clusters: g };
  }
  const f = smallSampleFactor(n, k, null);
  for (let r = 0; r < m; r++) for (let s = r; s < m; s++) { v[r * m + s] = meat.hc[r * m + s]! * f; v[s * m + r] = v[r * m + s]!; }
  return { v, clusters: null };
}
