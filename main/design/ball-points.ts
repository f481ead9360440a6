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

/**
 * The randomized point set for a study: depends only on (d, draws, seed), so every unit, every
 * delta and every worker sees the same points (results change smoothly with delta and do not
 * depend on how the work is split).
 */
export function ballPointSet(d: number, draws: number, seed: number): BallPointSet {
  const replicates = replicatesFor(draws);
  const perReplicate = Math.max(1, Math.ceil(draws / replicates));
  const dims = cubeDimension(d);
  const base = haltonPoints(perReplicate, dims, 1);
  const points = new Float64Array(replicates * perReplicate * d);
  const v = new Float64Array(dims);
  for (let rep = 0; rep < replicates; rep++) {
    const rng = createRng(seed, 1000 + rep);
    const shift = Array.from({ length: dims }, () => rng.next());
    for (let p = 0; p < perReplicate; p++) {
      for (let j = 0; j < dims; j++) {
        const u = base[p * dims + j]! + shift[j]!;
        v[j] = u >= 1 ? u - 1 : u;
      }
      cubeToBall(v, d, points, (rep * perReplicate + p) * d);
    }
  }
  return { d, replicates, perReplicate, points };
}
