// One-dimensional numerical integration for the exact corner computations (corners.ts).
//
// Gauss–Legendre rule: the n nodes are the roots of the Legendre polynomial P_n, found by Newton's
// method from the starting values cos(π(i − ¼)/(n + ½)); the weights are 2 / ((1 − x²)·P_n'(x)²)
// (M. Abramowitz and I. A. Stegun, "Handbook of Mathematical Functions", 1964, §25.4.29; the
// starting values are F. G. Tricomi's asymptotic approximation of the roots). The n-point rule is
// exact for polynomials of degree 2n − 1.
//
// Adaptive bisection: an interval is accepted when the rule on the whole interval and the sum of
// the rule on its two halves agree within the tolerance; otherwise each half is refined with half
// the tolerance (the global-error strategy of adaptive quadrature, P. J. Davis and P. Rabinowitz,
// "Methods of Numerical Integration", 2nd ed., 1984, §6.2). The reported error is the sum of the
// accepted differences: an estimate of the coarse rule's error, so a conservative one for the
// finer value returned.

export interface Integral {
  value: number;
  /** Estimated absolute error (conservative: the disagreement between two resolutions). */
  error: number;
}

/** Nodes and weights of the n-point Gauss–Legendre rule on [−1, 1]. */
export function gaussLegendre(n: number): { nodes: Float64Array; weights: Float64Array } {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      // three-term recurrence (A&S 22.7.10): (k + 1)·P_{k+1} = (2k + 1)·x·P_k − k·P_{k−1}
      let p0 = 1;
      let p1 = x;
      for (let k = 1; k < n; k++) {
        const p2 = ((2 * k + 1) * x * p1 - k * p0) / (k + 1);
        p0 = p1;
        p1 = p2;
      }
      const pn = n === 0 ? 1 : p1;
      const pm = n === 1 ? 1 : p0;
      dp = (n * (x * pn - pm)) / (x * x - 1); // A&S 22.8.5
      const dx = pn / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    nodes[i] = x;
    weights[i] = 2 / ((1 - x * x) * dp * dp);
  }
  return { nodes, weights };
}

const RULE = gaussLegendre(10);
const RULE5 = gaussLegendre(5);

/** The 10-point Gauss–Legendre rule on [a, b]. */
export function gauss10(f: (x: number) => number, a: number, b: number): number {
  const half = (b - a) / 2;
  const mid = (a + b) / 2;
  let s = 0;
  for (let i = 0; i < 10; i++) s += RULE.weights[i]! * f(mid + half * RULE.nodes[i]!);
  return s * half;
}

/**
 * ∫_a^b f for a smooth f: the 10-point rule, accepted when the 5-point rule agrees with it within
 * `tol` (then the difference, an estimate of the 5-point rule's error, is a conservative error
 * for the 10-point value); otherwise adaptive bisection. Fifteen evaluations where the integrand
 * is smooth on [a, b], against thirty for `integrate`.
 */
export function integrateSmooth(f: (x: number) => number, a: number, b: number, tol: number): Integral {
  if (!(b > a)) return { value: 0, error: 0 };
  const half = (b - a) / 2;
  const mid = (a + b) / 2;
  let s5 = 0;
  for (let i = 0; i < 5; i++) s5 += RULE5.weights[i]! * f(mid + half * RULE5.nodes[i]!);
  s5 *= half;
  const s10 = gauss10(f, a, b);
  const diff = Math.abs(s10 - s5);
  if (diff <= tol) return { value: s10, error: diff };
  const out = { value: 0, error: 0 };
  refine(f, a, b, s10, Math.max(tol, 1e-17), 24, out);
  return out;
}

/**
 * ∫_a^b f by adaptive bisection of the 10-point Gauss–Legendre rule, to an absolute tolerance.
 * `maxDepth` bounds the bisection; an interval still unresolved there is accepted with its
 * difference counted in the error.
 */
export function integrate(f: (x: number) => number, a: number, b: number, tol: number, maxDepth = 24): Integral {
  if (!(b > a)) return { value: 0, error: 0 };
  const out = { value: 0, error: 0 };
  refine(f, a, b, gauss10(f, a, b), Math.max(tol, 1e-17), maxDepth, out);
  return out;
}

function refine(f: (x: number) => number, a: number, b: number, whole: number, tol: number, depth: number, out: Integral): void {
  const m = (a + b) / 2;
  const left = gauss10(f, a, m);
  const right = gauss10(f, m, b);
  const diff = Math.abs(left + right - whole);
  // below a few rounding errors of the value itself the difference is noise, not error: accept
  // (otherwise a tolerance halved below the rounding level would split every interval)
  const noise = 64 * Number.EPSILON * (Math.abs(left) + Math.abs(right));
  if (diff <= tol || diff <= noise || depth <= 0 || !(m > a && b > m)) {
    out.value += left + right;
    out.error += diff;
    return;
  }
  refine(f, a, m, left, tol / 2, depth - 1, out);
  refine(f, m, b, right, tol / 2, depth - 1, out);
}
