// Exact geometry of a uniform distribution on the unit ball in R^d.
//
// The fraction of the ball's volume beyond a hyperplane at signed distance t (|t| < 1, in
// units of the radius) is the hyperspherical cap fraction
//     cap_d(t) = ½ · I_{1−t²}((d + 1)/2, ½)         (t ≥ 0),
// I the regularized incomplete beta function (S. Li, "Concise formulas for the area and volume
// of a hyperspherical cap", Asian J. Math. Stat. 4(1):66–70, 2011, eq. for the volume).
// Closed forms used for d ≤ 3 (elementary geometry: an interval; a circular segment,
// area r²·acos(t/r) − t·√(r² − t²); a spherical cap, volume πh²(3r − h)/3).

import betainc from '@stdlib/math-base-special-betainc';

/** Fraction of the unit d-ball with ⟨z, u⟩ > t, for a unit vector u. */
export function capFraction(t: number, d: number): number {
  if (!(t > -1)) return 1;
  if (!(t < 1)) return 0;
  if (t < 0) return 1 - capFraction(-t, d);
  switch (d) {
    case 1:
      return (1 - t) / 2;
    case 2:
      return (Math.acos(t) - t * Math.sqrt(1 - t * t)) / Math.PI;
    case 3:
      return ((1 - t) * (1 - t) * (2 + t)) / 4;
    default:
      return 0.5 * betainc(1 - t * t, (d + 1) / 2, 0.5);
  }
}

/** P(⟨z, u⟩ ≤ t) for z uniform on the unit d-ball: the ball's one-dimensional marginal CDF. */
export function ballMarginalCdf(t: number, d: number): number {
  return 1 - capFraction(t, d);
}
