// Exact offer probability on a ball crossed by several linear criteria whose normals span two or
// three dimensions (the "corners" of all / any / at-least rules).
//
// Projection property: if z is uniform on the unit ball of R^d and Q is a d×k matrix with
// orthonormal columns, y = Qᵀz has density ∝ (1 − |y|²)^((d − k)/2) on the unit k-ball (the
// marginal of the uniform distribution on the d-ball; K.-T. Fang, S. Kotz and K. W. Ng, "Symmetric
// Multivariate and Related Distributions", Chapman and Hall, 1990, §2.3 on the uniform distribution
// in the ball, where the marginals are of Pearson type II — cited from memory; the k = 1 case is the
// cap formula of ball-geometry.ts, and tests/design/corners.test.ts checks the k = 2 and k = 3
// cases against plain simulation in all d dimensions). Every linear criterion's margin is
// m + δ⟨w, z⟩ = m + δ⟨Qᵀw, y⟩ when w lies in the span of Q, so the rule's verdict depends on y
// alone: Q is an orthonormal basis of the span of the crossing criteria's normals, built by
// modified Gram–Schmidt (G. H. Golub and C. F. Van Loan, "Matrix Computations", 4th ed., 2013,
// §5.2.8). The normals need not be orthogonal.
//
// k = 2 (the disk): polar coordinates about the centre. Along each ray the verdict changes only
// where the ray crosses a criterion's line, and the radial integral of the density is closed form,
//     ∫_{ρ0}^{ρ1} (β/π)(1 − r²)^(β−1) r dr = [(1 − ρ0²)^β − (1 − ρ1²)^β] / (2π),  β = d/2.
// The angles where a line meets the circle and the directions of the lines' crossings inside the
// disk cut the circle of directions into sectors in which the order of crossings is fixed; per
// sector and radial piece the rule is evaluated once at an interior point. What remains is, per
// line at distance t from the centre and angle φ to its normal (crossing at r = t/cos φ),
//     L = ∫ (1 − t² sec² φ)^β dφ,
// closed form for d = 2 (β = 1: Δφ − t²·Δtan φ, the elementary circle–polygon area) and for even
// d (a finite series in tan φ), and for odd d ≥ 3 computed after the substitution t·tan φ = √(1 − t²)·sin ψ, which turns it into
//     ∫ t·s·cos ψ·(1 − e)^β / e dψ,   s = √(1 − t²), e = t² + s² sin² ψ;
// the pole part t·s·cos ψ / e integrates to φ itself, and the remainder is analytic in ψ (no
// endpoint singularity, no peak), integrated by adaptive Gauss–Legendre to 1e-13.
//
// k = 3 (the 3-ball): sliced along the third basis vector. The slice at height s has the uniform
// k = 2 law of dimension d − 1 scaled to radius √(1 − s²) (the same projection property applied
// to the (d − 1)-ball slice), and s has the ball's one-dimensional marginal density
// ∝ (1 − s²)^((d − 1)/2). So P = ∫ P₂(s) f(s) ds, integrated by adaptive Gauss–Legendre between the
// heights where the slice's arrangement changes (a plane touching the sphere's slice, two planes
// crossing on the sphere, three planes meeting). Its error estimate is reported as the unit's
// standard error, like a simulated unit's.

import { holds } from '../rules/atoms.ts';
import type { Comparator } from '../rules/types.ts';
import { integrate, integrateSmooth, type Integral } from './quadrature.ts';

/** One crossing criterion: holds where `op` holds for m + δ⟨w, z⟩, z in the unit d-ball. */
export interface LinearCut {
  m: number;
  w: ArrayLike<number>;
  op: Comparator;
}

export interface CornerResult extends Integral {
  /** Dimension of the span of the normals (2 or 3 here). */
  rank: number;
}

/** Relative size below which a normal is taken to lie in the span of the earlier ones. */
const RANK_TOL = 1e-10;
/** Absolute tolerance of the inner (per line) integrals and of the outer slice integral. */
const LINE_TOL = 1e-13;
const SLICE_TOL = 1e-9;
const TWO_PI = 2 * Math.PI;

/**
 * P(the rule's verdict is "offer") on the unit ball for cuts whose normals span 2 or 3
 * dimensions; `verdict[mask]` is 1 when the rule offers with cut i holding iff bit i of mask is
 * set. Returns null when the span has another dimension (1: the caller's one-dimensional formula;
 * more than 3: simulation) or an input is not finite.
 */
export function cornerProbability(cuts: LinearCut[], delta: number, d: number, verdict: Uint8Array): CornerResult | null {
  const basis = orthonormalBasis(cuts.map((c) => c.w), d);
  if (basis === null) return null;
  const k = basis.length;
  if (k < 2 || k > 3) return null;
  // each cut in basis coordinates: holds where op holds for ⟨a, y⟩ − t (a unit, same sign as the margin)
  const a: number[][] = [];
  const t: number[] = [];
  for (const c of cuts) {
    const v = basis.map((q) => { let s = 0; for (let j = 0; j < d; j++) s += q[j]! * c.w[j]!; return s; });
    const nv = Math.hypot(...v);
    if (!(nv > 0) || !Number.isFinite(c.m)) return null;
    a.push(v.map((x) => x / nv));
    t.push(-c.m / (delta * nv));
  }
  const ops = cuts.map((c) => c.op);
  const offered = (y: ArrayLike<number>): boolean => {
    let mask = 0;
    for (let i = 0; i < ops.length; i++) {
      let s = -t[i]!;
      for (let j = 0; j < k; j++) s += a[i]![j]! * y[j]!;
      if (holds(s, ops[i]!)) mask |= 1 << i;
    }
    return verdict[mask] === 1;
  };
  if (k === 2) {
    const lines = lines2(cuts.length);
    a.forEach((ai, i) => { lines.ax[i] = ai[0]!; lines.ay[i] = ai[1]!; lines.t[i] = t[i]!; });
    lines.n = cuts.length;
    const y = new Float64Array(2);
    const r = diskProbability(lines, d / 2, (y1, y2) => { y[0] = y1; y[1] = y2; return offered(y); });
    return { value: clamp01(r.value), error: r.error, rank: 2 };
  }
  const r = ballProbability3(a, t, d, offered);
  return { value: clamp01(r.value), error: r.error, rank: 3 };
}

const clamp01 = (x: number) => Math.min(1, Math.max(0, x));

/** Orthonormal basis (modified Gram–Schmidt) of the span of the vectors; null if one is not finite. */
export function orthonormalBasis(vectors: Array<ArrayLike<number>>, d: number): Float64Array[] | null {
  const basis: Float64Array[] = [];
  for (const w of vectors) {
    const v = Float64Array.from({ length: d }, (_, j) => w[j]!);
    let n0 = 0;
    for (let j = 0; j < d; j++) n0 += v[j]! * v[j]!;
    n0 = Math.sqrt(n0);
    if (!Number.isFinite(n0)) return null;
    if (n0 === 0) continue;
    for (let pass = 0; pass < 2; pass++) { // a second pass restores orthogonality lost to rounding
      for (const q of basis) {
        let dot = 0;
        for (let j = 0; j < d; j++) dot += q[j]! * v[j]!;
        for (let j = 0; j < d; j++) v[j] = v[j]! - dot * q[j]!;
      }
    }
    let n = 0;
    for (let j = 0; j < d; j++) n += v[j]! * v[j]!;
    n = Math.sqrt(n);
    if (n <= RANK_TOL * n0) continue;
    for (let j = 0; j < d; j++) v[j] = v[j]! / n;
    basis.push(v);
  }
  return basis;
}

/**
 * Lines ⟨(ax[i], ay[i]), y⟩ = t[i] of the plane with unit normals, i < n (flat arrays, so the
 * slices of the 3-ball reuse one set). The side that holds is decided by `offered` at points, so
 * the sign of a normal does not matter.
 */
export interface Lines2 { n: number; ax: Float64Array; ay: Float64Array; t: Float64Array }

export function lines2(capacity: number): Lines2 {
  return { n: 0, ax: new Float64Array(capacity), ay: new Float64Array(capacity), t: new Float64Array(capacity) };
}

/** Scratch space of diskProbability, grown on demand (one per thread: no call re-enters it). */
let cap = 0;
let lx = new Float64Array(0), ly = new Float64Array(0), lt = new Float64Array(0), theta = new Float64Array(0);
let rho = new Float64Array(0), breaks = new Float64Array(0);
let order = new Int32Array(0), coef = new Int8Array(0), runCoef = new Int8Array(0);
let runFrom = new Float64Array(0), runTo = new Float64Array(0);

function ensureScratch(m: number): void {
  if (m <= cap) return;
  cap = Math.max(m, 2 * cap, 8);
  lx = new Float64Array(cap); ly = new Float64Array(cap); lt = new Float64Array(cap); theta = new Float64Array(cap);
  rho = new Float64Array(cap); order = new Int32Array(cap); coef = new Int8Array(cap); runCoef = new Int8Array(cap);
  runFrom = new Float64Array(cap); runTo = new Float64Array(cap);
  breaks = new Float64Array(2 * cap + (cap * (cap - 1)) / 2);
}

/**
 * P(offered) for y on the unit disk with density (β/π)(1 − |y|²)^(β−1); `offered(y1, y2)` is the
 * rule's verdict at a point, constant between the lines.
 */
export function diskProbability(lines: Lines2, beta: number, offered: (y1: number, y2: number) => boolean): Integral {
  ensureScratch(lines.n);
  // the lines that cross the open disk, turned so that t ≥ 0
  let m = 0;
  for (let i = 0; i < lines.n; i++) {
    const t = lines.t[i]!;
    if (!(Math.abs(t) < 1)) continue;
    const f = t < 0 ? -1 : 1;
    lx[m] = f * lines.ax[i]!; ly[m] = f * lines.ay[i]!; lt[m] = f * t;
    m++;
  }
  if (m === 0) return { value: offered(0, 0) ? 1 : 0, error: 0 };
  let nb = 0;
  for (let i = 0; i < m; i++) {
    theta[i] = Math.atan2(ly[i]!, lx[i]!);
    const om = Math.acos(lt[i]!);
    breaks[nb++] = wrap2Pi(theta[i]! - om);
    breaks[nb++] = wrap2Pi(theta[i]! + om);
  }
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j < m; j++) {
      const det = lx[i]! * ly[j]! - ly[i]! * lx[j]!;
      if (Math.abs(det) < 1e-15) continue;
      const x = (lt[i]! * ly[j]! - ly[i]! * lt[j]!) / det;
      const y = (lx[i]! * lt[j]! - lt[i]! * lx[j]!) / det;
      if (x * x + y * y < 1) breaks[nb++] = wrap2Pi(Math.atan2(y, x));
    }
  }
  const cuts = breaks.subarray(0, nb).sort();

  let origin = 0; // Σ coefficient × Δθ of the centre's term, (1 − 0)^β = 1
  let lineTerms = 0;
  let error = 0;
  runCoef.fill(0, 0, m);
  for (let c = 0; c < nb; c++) {
    const lo = cuts[c]!;
    const hi = c + 1 < nb ? cuts[c + 1]! : cuts[0]! + TWO_PI;
    const width = hi - lo;
    if (!(width > 1e-15)) continue;
    const mid = (lo + hi) / 2;
    const ex = Math.cos(mid), ey = Math.sin(mid);
    // crossings along the ray at angle `mid`, in order of distance (insertion sort: few lines)
    let no = 0;
    for (let i = 0; i < m; i++) {
      coef[i] = 0;
      const cphi = lx[i]! * ex + ly[i]! * ey;
      if (!(cphi > 0 && lt[i]! < cphi)) continue;
      const r = lt[i]! / cphi;
      rho[i] = r;
      let q = no++;
      while (q > 0 && rho[order[q - 1]!]! > r) { order[q] = order[q - 1]!; q--; }
      order[q] = i;
    }
    let coefOrigin = 0;
    // radial pieces: centre → crossings in order → circle; H = (1 − r²)^β is 1 at the centre, 0 on the circle
    for (let p = 0; p <= no; p++) {
      const r0 = p === 0 ? 0 : rho[order[p - 1]!]!;
      const r1 = p === no ? 1 : rho[order[p]!]!;
      if (!(r1 > r0)) continue;
      const rm = (r0 + r1) / 2;
      if (!offered(rm * ex, rm * ey)) continue;
      if (p === 0) coefOrigin++; else coef[order[p - 1]!]!++;
      if (p < no) coef[order[p]!]!--;
    }
    origin += coefOrigin * width;
    // per line, consecutive sectors with the same coefficient are integrated at once
    for (let i = 0; i < m; i++) {
      const ci = coef[i]!;
      const phi0 = wrapPi(lo - theta[i]!);
      if (ci !== 0 && runCoef[i] === ci && Math.abs(phi0 - runTo[i]!) < 1e-12) { runTo[i] = phi0 + width; continue; }
      if (runCoef[i] !== 0) {
        const r = lineIntegral(lt[i]!, runFrom[i]!, runTo[i]!, beta);
        lineTerms += runCoef[i]! * r.value;
        error += r.error;
      }
      runCoef[i] = ci;
      runFrom[i] = phi0;
      runTo[i] = phi0 + width;
    }
  }
  for (let i = 0; i < m; i++) {
    if (runCoef[i] === 0) continue;
    const r = lineIntegral(lt[i]!, runFrom[i]!, runTo[i]!, beta);
    lineTerms += runCoef[i]! * r.value;
    error += r.error;
  }
  return { value: (origin + lineTerms) / TWO_PI, error: error / TWO_PI };
}

const wrap2Pi = (x: number) => { const v = x % TWO_PI; return v < 0 ? v + TWO_PI : v; };
const wrapPi = (x: number) => x - TWO_PI * Math.round(x / TWO_PI);

/**
 * L = ∫_{φ0}^{φ1} (1 − t² sec² φ)^β dφ for 0 ≤ t < 1 and |φ| ≤ acos t (the part of a sector
 * between the centre and the line, weighted by the radial integral of the density).
 */
export function lineIntegral(t: number, phi0: number, phi1: number, beta: number): Integral {
  const om = Math.acos(t);
  const a = Math.max(-om, phi0);
  const b = Math.min(om, phi1);
  if (!(b > a)) return { value: 0, error: 0 };
  if (beta === 1) return { value: b - a - t * t * (Math.tan(b) - Math.tan(a)), error: 0 };
  if (Number.isInteger(beta) && beta <= 10) return { value: secPowerSeries(t, b, beta) - secPowerSeries(t, a, beta), error: 0 };
  // With e = t² + s² sin²ψ = 1 − s² cos²ψ the integrand is t·s·cos ψ·(1 − e)^β / e; its pole part
  // t·s·cos ψ / e integrates to atan(s·sin ψ / t) = φ, leaving the analytic remainder
  // t·s·cos ψ·(1 − (1 − e)^β)/e (bounded by β·t·s), computed without cancellation through
  // expm1 and log1p.
  const s = Math.sqrt(1 - t * t);
  const toPsi = (phi: number) => Math.asin(Math.min(1, Math.max(-1, (t * Math.tan(phi)) / s)));
  const ts = t * s;
  const t2 = t * t;
  const s2 = s * s;
  const g = (psi: number) => {
    const sn = Math.sin(psi);
    const e = t2 + s2 * sn * sn;
    return (ts * Math.cos(psi) * -Math.expm1(beta * Math.log1p(-e))) / e;
  };
  const r = integrate(g, toPsi(a), toPsi(b), LINE_TOL);
  return { value: b - a - r.value, error: r.error };
}

/**
 * Antiderivative of (1 − t² sec² φ)^β for a whole number β (even d): the binomial expansion
 * Σ_j C(β, j)(−t²)^j ∫sec^(2j) φ dφ with ∫sec^(2j) φ dφ = Σ_{i<j} C(j − 1, i) tan^(2i+1) φ/(2i + 1)
 * (substitute T = tan φ, sec² φ dφ = dT, sec^(2j−2) = (1 + T²)^(j−1)). On the arc |t·tan φ| ≤ 1,
 * so every term is at most C(β, j)·C(j − 1, i): no cancellation worse than 3^β rounding errors.
 */
function secPowerSeries(t: number, phi: number, beta: number): number {
  const T = Math.tan(phi);
  const t2 = t * t;
  let sum = phi;
  let cb = 1; // C(β, j)
  let tj = 1; // (−t²)^j
  for (let j = 1; j <= beta; j++) {
    cb = (cb * (beta - j + 1)) / j;
    tj *= -t2;
    let inner = 0;
    let ci = 1; // C(j − 1, i)
    let Tp = T; // T^(2i+1)
    for (let i = 0; i < j; i++) {
      inner += (ci * Tp) / (2 * i + 1);
      ci = (ci * (j - 1 - i)) / (i + 1);
      Tp *= T * T;
    }
    sum += cb * tj * inner;
  }
  return sum;
}

/** ∫_{−1}^{1} (1 − s²)^(n/2) ds by Wallis's recurrence I_n = I_{n−2}·n/(n + 1), I_0 = 2, I_1 = π/2. */
export function wallis(n: number): number {
  let v = n % 2 === 0 ? 2 : Math.PI / 2;
  for (let j = n % 2 === 0 ? 2 : 3; j <= n; j += 2) v *= j / (j + 1);
  return v;
}

/**
 * P(offered) for y uniform-projected on the unit 3-ball (density ∝ (1 − |y|²)^((d − 3)/2)), planes
 * ⟨a_i, y⟩ = t_i with unit normals, by slices along the third axis.
 */
function ballProbability3(a: number[][], t: number[], d: number, offered: (y: ArrayLike<number>) => boolean): Integral {
  const m = a.length;
  const levels: number[] = [-1, 1];
  const push = (s: number) => { if (s > -1 && s < 1) levels.push(s); };
  for (let i = 0; i < m; i++) {
    // extreme heights of the circle where plane i meets the sphere
    const ai = a[i]!, ti = t[i]!;
    if (Math.abs(ti) < 1) {
      const h = Math.hypot(ai[0]!, ai[1]!) * Math.sqrt(1 - ti * ti);
      push(ti * ai[2]! - h);
      push(ti * ai[2]! + h);
    }
    for (let j = i + 1; j < m; j++) {
      // the line where planes i and j meet: its points on the sphere
      const aj = a[j]!, tj = t[j]!;
      const g = ai[0]! * aj[0]! + ai[1]! * aj[1]! + ai[2]! * aj[2]!;
      const den = 1 - g * g;
      if (den < 1e-14) continue;
      const ci = (ti - tj * g) / den, cj = (tj - ti * g) / den;
      const p0 = [0, 1, 2].map((q) => ci * ai[q]! + cj * aj[q]!);
      const r2 = p0[0]! ** 2 + p0[1]! ** 2 + p0[2]! ** 2;
      if (r2 >= 1) continue;
      const u = cross3(ai, aj);
      const un = Math.hypot(u[0]!, u[1]!, u[2]!);
      const h = (u[2]! / un) * Math.sqrt(1 - r2);
      push(p0[2]! - h);
      push(p0[2]! + h);
      for (let l = j + 1; l < m; l++) {
        // the point where three planes meet (Cramer's rule)
        const al = a[l]!, tl = t[l]!;
        const det = ai[0]! * u3(aj, al, 0) + ai[1]! * u3(aj, al, 1) + ai[2]! * u3(aj, al, 2);
        if (Math.abs(det) < 1e-14) continue;
        const x = solve3(ai, aj, al, ti, tj, tl, det);
        if (x[0]! ** 2 + x[1]! ** 2 + x[2]! ** 2 < 1) push(x[2]!);
      }
    }
  }
  levels.sort((x, y) => x - y);
  const norm = wallis(d - 1);
  const half = (d - 1) / 2;
  const beta = (d - 1) / 2; // each slice: the disk law of dimension d − 1
  const y = new Float64Array(3);
  let innerError = 0;
  const lines = lines2(m);
  let R = 0;
  const offeredInSlice = (y1: number, y2: number) => { y[0] = R * y1; y[1] = R * y2; return offered(y); };
  const slice = (s: number): number => {
    R = Math.sqrt(Math.max(0, 1 - s * s));
    if (!(R > 0)) return 0;
    let n = 0;
    for (let i = 0; i < m; i++) {
      const ai = a[i]!;
      const na = Math.hypot(ai[0]!, ai[1]!);
      if (na < 1e-15) continue; // parallel to the slice: constant on it, decided by the points
      lines.ax[n] = ai[0]! / na;
      lines.ay[n] = ai[1]! / na;
      lines.t[n] = (t[i]! - ai[2]! * s) / (R * na);
      n++;
    }
    lines.n = n;
    y[2] = s;
    const p = diskProbability(lines, beta, offeredInSlice);
    const w = Math.pow(1 - s * s, half) / norm;
    innerError = Math.max(innerError, p.error);
    return w * p.value;
  };
  let value = 0;
  let error = 0;
  for (let c = 0; c + 1 < levels.length; c++) {
    const lo = levels[c]!, hi = levels[c + 1]!;
    if (!(hi - lo > 1e-15)) continue;
    // s = lo + (hi − lo)·τ²(3 − 2τ): the slice probability behaves like a power of the distance
    // to the piece's ends (a plane touching the sphere, the weight at ±1); the map raises that
    // power, so the rule converges fast (the cubic polynomial transformation used to periodize
    // integrands for lattice rules, I. H. Sloan and S. Joe, "Lattice Methods for Multiple
    // Integration", Oxford, 1994, §2.12 — from memory)
    const w = hi - lo;
    const r = integrateSmooth((tau) => 6 * tau * (1 - tau) * w * slice(lo + w * tau * tau * (3 - 2 * tau)), 0, 1, (SLICE_TOL * w) / 2);
    value += r.value;
    error += r.error;
  }
  return { value, error: error + innerError };
}

function cross3(p: number[], q: number[]): number[] {
  return [p[1]! * q[2]! - p[2]! * q[1]!, p[2]! * q[0]! - p[0]! * q[2]!, p[0]! * q[1]! - p[1]! * q[0]!];
}
/** Component c of p × q. */
const u3 = (p: number[], q: number[], c: number) => cross3(p, q)[c]!;

function solve3(p: number[], q: number[], r: number[], tp: number, tq: number, tr: number, det: number): number[] {
  // x = (tp·(q × r) + tq·(r × p) + tr·(p × q)) / det
  const qr = cross3(q, r), rp = cross3(r, p), pq = cross3(p, q);
  return [0, 1, 2].map((c) => (tp * qr[c]! + tq * rp[c]! + tr * pq[c]!) / det);
}
