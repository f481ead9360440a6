// Points spread uniformly over the unit ball, from a randomized quasi-Monte Carlo design.
//
// Base design: the Halton sequence (halton.ts). Randomization: a Cranley–Patterson rotation,
// one uniform shift modulo 1 per replicate (R. Cranley and T. N. L. Patterson, "Randomization
// of number theoretic methods for multiple integration", SIAM J. Numer. Anal. 13(6):904–914,
// 1976); independent replicates give an unbiased estimate and its standard error
// (P. L'Ecuyer and C. Lemieux, "Recent advances in randomized quasi-Monte Carlo methods", 2002,
// in Modeling Uncertainty, Kluwer, ch. 20).
//
// Cube-to-ball maps (each sends the uniform distribution on the cube to the uniform distribution
// on the ball): d = 1, z = 2v − 1; d = 2, polar z = √v₁·(cos 2πv₂, sin 2πv₂); d ≥ 3, z = v_{d+1}^{1/d}
// · G/‖G‖ with G_j = Φ⁻¹(v_j) (M. E. Muller, "A note on a method for generating points uniformly
// on N-dimensional spheres", Comm. ACM 2(4):19–20, 1959; radius by inversion of P(R ≤ r) = r^d).

import quantile from '@stdlib/stats-base-dists-normal-quantile';
import { haltonPoints } from './halton.ts';
import { createRng } from './random.ts';

/** Dimension of the cube design needed for a d-ball. */
export function cubeDimension(d: number): number {
  return d <= 2 ? d : d + 1;
}

const EPS = 2 ** -53;
const clampOpen = (v: number): number => (v <= 0 ? EPS : v >= 1 ? 1 - EPS : v);

/** Map one cube point (length cubeDimension(d)) into the unit d-ball, writing `out[offset..offset+d)`. */
export function cubeToBall(v: ArrayLike<number>, d: number, out: Float64Array, offset: number): void {
  if (d === 1) {
    out[offset] = 2 * v[0]! - 1;
    return;
  }
  if (d === 2) {
    const r = Math.sqrt(v[0]!);
    const a = 2 * Math.PI * v[1]!;
    out[offset] = r * Math.cos(a);
    out[offset + 1] = r * Math.sin(a);
    return;
  }
  let norm2 = 0;
  for (let j = 0; j < d; j++) {
    const g = quantile(clampOpen(v[j]!), 0, 1);
    out[offset + j] = g;
    norm2 += g * g;
  }
  const radius = Math.pow(clampOpen(v[d]!), 1 / d) / Math.sqrt(norm2);
  for (let j = 0; j < d; j++) out[offset + j] = out[offset + j]! * radius;
}

export interface BallPointSet {
  d: number;
  replicates: number;
  perReplicate: number;
  /** replicates × perReplicate points, each d coordinates, row-major. */
  points: Float64Array;
}

/** Number of independent randomizations used for a draw budget (common practice: 10). */
export function replicatesFor(draws: number): number {
  return Math.max(2, Math.min(10, Math.floor(draws / 16)));
}

/** The Cranley–Patterson shift of replicate `rep` (the same for the base set and its extensions). */
function replicateShift(seed: number, rep: number, dims: number): number[] {
  const rng = createRng(seed, 1000 + rep);
  return Array.from({ length: dims }, () => rng.next());
}

/** Halton points first, ..., first + count − 1, shifted by `shift` modulo 1 and mapped into the ball. */
function shiftedBallPoints(d: number, shift: number[], first: number, count: number, out: Float64Array, offset: number): void {
  const dims = cubeDimension(d);
  const base = haltonPoints(count, dims, first);
  const v = new Float64Array(dims);
  for (let p = 0; p < count; p++) {
    for (let j = 0; j < dims; j++) {
      const u = base[p * dims + j]! + shift[j]!;
      v[j] = u >= 1 ? u - 1 : u;
    }
    cubeToBall(v, d, out, offset + p * d);
  }
}

/**
 * The randomized point set for a study: depends only on (d, draws, seed), so every unit, every
 * delta and every worker sees the same points (results change smoothly with delta and do not
 * depend on how the work is split).
 */
export function ballPointSet(d: number, draws: number, seed: number): BallPointSet {
  const replicates = replicatesFor(draws);
  const perReplicate = Math.max(1, Math.ceil(draws / replicates));
  const dims = cubeDimension(d);
  const points = new Float64Array(replicates * perReplicate * d);
  for (let rep = 0; rep < replicates; rep++) {
    shiftedBallPoints(d, replicateShift(seed, rep, dims), 1, perReplicate, points, rep * perReplicate * d);
  }
  return { d, replicates, perReplicate, points };
}

/** Largest number of doublings of the draws for a unit whose simulated value is 0 or 1: 2^6 = 64× (common practice). */
export const MAX_REFINEMENT = 6;

const extensions = new Map<string, BallPointSet>();

/**
 * The points that double a study's point set for the `level`-th time (level 1 ... MAX_REFINEMENT):
 * per replicate, Halton points P·2^(level−1) + 1 ... P·2^level (P the base set's points per
 * replicate) under the same replicate's shift, so the base set and its first `level` extensions
 * together are the first P·2^level points of every replicate's randomized sequence. Like the base
 * set it depends only on (d, draws, seed); kept once computed (every worker computes its own).
 */
export function ballPointExtension(base: BallPointSet, seed: number, level: number): BallPointSet {
  const key = `${base.d}|${base.replicates}|${base.perReplicate}|${seed}|${level}`;
  const known = extensions.get(key);
  if (known) return known;
  const d = base.d;
  const dims = cubeDimension(d);
  const count = base.perReplicate * 2 ** (level - 1);
  const points = new Float64Array(base.replicates * count * d);
  for (let rep = 0; rep < base.replicates; rep++) {
    shiftedBallPoints(d, replicateShift(seed, rep, dims), count + 1, count, points, rep * count * d);
  }
  const set = { d, replicates: base.replicates, perReplicate: count, points };
  if (extensions.size >= 4 * MAX_REFINEMENT) extensions.clear();
  extensions.set(key, set);
  return set;
}
