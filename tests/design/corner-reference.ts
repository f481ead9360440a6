// Independent reference values for corners of the uniform d-ball, computed in Cartesian slices
// (not in the polar sectors of main/design/corners.ts).
//
// Slice volumes (Fubini): the set of the unit d-ball with given first two coordinates (z1, z2) is a
// (d − 2)-ball of radius √(1 − z1² − z2²), so (z1, z2) has density V_{d−2}/V_d·(1 − z1² − z2²)^((d−2)/2)
// = d/(2π)·(…)^((d−2)/2), using V_d = (2π/d)·V_{d−2} for the volume of the unit d-ball (the
// standard recurrence, e.g. NIST DLMF §5.19(iii)). Inner integral over z2 = R·sin u in closed form by
// the reduction formula ∫cosⁿu du = cosⁿ⁻¹u·sin u/n + (n − 1)/n·∫cosⁿ⁻²u du; outer integral over
// z1 = sin v by composite Simpson's rule, split where the integrand has a square-root kink and with
// the substitution v = end ± w² next to every split so that kink becomes smooth.

import { simpson } from './helpers.ts';

/** ∫_{−π/2}^{U} cosⁿu du (n ≥ 0) by the reduction formula. */
export function cosPowerIntegral(n: number, U: number): number {
  if (n === 0) return U + Math.PI / 2;
  if (n === 1) return Math.sin(U) + 1;
  return (Math.pow(Math.cos(U), n - 1) * Math.sin(U)) / n + ((n - 1) / n) * cosPowerIntegral(n - 2, U);
}

/** Simpson on [lo, hi] after v = lo + w² on the left half and v = hi − w² on the right half. */
export function simpsonSmoothEnds(f: (v: number) => number, lo: number, hi: number, m = 4000): number {
  if (!(hi > lo)) return 0;
  const mid = (lo + hi) / 2;
  const h = Math.sqrt(mid - lo);
  const left = simpson((w) => 2 * w * f(lo + w * w), 0, h, m);
  const right = simpson((w) => 2 * w * f(hi - w * w), 0, h, m);
  return left + right;
}

/**
 * P(z1 ≤ t1 and cos γ·z1 + sin γ·z2 ≤ t2) for z uniform on the unit d-ball (0 < γ < π): two
 * half-spaces whose normals e1 and (cos γ, sin γ) make the angle γ.
 */
export function twoCutReference(d: number, t1: number, gamma: number, t2: number): number {
  const cg = Math.cos(gamma);
  const sg = Math.sin(gamma);
  const n = d - 2;
  // for z1 = sin v: the z2-interval is [−R, min(R, (t2 − cg·z1)/sg)], R = cos v
  const f = (v: number) => {
    const z1 = Math.sin(v);
    const R = Math.cos(v);
    if (!(R > 0)) return 0;
    const upper = (t2 - cg * z1) / sg;
    if (upper <= -R) return 0;
    const U = upper >= R ? Math.PI / 2 : Math.asin(upper / R);
    return (d / (2 * Math.PI)) * Math.pow(R, n + 1) * cosPowerIntegral(n + 1, U) * R; // · dz1/dv = cos v
  };
  // kinks: where the second line meets the circle, z1 = cg·t2 ± sg·√(1 − t2²)
  const top = Math.asin(Math.min(1, Math.max(-1, t1)));
  const splits = [-Math.PI / 2, top];
  if (Math.abs(t2) < 1) {
    for (const z of [cg * t2 - sg * Math.sqrt(1 - t2 * t2), cg * t2 + sg * Math.sqrt(1 - t2 * t2)]) {
      const v = Math.asin(z);
      if (v > -Math.PI / 2 && v < top) splits.push(v);
    }
  }
  splits.sort((a, b) => a - b);
  let total = 0;
  for (let i = 0; i + 1 < splits.length; i++) total += simpsonSmoothEnds(f, splits[i]!, splits[i + 1]!);
  return total;
}

/** Volume of the unit d-ball, V_d = π^(d/2)/Γ(d/2 + 1), through the recurrence V_d = (2π/d)·V_{d−2}. */
export function ballVolume(d: number): number {
  let v = d % 2 === 0 ? 1 : 2;
  for (let j = d % 2 === 0 ? 2 : 3; j <= d; j += 2) v *= (2 * Math.PI) / j;
  return v;
}
