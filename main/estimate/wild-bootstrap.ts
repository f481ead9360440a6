// Wild cluster bootstrap for the just-identified 2SLS with few clusters: the restricted
// efficient wild bootstrap (WRE) of Davidson & MacKinnon (2010), "Wild bootstrap tests for IV
// regression", J. Business & Economic Statistics 28(1):128–144, with cluster-level weights
// (Cameron, Gelbach & Miller 2008, REStat 90:414–427, for the cluster wild bootstrap). Pure.
//
// Model, per the headline specification (aps-iv.ts): y = β·D + W·γ + u, D = π·Z + W·δ + v, W the
// intercept, the APS and the study's controls; X = [W, Z]. To test H0: β = β0:
//   1. restricted structural fit: ũ = residual of y − β0·D on W;
//   2. restricted efficient first stage: regress D on [W, Z, ũ]; π̃, δ̃ its coefficients on Z and
//      W, and ṽ = D − Z·π̃ − W·δ̃ (the fitted ũ term is left in ṽ, so ṽ keeps its correlation
//      with ũ — the "efficient" part of WRE);
//   3. bootstrap samples, one weight w_g per cluster for both equations:
//        D* = Z·π̃ + W·δ̃ + w_g·ṽ,   y* = β0·D* + W·γ̃ + w_g·ũ;
//   4. t* = (β̂* − β0)/se_CR1(β̂*) on each sample; p = share of |t*| ≥ |t̂|, t̂ = (β̂ − β0)/se_CR1(β̂).
// The 95% interval is {β0 : p(β0) > 0.05} by test inversion with the same weights for every β0:
// each end is bracketed starting from the CR1 Wald end with t(G − 1), searched outward by
// doubling when still accepted, and bisected to 1e-4 standard errors; an end not reached within
// 2^30 standard errors is unbounded (null), as weak instruments produce. (If p(β0) crosses the
// level more than once, this reports the crossing bracketed first: the set may then not be one
// interval, as with the Anderson–Rubin set.)
//
// Speed (why each replication costs O(G·K), not O(n)). Let c be the offer's row of (X'X)⁻¹X'
// (offer-design.ts), z̃ = c/‖c‖² the offer with W partialled out, e_Y and e_D the residuals of y
// and D on X, ρ̂ = c'y, π̂ = c'D, ẽ = e_Y − β0·e_D and κ = ρ̂ − β0·π̂. By Frisch–Waugh–Lovell
//   ũ = ẽ + κ·z̃,   α̃ = ẽ'e_D / ẽ'ẽ,   ṽ = e_D + α̃·κ·z̃,   π̃ = π̂ − α̃·κ,
// so ũ and ṽ are combinations of three fixed vectors (e_Y, e_D, z̃) with coefficients that depend on
// β0 only. For any such r and weights w, c'(w∘r) = Σ_g w_g A_g(r) and the per-cluster score of
// M_X(w∘r) is S_g = w_g·A_g(r) − P_g·Σ_h w_h Q_h(r), with A_g(r) = Σ_{i∈g} c_i r_i,
// Q_h(r) = Σ_{i∈h} q_i r_i (q_i the i-th row of the orthonormal basis Q₁ of X) and
// P_g = Σ_{i∈g} c_i q_i. On a sample, β̂* − β0 = c'u*/π̂* with π̂* = π̃ + c'v*, and the CR1 variance
// of β̂* is f·Σ_g (S_g(u*) − (β̂* − β0)·S_g(v*))² / π̂*² (offer-design.ts). The per-cluster sums
// are taken once in O(n·K); every β0 then costs O(G·K) to set up and O(G·K) per replication.
// tests/estimate/wild-bootstrap.test.ts checks the p-value against a brute-force loop that refits
// every bootstrap sample with tsls.ts.
//
// Weights: Rademacher (±1, probability ½ each); with fewer than 12 clusters Webb's six-point
// distribution ±√(1/2), ±1, ±√(3/2), probability 1/6 each (Webb 2023, "Reworking wild
// bootstrap-based inference for clustered errors", Canadian J. Economics 56(3):839–858), because
// Rademacher weights have only 2^G distinct draws. When the distinct draws number at most the
// replications (2^G or 6^G ≤ reps) every draw is enumerated once instead of sampled, and `reps` is
// that count. Otherwise draws come from the project's seeded generator (design/random.ts).

import { createRng } from '../design/random.ts';
import type { OfferDesign } from './offer-design.ts';
import { offerFit } from './offer-design.ts';
import { tCritical } from './student-t.ts';

/** Replications when draws are sampled: 9,999 so that α(B + 1) is a whole number for α = 0.05 and
 * 0.01, the choice Davidson & MacKinnon (2004, "Econometric Theory and Methods", §4.6) advise
 * (from memory); common practice. p = exceed/B, so a p-value of 0 means below 1/B. */
export const WILD_BOOTSTRAP_REPS = 9999;
/** The bootstrap is run when the clusters number fewer than this (common practice). */
export const WILD_BOOTSTRAP_MAX_CLUSTERS = 50;
/** Below this many clusters Webb's six-point weights replace Rademacher's (Webb 2023). */
export const WEBB_BELOW_CLUSTERS = 12;
/** Stream of the seeded generator reserved for these draws (any fixed number; design/random.ts). */
const BOOTSTRAP_STREAM = 0x77b0;

export type WildWeights = 'rademacher' | 'webb';

export interface WildBootstrapResult {
  /** Bootstrap p-value of H0: β = 0. */
  p: number;
  /** Test-inversion interval at `level`; null for an unbounded end. */
  ci: [number | null, number | null];
  weights: WildWeights;
  /** Replications (the number of distinct draws when they were enumerated). */
  reps: number;
  /** True when every distinct weight vector was used once (2^G or 6^G ≤ the replications asked). */
  enumerated: boolean;
  clusters: number;
}

export interface WildBootstrapInput {
  /** The factored design [1, APS, controls, Z] on the estimation sample, with CR1 clusters. */
  design: OfferDesign;
  /** Outcome and take-up on the estimation sample (take-up = the offer for the offer's effect). */
  y: Float64Array;
  d: Float64Array;
  seed: number;
  reps?: number;
  level?: number;
  /** Weights to use; default Webb below 12 clusters, else Rademacher. */
  weights?: WildWeights;
}

const WEBB_POINTS = [-Math.sqrt(1.5), -1, -Math.sqrt(0.5), Math.sqrt(0.5), 1, Math.sqrt(1.5)];

/** The weight matrix (reps × G, row-major) for G clusters: enumerated or drawn from the seed. */
export function bootstrapWeights(g: number, reps: number, kind: WildWeights, seed: number): { w: Float64Array; reps: number; enumerated: boolean } {
  const points = kind === 'rademacher' ? [-1, 1] : WEBB_POINTS;
  const m = points.length;
  const distinct = m ** g;
  if (distinct <= reps) {
    const w = new Float64Array(distinct * g);
    for (let b = 0; b < distinct; b++) {
      let code = b;
      for (let h = 0; h < g; h++) {
        w[b * g + h] = points[code % m]!;
        code = Math.floor(code / m);
      }
    }
    return { w, reps: distinct, enumerated: true };
  }
  const rng = createRng(seed, BOOTSTRAP_STREAM);
  const w = new Float64Array(reps * g);
  for (let k = 0; k < reps * g; k++) {
    w[k] = kind === 'rademacher' ? (rng.nextUint32() & 1 ? 1 : -1) : points[Math.floor(rng.next() * 6)]!;
  }
  return { w, reps, enumerated: false };
}

/** Ties between |t*| and |t̂| closer than this (relative) count as equal: the draw w ≡ 1
 * reproduces t̂ itself up to rounding. */
const TIE = 1e-9;

/** A prepared bootstrap: p(β0) for any β0 with the same draws. */
export interface WildBootstrapper {
  pValue(beta0: number): number;
  /** 2SLS estimate and its CR1 standard error on the data. */
  estimate: number;
  se: number;
  weights: WildWeights;
  reps: number;
  enumerated: boolean;
  clusters: number;
}

export function prepareWildBootstrap(input: WildBootstrapInput): WildBootstrapper {
  const { design, y, d } = input;
  const clusters = design.clusters;
  if (!clusters || clusters.count < 2) throw new Error('wild cluster bootstrap: needs a design with at least 2 clusters');
  if (!design.identified) throw new Error('wild cluster bootstrap: the offer is not identified');
  const n = design.n;
  const k = design.k;
  const G = clusters.count;
  const codes = clusters.codes;
  const c = design.weights;
  const q = design.dec.q;
  const f = design.factor;

  const fitY = offerFit(design, y);
  const fitD = offerFit(design, d);
  const rho = fitY.coef;
  const pi = fitD.coef;
  const eY = fitY.residuals;
  const eD = fitD.residuals;
  let cc = 0;
  for (let i = 0; i < n; i++) cc += c[i]! * c[i]!;
  // Per-cluster sums of the basis (e_Y, e_D, z̃ = c/‖c‖²): A[b][g], Q[b][g·k + l]; and P[g·k + l].
  const A = [new Float64Array(G), new Float64Array(G), new Float64Array(G)] as const;
  const Qs = [new Float64Array(G * k), new Float64Array(G * k), new Float64Array(G * k)] as const;
  const P = new Float64Array(G * k);
  const [A0, A1, A2] = A;
  const [Q0, Q1, Q2] = Qs;
  for (let i = 0; i < n; i++) {
    const g = codes[i]!;
    const ci = c[i]!;
    const r0 = eY[i]!;
    const r1 = eD[i]!;
    const r2 = ci / cc;
    A0[g] = A0[g]! + ci * r0;
    A1[g] = A1[g]! + ci * r1;
    A2[g] = A2[g]! + ci * r2;
    for (let l = 0; l < k; l++) {
      const ql = q[l * n + i]!;
      const j = g * k + l;
      Q0[j] = Q0[j]! + ql * r0;
      Q1[j] = Q1[j]! + ql * r1;
      Q2[j] = Q2[j]! + ql * r2;
      P[j] = P[j]! + ci * ql;
    }
  }
  let yy = 0;
  let yd = 0;
  let dd = 0;
  for (let i = 0; i < n; i++) {
    yy += eY[i]! * eY[i]!;
    yd += eY[i]! * eD[i]!;
    dd += eD[i]! * eD[i]!;
  }
  const beta = rho / pi;
  // CR1 se of β̂ from the structural residual e_Y − β̂·e_D (offer-design.ts).
  let ssHat = 0;
  for (let g = 0; g < G; g++) {
    const s = A0[g]! - beta * A1[g]!;
    ssHat += s * s;
  }
  const se = Math.sqrt((f * ssHat) / (pi * pi));

  const kind: WildWeights = input.weights ?? (G < WEBB_BELOW_CLUSTERS ? 'webb' : 'rademacher');
  const drawn = bootstrapWeights(G, input.reps ?? WILD_BOOTSTRAP_REPS, kind, input.seed);
  const W = drawn.w;
  const B = drawn.reps;

  const Au = new Float64Array(G);
  const Av = new Float64Array(G);
  const Qu = new Float64Array(G * k);
  const Qv = new Float64Array(G * k);
  const mu = new Float64Array(k);
  const mv = new Float64Array(k);

  const pValue = (beta0: number): number => {
    const kappa = rho - beta0 * pi;
    const ee = yy - 2 * beta0 * yd + beta0 * beta0 * dd;
    const ed = yd - beta0 * dd;
    const alpha = ee > 0 ? ed / ee : 0;
    const piTilde = pi - alpha * kappa;
    // ũ = e_Y − β0 e_D + κ z̃ ; ṽ = e_D + α̃κ z̃ (coefficients on the basis)
    const ak = alpha * kappa;
    for (let g = 0; g < G; g++) {
      Au[g] = A0[g]! - beta0 * A1[g]! + kappa * A2[g]!;
      Av[g] = A1[g]! + ak * A2[g]!;
      for (let l = 0; l < k; l++) {
        const j = g * k + l;
        Qu[j] = Q0[j]! - beta0 * Q1[j]! + kappa * Q2[j]!;
        Qv[j] = Q1[j]! + ak * Q2[j]!;
      }
    }
    const tHat = Math.abs((beta - beta0) / se);
    const bar = tHat * (1 - TIE);
    let exceed = 0;
    for (let b = 0; b < B; b++) {
      const off = b * G;
      let cu = 0;
      let cv = 0;
      mu.fill(0);
      mv.fill(0);
      for (let h = 0; h < G; h++) {
        const wh = W[off + h]!;
        cu += wh * Au[h]!;
        cv += wh * Av[h]!;
        const o = h * k;
        for (let l = 0; l < k; l++) {
          mu[l] = mu[l]! + wh * Qu[o + l]!;
          mv[l] = mv[l]! + wh * Qv[o + l]!;
        }
      }
      const piStar = piTilde + cv;
      const dev = cu / piStar;
      let ss = 0;
      for (let g = 0; g < G; g++) {
        const wg = W[off + g]!;
        const o = g * k;
        let pu = 0;
        let pv = 0;
        for (let l = 0; l < k; l++) {
          pu += P[o + l]! * mu[l]!;
          pv += P[o + l]! * mv[l]!;
        }
        const s = wg * Au[g]! - pu - dev * (wg * Av[g]! - pv);
        ss += s * s;
      }
      const tStar = Math.abs(dev * piStar) / Math.sqrt(f * ss);
      if (tStar >= bar) exceed++;
    }
    return exceed / B;
  };
  return { pValue, estimate: beta, se, weights: kind, reps: B, enumerated: drawn.enumerated, clusters: G };
}

/** Bisection stops when an end is pinned to this many standard errors (the p-value is a step
 * function of β0, and the interval is reported to about four significant digits). */
const END_TOLERANCE = 1e-4;
/** Doublings of the outward search before an end is declared unbounded (2^30 standard errors). */
const MAX_DOUBLINGS = 30;

/** p-value of β = 0 and the test-inversion interval (Davidson & MacKinnon 2010, WRE). */
export function wildClusterBootstrap(input: WildBootstrapInput): WildBootstrapResult {
  const boot = prepareWildBootstrap(input);
  const level = input.level ?? 0.95;
  const alpha = 1 - level;
  const accept = (b0: number) => boot.pValue(b0) > alpha;
  const scale = boot.se > 0 && Number.isFinite(boot.se) ? boot.se : Math.max(1, Math.abs(boot.estimate));
  // First guess: the CR1 Wald end with t(G − 1) (student-t.ts); then outward doubling or inward
  // bisection. p(β̂) = 1, so β̂ is always inside.
  const first = tCritical(level, boot.clusters - 1) * scale;
  const end = (sign: 1 | -1): number | null => {
    let inside = boot.estimate;
    let outside = boot.estimate + sign * first;
    let step = first;
    let doublings = 0;
    while (accept(outside)) {
      inside = outside;
      step *= 2;
      outside = boot.estimate + sign * step;
      if (++doublings > MAX_DOUBLINGS) return null;
    }
    while (Math.abs(outside - inside) > END_TOLERANCE * scale) {
      const mid = 0.5 * (inside + outside);
      if (accept(mid)) inside = mid;
      else outside = mid;
    }
    return 0.5 * (inside + outside);
  };
  const lo = end(-1);
  const hi = end(1);
  return { p: boot.pValue(0), ci: [lo, hi], weights: boot.weights, reps: boot.reps, enumerated: boot.enumerated, clusters: boot.clusters };
}
