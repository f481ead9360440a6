// Least squares by Householder QR with column pivoting, over Float64Array columns.
//
// Why this way:
// - Householder QR solves least squares in a backward-stable way without ever forming X'X, so the
//   accuracy depends on cond(X), not cond(X)² (Golub & Van Loan, "Matrix Computations", 4th ed.,
//   §5.3; Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., ch. 20).
// - Column pivoting (Businger & Golub 1965, Numer. Math. 7:269–276; Golub & Van Loan §5.4.2)
//   chooses, at each step, the column with the largest remaining norm, which makes |R_ii|
//   non-increasing and the factorization rank-revealing in practice.
// - Which column counts as redundant is decided in the *given* order: a column is dropped when
//   what is left of it after projecting out the earlier kept columns is at most
//   `tolerance × (its norm)`. That test needs only the small R factor, because X·P = Q·R means
//   the columns of X and of R·Pᵀ have the same linear relations. This keeps the earlier column of
//   a collinear pair (the analyst's ordering decides what the model means), while the factor
//   used for the estimates is the pivoted one.
// - With an intercept, the other columns are centred (two-pass mean) before factorization, and
//   every column is scaled by a power of two (exact in floating point) to about unit norm. The
//   fitted values and residuals are the same; coefficients are mapped back to the original scale.
//   Centring removes the near-collinearity of a column with the constant that makes designs like
//   NIST Longley or polynomial fits ill conditioned.
//
// What variance estimators need is exposed through the thin orthonormal factor Q₁ (n × K) and
// the small matrix T with β = T·Q₁'y, so that (X'X)⁻¹ = T·Tᵀ and any sandwich
// (X'X)⁻¹ X'ΩX (X'X)⁻¹ = T·(Q₁'ΩQ₁)·Tᵀ; leverages are h_ii = ‖row i of Q₁‖². No n×n matrix is
// formed; the cost is O(n·K²) time and O(n·K) memory.

/** Default relative tolerance for the collinearity test (see the header). Common practice for
 * double precision on centred, unit-scaled columns: about 1e6·eps, far above rounding noise
 * (≈1e-16) and far below any real variation an analyst would care about. */
export const DEFAULT_RANK_TOLERANCE = 1e-10;

/** A design column that was dropped, and what it is a combination of (design indices). */
export interface DroppedColumn {
  /** Design index (0 is the intercept when one is added). */
  index: number;
  /** True when the column is zero for every unit. */
  zero: boolean;
  /** Design indices of the kept, earlier columns it is (numerically) a linear combination of. */
  combinationOf: number[];
}

/** The factorization of one design, ready to solve for any outcome and to build variances. */
export interface Decomposition {
  /** Number of rows (units). */
  readonly n: number;
  /** Number of design columns, the added intercept included. */
  readonly columnCount: number;
  /** Whether design column 0 is an added intercept (then the others were centred). */
  readonly hasIntercept: boolean;
  /** Number of kept columns K. */
  readonly rank: number;
  /** Design indices of the kept columns, ascending (the given order). */
  readonly kept: readonly number[];
  /** Columns dropped as collinear with earlier ones. */
  readonly dropped: readonly DroppedColumn[];
  /** Orthonormal basis Q₁ of the kept columns' span: n × K, column-major. */
  readonly q: Float64Array;
  /** K×K row-major: β = T·(Q₁'y) for the kept columns (original scale), (X'X)⁻¹ = T·Tᵀ. */
  readonly t: Float64Array;
  /** Internal: upper-triangular R (K×K, column-major) of the pivoted, centred, scaled design. */
  readonly r: Float64Array;
  /** Internal: pivot[j] = position (in `kept`) of the j-th pivoted column. */
  readonly pivot: Int32Array;
  /** Internal: power-of-two scale applied to each kept column. */
  readonly scale: Float64Array;
  /** Internal: mean subtracted from each kept column (0 for the intercept or without centring). */
  readonly mean: Float64Array;
}

export interface LeastSquaresSolution {
  /** Coefficients of the kept columns, in `kept` order, original scale. */
  coefficients: Float64Array;
  residuals: Float64Array;
  rss: number;
}

interface ColumnStats {
  norm: number;
  mean: number;
}

/** Two-pass mean (the second pass corrects the rounding of the first; Higham 2002, §1.9). */
export function accurateMean(x: Float64Array): number {
  const n = x.length;
  if (n === 0) return 0;
  let s = 0;
  for (let i = 0; i < n; i++) s += x[i]!;
  const m = s / n;
  let c = 0;
  for (let i = 0; i < n; i++) c += x[i]! - m;
  return m + c / n;
}

/** Euclidean norm without overflow or underflow (scaled by the largest magnitude). */
export function robustNorm(x: Float64Array, offset = 0, length = x.length - offset): number {
  let big = 0;
  for (let i = 0; i < length; i++) {
    const a = Math.abs(x[offset + i]!);
    if (a > big) big = a;
  }
  if (big === 0 || !Number.isFinite(big)) return big;
  let s = 0;
  for (let i = 0; i < length; i++) {
    const v = x[offset + i]! / big;
    s += v * v;
  }
  return big * Math.sqrt(s);
}

/** The power of two nearest to 1/norm: scaling by it is exact in binary floating point. */
function powerOfTwoScale(norm: number): number {
  return Math.pow(2, -Math.round(Math.log2(norm)));
}

function columnStats(columns: readonly Float64Array[]): ColumnStats[] {
  return columns.map((c) => ({ norm: robustNorm(c), mean: accurateMean(c) }));
}

/**
 * Build the working matrix (n × kk, column-major) for the design indices in `take`
 * (design index 0 is the intercept when `intercept`), centred and scaled.
 */
function buildWorking(
  n: number,
  columns: readonly Float64Array[],
  intercept: boolean,
  take: readonly number[],
  scale: Float64Array,
  mean: Float64Array,
): Float64Array {
  const kk = take.length;
  const w = new Float64Array(n * kk);
  for (let j = 0; j < kk; j++) {
    const d = take[j]!;
    const s = scale[j]!;
    const off = j * n;
    if (intercept && d === 0) {
      w.fill(s, off, off + n);
      continue;
    }
    const x = columns[intercept ? d - 1 : d]!;
    const m = mean[j]!;
    for (let i = 0; i < n; i++) w[off + i] = (x[i]! - m) * s;
  }
  return w;
}

interface PivotedQr {
  /** Householder vectors below the diagonal, R above it (column-major, n × k). */
  w: Float64Array;
  rdiag: Float64Array;
  beta: Float64Array;
  perm: Int32Array;
  steps: number;
}

/**
 * Householder QR with Businger–Golub column pivoting, in place on w (n × k, column-major).
 * Step j: pick the remaining column of largest norm below row j-1, swap it in, and annihilate
 * its entries below the diagonal with H_j = I − β_j v_j v_jᵀ (Golub & Van Loan, Alg. 5.4.1).
 * The remaining norms are recomputed at every step rather than downdated: the cost is the same
 * order as the factorization for few columns, and it avoids the known cancellation of norm
 * downdating.
 */
function pivotedHouseholderQr(w: Float64Array, n: number, k: number): PivotedQr {
  const steps = Math.min(n, k);
  const rdiag = new Float64Array(k);
  const beta = new Float64Array(k);
  const perm = new Int32Array(k);
  for (let j = 0; j < k; j++) perm[j] = j;
  for (let j = 0; j < steps; j++) {
    // Pivot: largest remaining norm (ties keep the earlier column).
    let best = j;
    let bestNorm = -1;
    for (let p = j; p < k; p++) {
      const nrm = robustNorm(w, p * n + j, n - j);
      if (nrm > bestNorm) {
        bestNorm = nrm;
        best = p;
      }
    }
    if (best !== j) {
      const a = j * n;
      const b = best * n;
      for (let i = 0; i < n; i++) {
        const tmp = w[a + i]!;
        w[a + i] = w[b + i]!;
        w[b + i] = tmp;
      }
      const tp = perm[j]!;
      perm[j] = perm[best]!;
      perm[best] = tp;
    }
    const col = j * n;
    const norm = bestNorm;
    if (norm === 0) {
      rdiag[j] = 0;
      beta[j] = 0;
      continue;
    }
    const x0 = w[col + j]!;
    const alpha = x0 >= 0 ? -norm : norm;
    // v = x − alpha·e1 with v0 = x0 + sign(x0)·norm (no cancellation); β = 2/(vᵀv).
    w[col + j] = x0 - alpha;
    const bj = 1 / (norm * (norm + Math.abs(x0)));
    beta[j] = bj;
    rdiag[j] = alpha;
    for (let l = j + 1; l < k; l++) {
      const cl = l * n;
      let s = 0;
      for (let i = j; i < n; i++) s += w[col + i]! * w[cl + i]!;
      s *= bj;
      if (s !== 0) for (let i = j; i < n; i++) w[cl + i] = w[cl + i]! - s * w[col + i]!;
    }
  }
  return { w, rdiag, beta, perm, steps };
}

/** R (steps × k, column-major) of a pivoted factorization, columns in pivoted order. */
function extractR(qr: PivotedQr, n: number, k: number): Float64Array {
  const m = qr.steps;
  const r = new Float64Array(m * k);
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < Math.min(j, m); i++) r[j * m + i] = qr.w[j * n + i]!;
    if (j < m) r[j * m + j] = qr.rdiag[j]!;
  }
  return r;
}

/** Q₁ = H_0 H_1 … H_{K−1} [I_K; 0], explicitly (n × K, column-major). */
function formThinQ(qr: PivotedQr, n: number, kcols: number): Float64Array {
  const q = new Float64Array(n * kcols);
  for (let j = 0; j < kcols; j++) {
    const off = j * n;
    q[off + j] = 1;
    // H_l e_j = e_j for l > j (H_l touches rows ≥ l only), so start at H_j.
    for (let l = j; l >= 0; l--) {
      const bl = qr.beta[l]!;
      if (bl === 0) continue;
      const vo = l * n;
      let s = 0;
      for (let i = l; i < n; i++) s += qr.w[vo + i]! * q[off + i]!;
      s *= bl;
      if (s !== 0) for (let i = l; i < n; i++) q[off + i] = q[off + i]! - s * qr.w[vo + i]!;
    }
  }
  return q;
}

interface Selection {
  keptPositions: number[];
  dropped: Array<{ position: number; gamma: Float64Array; keptBefore: number[] }>;
}

/**
 * In-order selection of independent columns from C = R·Pᵀ (m × kk): a Householder QR in the
 * given order that rejects a column whose remaining norm is ≤ tol·refNorm (the "rejecting" or
 * "limited pivoting" strategy for rank-deficient least squares; Björck, "Numerical Methods for
 * Least Squares Problems", SIAM 1996, ch. 2 [section from memory]). For each rejected column it
 * also returns γ, its least-squares combination of the earlier kept columns.
 */
function selectInOrder(c: Float64Array, m: number, kk: number, refNorm: Float64Array, tol: number): Selection {
  const vs: Float64Array[] = [];
  const bs: number[] = [];
  const rk: Float64Array[] = []; // columns of the kept triangular factor (length m)
  const keptPositions: number[] = [];
  const dropped: Selection['dropped'] = [];
  for (let jc = 0; jc < kk; jc++) {
    const x = c.slice(jc * m, jc * m + m);
    const p = keptPositions.length;
    for (let l = 0; l < p; l++) {
      const v = vs[l]!;
      let s = 0;
      for (let i = l; i < m; i++) s += v[i]! * x[i]!;
      s *= bs[l]!;
      for (let i = l; i < m; i++) x[i] = x[i]! - s * v[i]!;
    }
    const rest = p < m ? robustNorm(x, p, m - p) : 0;
    if (rest <= tol * refNorm[jc]!) {
      // γ solves Rk[0:p,0:p] γ = x[0:p] (back-substitution).
      const gamma = new Float64Array(p);
      for (let i = p - 1; i >= 0; i--) {
        let s = x[i]!;
        for (let l = i + 1; l < p; l++) s -= rk[l]![i]! * gamma[l]!;
        gamma[i] = s / rk[i]![i]!;
      }
      dropped.push({ position: jc, gamma, keptBefore: keptPositions.slice() });
      continue;
    }
    const v = new Float64Array(m);
    const x0 = x[p]!;
    const alpha = x0 >= 0 ? -rest : rest;
    for (let i = p; i < m; i++) v[i] = x[i]!;
    v[p] = x0 - alpha;
    vs.push(v);
    bs.push(1 / (rest * (rest + Math.abs(x0))));
    const col = new Float64Array(m);
    for (let i = 0; i < p; i++) col[i] = x[i]!;
    col[p] = alpha;
    rk.push(col);
    keptPositions.push(jc);
  }
  return { keptPositions, dropped };
}

/** Inverse of an upper-triangular K×K matrix (column-major), by back-substitution. */
function upperInverse(r: Float64Array, k: number): Float64Array {
  const inv = new Float64Array(k * k); // column-major
  for (let j = 0; j < k; j++) {
    inv[j * k + j] = 1 / r[j * k + j]!;
    for (let i = j - 1; i >= 0; i--) {
      let s = 0;
      for (let l = i + 1; l <= j; l++) s += r[l * k + i]! * inv[j * k + l]!;
      inv[j * k + i] = -s / r[i * k + i]!;
    }
  }
  return inv;
}

export interface DecomposeOptions {
  /** Add a column of ones as design column 0 (and centre the others). */
  intercept: boolean;
  /** Relative collinearity tolerance (default DEFAULT_RANK_TOLERANCE). */
  tolerance?: number;
}

/**
 * Factor the design [1?, columns...] of n rows. Columns must all have length n ≥ 1 and finite
 * values (the callers validate and word the errors). Collinear columns are dropped, the later
 * one in the given order.
 */
export function decompose(n: number, columns: readonly Float64Array[], options: DecomposeOptions): Decomposition {
  return decomposeRows(n, columns, options.intercept, options.tolerance ?? DEFAULT_RANK_TOLERANCE);
}

function decomposeRows(n: number, columns: readonly Float64Array[], intercept: boolean, tol: number): Decomposition {
  const columnCount = columns.length + (intercept ? 1 : 0);
  const stats = columnStats(columns);
  const designNorm = (d: number): number => (intercept && d === 0 ? Math.sqrt(n) : stats[intercept ? d - 1 : d]!.norm);
  const designMean = (d: number): number => (intercept && d !== 0 ? stats[d - 1]!.mean : 0);

  const droppedAll: DroppedColumn[] = [];
  let candidates: number[] = [];
  for (let d = 0; d < columnCount; d++) {
    if (designNorm(d) === 0) droppedAll.push({ index: d, zero: true, combinationOf: [] });
    else candidates.push(d);
  }

  // Factor, select in order, and refactor the kept set until nothing more is dropped
  // (normally one pass; a second only when columns are dropped).
  for (let guard = 0; guard <= columnCount; guard++) {
    const kk = candidates.length;
    const scale = new Float64Array(kk);
    const mean = new Float64Array(kk);
    const refNorm = new Float64Array(kk);
    for (let j = 0; j < kk; j++) {
      const d = candidates[j]!;
      const nrm = designNorm(d);
      scale[j] = powerOfTwoScale(nrm);
      mean[j] = designMean(d);
      refNorm[j] = nrm * scale[j]!;
    }
    const w = buildWorking(n, columns, intercept, candidates, scale, mean);
    const qr = pivotedHouseholderQr(w, n, kk);
    const m = qr.steps;
    const rPiv = extractR(qr, n, kk);
    // C = R·Pᵀ: column perm[j] of C is column j of R.
    const c = new Float64Array(m * kk);
    for (let j = 0; j < kk; j++) c.set(rPiv.subarray(j * m, j * m + m), qr.perm[j]! * m);
    const sel = selectInOrder(c, m, kk, refNorm, tol);

    if (sel.dropped.length > 0) {
      for (const dr of sel.dropped) {
        droppedAll.push({
          index: candidates[dr.position]!,
          zero: false,
          combinationOf: describeCombination(dr, candidates, scale, mean, intercept, designNorm),
        });
      }
      candidates = sel.keptPositions.map((p) => candidates[p]!);
      continue;
    }

    // Full rank: build Q₁, R, T.
    const k = kk;
    const r = new Float64Array(k * k);
    for (let j = 0; j < k; j++) for (let i = 0; i <= j; i++) r[j * k + i] = rPiv[j * m + i]!;
    const q = formThinQ(qr, n, k);
    const rinv = upperInverse(r, k);
    // G = P·R⁻¹: row perm[j] of G is row j of R⁻¹. Then T = A·G with A the un-scaling and
    // un-centring map: β_l = s_l γ_l (l ≠ intercept), β_0 = s_0 γ_0 − Σ_l s_l m_l γ_l.
    const g = new Float64Array(k * k); // row-major
    for (let j = 0; j < k; j++) {
      const row = qr.perm[j]!;
      for (let col = 0; col < k; col++) g[row * k + col] = rinv[col * k + j]!;
    }
    const t = new Float64Array(k * k);
    const interceptPos = intercept && candidates[0] === 0 ? 0 : -1;
    for (let row = 0; row < k; row++) {
      const s = scale[row]!;
      for (let col = 0; col < k; col++) t[row * k + col] = s * g[row * k + col]!;
    }
    if (interceptPos === 0) {
      for (let row = 1; row < k; row++) {
        const sm = scale[row]! * mean[row]!;
        if (sm === 0) continue;
        for (let col = 0; col < k; col++) t[col] = t[col]! - sm * g[row * k + col]!;
      }
    }
    const pivot = new Int32Array(k);
    for (let j = 0; j < k; j++) pivot[j] = qr.perm[j]!;
    droppedAll.sort((a, b) => a.index - b.index);
    return {
      n,
      columnCount,
      hasIntercept: intercept,
      rank: k,
      kept: candidates.slice(),
      dropped: droppedAll,
      q,
      t,
      r,
      pivot,
      scale,
      mean,
    };
  }
  throw new Error('decompose: column selection did not settle (internal fault)');
}

/**
 * Which kept earlier columns a dropped column is a combination of, in the original
 * (uncentred, unscaled) parametrization. With centring, W_l = s_l (x_l − m_l) and
 * W_0 = s_0·1, so W_j ≈ Σ γ_l W_l gives
 *   x_j ≈ [m_j + (γ_0 s_0 − Σ_{l≥1} γ_l s_l m_l)/s_j]·1 + Σ_{l≥1} (γ_l s_l / s_j)·x_l.
 * A column is named when its term carries at least 1e-7 of x_j's norm (common practice: a
 * threshold well above rounding and well below any real contribution).
 */
function describeCombination(
  dr: { position: number; gamma: Float64Array; keptBefore: number[] },
  candidates: readonly number[],
  scale: Float64Array,
  mean: Float64Array,
  intercept: boolean,
  designNorm: (d: number) => number,
): number[] {
  const j = dr.position;
  const sj = scale[j]!;
  const normJ = designNorm(candidates[j]!);
  let constTerm = intercept ? mean[j]! : 0;
  const slopes = new Map<number, number>();
  dr.keptBefore.forEach((pos, idx) => {
    const d = candidates[pos]!;
    const gl = dr.gamma[idx]!;
    if (intercept && d === 0) {
      constTerm += (gl * scale[pos]!) / sj;
    } else {
      slopes.set(d, (gl * scale[pos]!) / sj);
      if (intercept) constTerm -= (gl * scale[pos]! * mean[pos]!) / sj;
    }
  });
  const out: number[] = [];
  for (const pos of dr.keptBefore) {
    const d = candidates[pos]!;
    const coef = intercept && d === 0 ? constTerm : slopes.get(d)!;
    if (Math.abs(coef) * designNorm(d) >= 1e-7 * normJ) out.push(d);
  }
  return out;
}

/** Q₁ᵀv, computed twice ("twice is enough": Giraud, Langou & Rozložník 2005, Comput. Math.
 * Appl. 50:1069–1075) so that the residual is orthogonal to the columns to working precision
 * even when v lies almost in their span (an exact fit such as NIST Wampler1). */
function projectTwice(dec: Decomposition, v: Float64Array): { coords: Float64Array; residual: Float64Array } {
  const { n, rank: k, q } = dec;
  const residual = v.slice();
  const coords = new Float64Array(k);
  for (let pass = 0; pass < 2; pass++) {
    for (let j = 0; j < k; j++) {
      const off = j * n;
      let s = 0;
      for (let i = 0; i < n; i++) s += q[off + i]! * residual[i]!;
      coords[j] = coords[j]! + s;
      if (s !== 0) for (let i = 0; i < n; i++) residual[i] = residual[i]! - s * q[off + i]!;
    }
  }
  return { coords, residual };
}

/** Least-squares coefficients (kept columns, original scale), residuals and RSS for outcome y. */
export function solve(dec: Decomposition, y: Float64Array): LeastSquaresSolution {
  const { rank: k, r, pivot, scale, mean } = dec;
  let ybar = 0;
  let work = y;
  if (dec.hasIntercept) {
    // Centre y too: the residual is then computed from numbers of its own size.
    ybar = accurateMean(y);
    work = new Float64Array(y.length);
    for (let i = 0; i < y.length; i++) work[i] = y[i]! - ybar;
  }
  const { coords, residual } = projectTwice(dec, work);
  // R z = Q₁ᵀ y (back-substitution), γ = P z.
  const z = new Float64Array(k);
  for (let i = k - 1; i >= 0; i--) {
    let s = coords[i]!;
    for (let l = i + 1; l < k; l++) s -= r[l * k + i]! * z[l]!;
    z[i] = s / r[i * k + i]!;
  }
  const gamma = new Float64Array(k);
  for (let j = 0; j < k; j++) gamma[pivot[j]!] = z[j]!;
  const beta = new Float64Array(k);
  for (let l = 0; l < k; l++) beta[l] = scale[l]! * gamma[l]!;
  if (dec.hasIntercept && dec.kept[0] === 0) {
    // Intercept in the centred parametrization is ȳ; map back: β_0 = s_0γ_0 + ȳ − Σ s_l m_l γ_l.
    let b0 = beta[0]! + ybar;
    for (let l = 1; l < k; l++) b0 -= scale[l]! * mean[l]! * gamma[l]!;
    beta[0] = b0;
  }
  let rss = 0;
  for (let i = 0; i < residual.length; i++) rss += residual[i]! * residual[i]!;
  return { coefficients: beta, residuals: residual, rss };
}

/** Leverages h_ii = x_i'(X'X)⁻¹x_i = ‖row i of Q₁‖² (Hoaglin & Welsch 1978, Am. Stat. 32:17–22). */
export function leverages(dec: Decomposition): Float64Array {
  const { n, rank: k, q } = dec;
  const h = new Float64Array(n);
  for (let j = 0; j < k; j++) {
    const off = j * n;
    for (let i = 0; i < n; i++) {
      const v = q[off + i]!;
      h[i] = h[i]! + v * v;
    }
  }
  return h;
}

/** (X'X)⁻¹ = T·Tᵀ (K×K row-major), without forming or inverting X'X. */
export function inverseGram(dec: Decomposition): Float64Array {
  const k = dec.rank;
  const identity = new Float64Array(k * k);
  for (let i = 0; i < k; i++) identity[i * k + i] = 1;
  return sandwich(dec, identity);
}

/** T·M·Tᵀ for a K×K row-major "meat" M expressed in Q₁ coordinates (M = Q₁ᵀ Ω Q₁). */
export function sandwich(dec: Decomposition, meat: Float64Array): Float64Array {
  const k = dec.rank;
  const t = dec.t;
  const tm = new Float64Array(k * k);
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += t[i * k + l]! * meat[l * k + j]!;
      tm[i * k + j] = s;
    }
  const out = new Float64Array(k * k);
  for (let i = 0; i < k; i++)
    for (let j = i; j < k; j++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += tm[i * k + l]! * t[j * k + l]!;
      out[i * k + j] = s;
      out[j * k + i] = s;
    }
  return out;
}

/**
 * (X'X)⁻¹·A·(X'X)⁻¹ for a K×K row-major A given on the scale of the kept design columns
 * (e.g. A = Σ_i w_i x_i x_iᵀ built by a caller). Computed as T·(Tᵀ A T)·Tᵀ, so X'X is still
 * never formed or inverted. Prefer `sandwich` with a Q₁-space meat when the weights are per row.
 */
export function sandwichFromDesignMeat(dec: Decomposition, a: Float64Array): Float64Array {
  const k = dec.rank;
  const t = dec.t;
  // M = Tᵀ A T
  const at = new Float64Array(k * k);
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += a[i * k + l]! * t[l * k + j]!;
      at[i * k + j] = s;
    }
  const m = new Float64Array(k * k);
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += t[l * k + i]! * at[l * k + j]!;
      m[i * k + j] = s;
    }
  return sandwich(dec, m);
}

/** Σ_i w_i q_i q_iᵀ (K×K row-major), q_i the i-th row of Q₁. Column-wise loops: O(n·K²). */
export function weightedMeat(dec: Decomposition, weights: Float64Array): Float64Array {
  const { n, rank: k, q } = dec;
  const m = new Float64Array(k * k);
  for (let a = 0; a < k; a++) {
    const oa = a * n;
    for (let b = a; b < k; b++) {
      const ob = b * n;
      let s = 0;
      for (let i = 0; i < n; i++) s += weights[i]! * q[oa + i]! * q[ob + i]!;
      m[a * k + b] = s;
      m[b * k + a] = s;
    }
  }
  return m;
}

/** Σ_g s_g s_gᵀ with s_g = Σ_{i∈g} e_i q_i (K×K row-major); codes are 0..groups−1. */
export function clusterMeat(dec: Decomposition, residuals: Float64Array, codes: Int32Array, groups: number): Float64Array {
  const { n, rank: k, q } = dec;
  const scores = new Float64Array(groups * k);
  for (let a = 0; a < k; a++) {
    const oa = a * n;
    for (let i = 0; i < n; i++) scores[codes[i]! * k + a] = scores[codes[i]! * k + a]! + residuals[i]! * q[oa + i]!;
  }
  const m = new Float64Array(k * k);
  for (let g = 0; g < groups; g++) {
    const o = g * k;
    for (let a = 0; a < k; a++) {
      const sa = scores[o + a]!;
      if (sa === 0) continue;
      for (let b = a; b < k; b++) m[a * k + b] = m[a * k + b]! + sa * scores[o + b]!;
    }
  }
  for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) m[a * k + b] = m[b * k + a]!;
  return m;
}
