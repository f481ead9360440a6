import { describe, expect, it } from 'vitest';
import { computeApsBlock, METHOD_EXACT_CORNER, METHOD_SIMULATED } from '../../main/design/aps.ts';
import { ballPointSet } from '../../main/design/ball-points.ts';
import { cornerProbability, lineIntegral, orthonormalBasis, wallis } from '../../main/design/corners.ts';
import { computePropensity, type PropensityResult } from '../../main/design/propensity.ts';
import { gaussLegendre, integrate } from '../../main/design/quadrature.ts';
import { createRng } from '../../main/design/random.ts';
import type { CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';
import type { Condition } from '../../main/rules/types.ts';
import { ballVolume, simpsonSmoothEnds, twoCutReference } from './corner-reference.ts';
import { columns, compile, cont, simpson } from './helpers.ts';

function run(p: CompiledProgram, cols: DesignColumns, deltas: number[], draws = 4000, seed = 1): PropensityResult {
  const r = computePropensity(p, cols, { deltas, draws, seed });
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.value;
}

const keys = (d: number) => Array.from({ length: d }, (_, j) => `v${j}`);
const vars = (d: number) => keys(d).map((k) => cont(k, 1));
/** A unit at the origin of every coordinate except those given. */
const at = (d: number, values: Record<string, number> = {}) => Object.fromEntries(keys(d).map((k) => [k, values[k] ?? 0]));

/** Plain Monte Carlo in all d dimensions: uniform points of the cube [−1, 1]^d kept when inside the ball (rejection). */
function monteCarlo(d: number, n: number, seed: number, inside: (z: Float64Array) => boolean): { p: number; sd: number } {
  const rng = createRng(seed, 7);
  const z = new Float64Array(d);
  let kept = 0, hits = 0;
  while (kept < n) {
    let r2 = 0;
    for (let j = 0; j < d; j++) { z[j] = 2 * rng.next() - 1; r2 += z[j]! * z[j]!; }
    if (r2 > 1) continue;
    kept++;
    if (inside(z)) hits++;
  }
  const p = hits / n;
  return { p, sd: Math.sqrt((p * (1 - p)) / n) };
}

describe('quadrature and helpers (published values)', () => {
  it('Gauss–Legendre nodes and weights: n = 3 is 0, ±√(3/5) with 8/9, 5/9 (Abramowitz and Stegun, Table 25.4)', () => {
    const { nodes, weights } = gaussLegendre(3);
    const pairs = Array.from(nodes, (x, i) => [x, weights[i]!] as const).sort((a, b) => a[0] - b[0]);
    expect(pairs[0]![0]).toBeCloseTo(-Math.sqrt(0.6), 15);
    expect(pairs[1]![0]).toBeCloseTo(0, 15);
    expect(pairs[2]![0]).toBeCloseTo(Math.sqrt(0.6), 15);
    expect(pairs[0]![1]).toBeCloseTo(5 / 9, 15);
    expect(pairs[1]![1]).toBeCloseTo(8 / 9, 15);
    // n = 10: largest node 0.9739065285171717 and its weight 0.0666713443086881 (A&S Table 25.4)
    const ten = gaussLegendre(10);
    expect(Math.max(...ten.nodes)).toBeCloseTo(0.9739065285171717, 14);
    expect(ten.weights[ten.nodes.indexOf(Math.max(...ten.nodes))]).toBeCloseTo(0.0666713443086881, 14);
  });

  it('adaptive integration: exact for x¹⁹, and √x on [0, 1] = 2/3 within its stated error', () => {
    expect(integrate((x) => x ** 19, -1, 1, 1e-14).value).toBeCloseTo(0, 14);
    expect(integrate((x) => x ** 18, -1, 1, 1e-14).value).toBeCloseTo(2 / 19, 14);
    const r = integrate(Math.sqrt, 0, 1, 1e-12);
    expect(Math.abs(r.value - 2 / 3)).toBeLessThan(Math.max(r.error, 1e-12));
  });

  it("Wallis's integrals ∫(1 − s²)^(n/2) ds: 2, π/2, 4/3, 3π/8, 16/15", () => {
    [2, Math.PI / 2, 4 / 3, (3 * Math.PI) / 8, 16 / 15].forEach((v, n) => expect(wallis(n)).toBeCloseTo(v, 14));
  });

  it('the line integral ∫(1 − t² sec² φ)^β dφ matches composite Simpson on φ directly', () => {
    for (const beta of [1.5, 2, 2.5, 5]) {
      for (const t of [0.02, 0.3, 0.8]) {
        const om = Math.acos(t);
        const f = (phi: number) => Math.pow(Math.max(0, 1 - (t * t) / Math.cos(phi) ** 2), beta);
        // the substitution φ = ω − w² smooths the (ω − φ)^β end
        const ref = simpson((w) => 2 * w * f(om - w * w), 0, Math.sqrt(om + 0.4), 200000);
        expect(lineIntegral(t, -0.4, om, beta).value).toBeCloseTo(ref, 10);
      }
    }
  });

  it('Gram–Schmidt gives an orthonormal basis of the span, dropping dependent normals', () => {
    const q = orthonormalBasis([[1, 1, 0, 0], [2, 2, 0, 0], [1, 0, 1, 0], [0, 1, -1, 0]], 4)!;
    expect(q.length).toBe(2); // the fourth is the first minus the third
    for (let i = 0; i < q.length; i++) for (let j = 0; j < q.length; j++) {
      const dot = q[i]!.reduce((s, x, k) => s + x * q[j]![k]!, 0);
      expect(dot).toBeCloseTo(i === j ? 1 : 0, 14);
    }
  });
});

describe('exact corners, two criteria (the disk marginal)', () => {
  it('two perpendicular cut-offs through the centre: 1/4 with "all", 3/4 with "any", in d = 2, 3, 5, 10 (symmetry)', () => {
    for (const d of [2, 3, 5, 10]) {
      const cuts: Condition[] = [{ value: 'v0', op: '<=', limit: 0 }, { value: 'v1', op: '<=', limit: 0 }];
      const all = compile(vars(d), { all: cuts });
      const any = compile(vars(d), { any: cuts });
      const cols = columns(all, [at(d)]);
      const a = run(all, cols, [0.1]);
      const b = run(any, cols, [0.1]);
      expect(a.method[0]![0]).toBe(METHOD_EXACT_CORNER);
      expect(a.aps[0]![0]).toBeCloseTo(0.25, 12);
      expect(b.aps[0]![0]).toBeCloseTo(0.75, 12);
      expect(a.summary[0]!.corner).toBe(1);
      expect(a.summary[0]!.cornerExact).toBe(1);
      expect(a.summary[0]!.exact).toBe(1);
    }
  });

  it('off-centre corners and non-orthogonal normals in d = 2, 3, 5: Cartesian-slice reference to 1e-10', () => {
    // rule: v0 ≤ 0 AND cos γ·v0 + sin γ·v1 ≤ 0, unit at (x0, x1, 0, …), δ = 0.2, scale 1:
    // in ball coordinates z1 ≤ −x0/δ and cos γ·z1 + sin γ·z2 ≤ −(cos γ·x0 + sin γ·x1)/δ
    const delta = 0.2;
    for (const d of [2, 3, 5]) {
      for (const gamma of [Math.PI / 2, 1.0, 2.4]) {
        const cg = Math.cos(gamma), sg = Math.sin(gamma);
        const p = compile(vars(d), { all: [{ value: 'v0', op: '<=', limit: 0 }, { value: `${cg} * v0 + ${sg} * v1`, op: '<=', limit: 0 }] });
        const units = [[0.03, -0.05], [-0.1, 0.12], [0.15, 0.02], [-0.02, -0.01]];
        const res = run(p, columns(p, units.map(([x0, x1]) => at(d, { v0: x0!, v1: x1! }))), [delta]);
        units.forEach(([x0, x1], i) => {
          const ref = twoCutReference(d, -x0! / delta, gamma, -(cg * x0! + sg * x1!) / delta);
          expect(Math.abs(res.aps[0]![i]! - ref)).toBeLessThan(1e-10);
          if (ref > 1e-9 && ref < 1 - 1e-9) expect(res.method[0]![i]).toBe(METHOD_EXACT_CORNER);
        });
      }
    }
  });

  it('normals in general position in d = 5 ("any", lottery offer): plain Monte Carlo in all five dimensions agrees', () => {
    // checks the projection property itself: nothing here uses the marginal density
    const d = 5;
    const w1 = [1, 1, 0, 0, 1];
    const w2 = [0, 1, -1, 2, 0];
    const p = compile(vars(d), {
      any: [{ value: 'v0 + v1 + v4', op: '>', limit: 0.1 }, { value: 'v1 - v2 + 2 * v3', op: '<=', limit: -0.05 }],
    }, { ifEligible: 0.7, ifIneligible: 0.2 });
    const x = [0.02, -0.03, 0.05, 0.01, 0];
    const delta = 0.1;
    const res = run(p, columns(p, [at(d, { v0: x[0]!, v1: x[1]!, v2: x[2]!, v3: x[3]!, v4: x[4]! })]), [delta]);
    expect(res.method[0]![0]).toBe(METHOD_EXACT_CORNER);
    const m1 = w1.reduce((s, w, j) => s + w * x[j]!, 0) - 0.1;
    const m2 = w2.reduce((s, w, j) => s + w * x[j]!, 0) + 0.05;
    const mc = monteCarlo(d, 1_000_000, 11, (z) => {
      const a = m1 + delta * w1.reduce((s, w, j) => s + w * z[j]!, 0) > 0;
      const b = m2 + delta * w2.reduce((s, w, j) => s + w * z[j]!, 0) <= 0;
      return a || b;
    });
    const exact = (res.aps[0]![0]! - 0.2) / 0.5;
    expect(mc.p).toBeGreaterThan(0.05);
    expect(mc.p).toBeLessThan(0.95);
    expect(Math.abs(exact - mc.p)).toBeLessThan(4.5 * mc.sd);
  });

  it('the exact value agrees with the existing simulation within its standard error', () => {
    const d = 3;
    const p = compile(vars(d), { all: [{ value: 'v0', op: '<=', limit: 0 }, { value: 'v0 + 2 * v1 - v2', op: '>=', limit: 0.05 }] });
    const rng = createRng(23);
    const rows = Array.from({ length: 150 }, () => at(d, { v0: (rng.next() - 0.5) * 0.15, v1: (rng.next() - 0.3) * 0.15, v2: (rng.next() - 0.5) * 0.1 }));
    const cols = columns(p, rows);
    const res = run(p, cols, [0.1], 4000, 5);
    const sim = computeApsBlock(p, cols, res.scales.map((s) => s.scale), res.settings, ballPointSet(d, 4000, 5), { simulateAll: true });
    let corners = 0, covered = 0;
    rows.forEach((_, i) => {
      if (res.method[0]![i] !== METHOD_EXACT_CORNER) return;
      corners++;
      expect(sim.method[0]![i]).toBe(METHOD_SIMULATED);
      const diff = Math.abs(res.aps[0]![i]! - sim.aps[0]![i]!);
      expect(diff).toBeLessThan(4 * res.mcSdBound);
      if (diff <= 3 * sim.se[0]![i]! + 1e-9) covered++;
    });
    expect(corners).toBeGreaterThan(40);
    expect(covered / corners).toBeGreaterThan(0.9);
  });
});

describe('exact corners, three criteria (slices of the 3-ball marginal)', () => {
  it('three perpendicular cut-offs through the centre: 1/8 with "all", 1/2 with "at least 2 of 3", in d = 3, 5, 10 (symmetry)', () => {
    for (const d of [3, 5, 10]) {
      const cuts: Condition[] = [0, 1, 2].map((j) => ({ value: `v${j}`, op: '<=', limit: 0 }));
      const all = compile(vars(d), { all: cuts });
      const two = compile(vars(d), { atLeast: 2, of: cuts });
      const cols = columns(all, [at(d)]);
      const a = run(all, cols, [0.1]);
      const b = run(two, cols, [0.1]);
      expect(a.method[0]![0]).toBe(METHOD_EXACT_CORNER);
      expect(a.aps[0]![0]).toBeCloseTo(1 / 8, 10);
      expect(b.aps[0]![0]).toBeCloseTo(1 / 2, 10);
      expect(a.se[0]![0]).toBeLessThan(1e-9);
    }
  });

  it('off-centre, non-orthogonal, in d = 3 and 5: plain Monte Carlo in all d dimensions agrees; stated error below 1e-9', () => {
    for (const d of [3, 5]) {
      const w = [[1, 0, 0, 0, 0], [0.5, 1, 0, 0, 0], [1, 1, 1, 0.3, 0]].map((r) => r.slice(0, d));
      const p = compile(vars(d), {
        atLeast: 2,
        of: [
          { value: 'v0', op: '<=', limit: 0.02 },
          { value: '0.5 * v0 + v1', op: '>=', limit: -0.01 },
          { value: d > 3 ? 'v0 + v1 + v2 + 0.3 * v3' : 'v0 + v1 + v2', op: '<', limit: 0.03 },
        ],
      });
      const limits = [0.02, -0.01, 0.03];
      const ops = ['<=', '>=', '<'];
      const delta = 0.08;
      const res = run(p, columns(p, [at(d)]), [delta]);
      expect(res.method[0]![0]).toBe(METHOD_EXACT_CORNER);
      expect(res.se[0]![0]).toBeLessThan(1e-9);
      const mc = monteCarlo(d, 1_000_000, 3 + d, (z) => {
        let count = 0;
        w.forEach((row, i) => {
          const m = delta * row.reduce((s, x, j) => s + x * z[j]!, 0) - limits[i]!;
          if (ops[i] === '<=' ? m <= 0 : ops[i] === '>=' ? m >= 0 : m < 0) count++;
        });
        return count >= 2;
      });
      expect(Math.abs(res.aps[0]![0]! - mc.p)).toBeLessThan(4.5 * mc.sd);
    }
  });

  it('d = 3, uniform ball: "all" of three axis cut-offs off the centre equals a nested Simpson integral', () => {
    // P(z1 ≤ a, z2 ≤ b, z3 ≤ c) for z uniform in the unit 3-ball: ∫∫ over (z1, z2) of the length of
    // {z3 ≤ c} ∩ [−h, h], h = √(1 − z1² − z2²), divided by the volume 4π/3; both integrals split at
    // their kinks, each piece by Simpson with smoothed ends
    const a = 0.3, b = -0.2, c = 0.1;
    const inner = (z1: number) => {
      const R = Math.sqrt(Math.max(0, 1 - z1 * z1));
      const len = (z2: number) => { const h = Math.sqrt(Math.max(0, R * R - z2 * z2)); return Math.max(0, Math.min(c, h) + h); };
      const top = Math.min(b, R);
      const splits = [-R, top];
      if (Math.abs(c) < R) for (const z of [-Math.sqrt(R * R - c * c), Math.sqrt(R * R - c * c)]) if (z > -R && z < top) splits.push(z);
      splits.sort((x, y) => x - y);
      let s = 0;
      for (let i = 0; i + 1 < splits.length; i++) s += simpsonSmoothEnds(len, splits[i]!, splits[i + 1]!, 400);
      return s;
    };
    const zs = [-1, a];
    for (const r2 of [1 - b * b, 1 - c * c, 1 - b * b - c * c]) if (r2 > 0) for (const z of [-Math.sqrt(r2), Math.sqrt(r2)]) if (z > -1 && z < a) zs.push(z);
    zs.sort((x, y) => x - y);
    let outer = 0;
    for (let i = 0; i + 1 < zs.length; i++) outer += simpsonSmoothEnds(inner, zs[i]!, zs[i + 1]!, 400);
    const ref = outer / ballVolume(3);
    const p = compile(vars(3), { all: [0, 1, 2].map((j) => ({ value: `v${j}`, op: '<=', limit: 0 })) });
    const delta = 0.1;
    const res = run(p, columns(p, [at(3, { v0: -a * delta, v1: -b * delta, v2: -c * delta })]), [delta]);
    expect(Math.abs(res.aps[0]![0]! - ref)).toBeLessThan(1e-9);
    const direct = cornerProbability(
      [0, 1, 2].map((j) => ({ m: -[a, b, c][j]!, w: [0, 1, 2].map((k) => (k === j ? 1 : 0)), op: '<=' as const })),
      1, 3, Uint8Array.from([0, 0, 0, 0, 0, 0, 0, 1]),
    )!;
    expect(direct.value).toBeCloseTo(res.aps[0]![0]!, 12);
  });

  it('four criteria whose normals span three dimensions are exact; spanning four, simulated', () => {
    const p = compile(vars(4), {
      all: [
        { value: 'v0', op: '<=', limit: 0 }, { value: 'v1', op: '<=', limit: 0 },
        { value: 'v2', op: '<=', limit: 0 }, { value: 'v0 + v1 + v2', op: '<=', limit: 0.01 },
      ],
    });
    const q = compile(vars(4), { all: [0, 1, 2, 3].map((j) => ({ value: `v${j}`, op: '<=', limit: 0 })) });
    const row = [at(4)];
    expect(run(p, columns(p, row), [0.1]).method[0]![0]).toBe(METHOD_EXACT_CORNER);
    const r = run(q, columns(q, row), [0.1]);
    expect(r.method[0]![0]).toBe(METHOD_SIMULATED);
    expect(r.summary[0]!.corner).toBe(1);
    expect(r.summary[0]!.cornerExact).toBe(0);
  });
});
