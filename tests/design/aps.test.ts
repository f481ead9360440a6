import { describe, expect, it } from 'vitest';
import { computeApsBlock, METHOD_CONSTANT, METHOD_EXACT, METHOD_EXACT_CORNER, METHOD_SIMULATED } from '../../main/design/aps.ts';
import { ballPointSet } from '../../main/design/ball-points.ts';
import { computePropensity, type PropensityResult } from '../../main/design/propensity.ts';
import { createRng } from '../../main/design/random.ts';
import type { CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';
import { columns, compile, cont, disc, simpson } from './helpers.ts';

function run(p: CompiledProgram, cols: DesignColumns, deltas: number[], draws = 4000, seed = 1): PropensityResult {
  const r = computePropensity(p, cols, { deltas, draws, seed });
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.value;
}

describe('one cut-off in one dimension', () => {
  // Elementary geometry: the ball is the interval [x − δs, x + δs]; the offered part is x* ≥ c,
  // so APS = clip((x + δs − c) / (2δs), 0, 1).
  it('APS = clip((x + δ − c)/(2δ), 0, 1), exactly, with scale 1 and scale 2', () => {
    for (const scale of [1, 2]) {
      const p = compile([cont('x', scale)], { value: 'x', op: '>=', limit: 0.3 });
      const xs = Array.from({ length: 201 }, (_, i) => -1 + i * 0.01);
      const res = run(p, columns(p, xs.map((x) => ({ x }))), [0.05, 0.2, 0.5]);
      res.deltas.forEach((delta, k) => {
        xs.forEach((x, i) => {
          const h = delta * scale;
          const expected = Math.min(1, Math.max(0, (x + h - 0.3) / (2 * h)));
          expect(res.aps[k]![i]).toBeCloseTo(expected, 12);
          expect(res.method[k]![i]).not.toBe(METHOD_SIMULATED);
        });
      });
    }
  });

  it('a unit farther than δ from the cut-off has APS equal to its own offer, with no simulation', () => {
    const p = compile([cont('x', 1)], { value: 'x', op: '<', limit: 0 });
    const res = run(p, columns(p, [{ x: -0.5 }, { x: 0.5 }]), [0.1]);
    expect(Array.from(res.aps[0]!)).toEqual([1, 0]);
    expect(Array.from(res.method[0]!)).toEqual([METHOD_CONSTANT, METHOD_CONSTANT]);
  });
});

describe('one straddling hyperplane: exact cap fractions', () => {
  it('2-D: matches the circular-segment area r²·acos(h/r) − h·√(r² − h²) (handbook formula)', () => {
    // rule 2x + y ≤ 1 with scales (1.5, 0.5): in scaled units the normal is w = (3, 0.5)
    const p = compile([cont('x', 1.5), cont('y', 0.5)], { value: '2 * x + y', op: '<=', limit: 1 });
    const rng = createRng(3);
    const rows = Array.from({ length: 300 }, () => ({ x: rng.next() * 1.2 - 0.1, y: rng.next() * 1.2 - 0.1 }));
    const delta = 0.15;
    const res = run(p, columns(p, rows), [delta]);
    const wn = Math.hypot(2 * 1.5, 1 * 0.5);
    rows.forEach((row, i) => {
      const dist = (2 * row.x + row.y - 1) / wn; // signed distance, scaled units; > 0: ineligible side
      const r = delta;
      let expected: number;
      if (dist >= r) expected = 0;
      else if (dist <= -r) expected = 1;
      else {
        const h = Math.abs(dist);
        const segment = (r * r * Math.acos(h / r) - h * Math.sqrt(r * r - h * h)) / (Math.PI * r * r);
        expected = dist > 0 ? segment : 1 - segment;
      }
      expect(res.aps[0]![i]).toBeCloseTo(expected, 12);
    });
    expect(res.summary[0]!.simulated).toBe(0);
  });

  it('3-D: matches the spherical-cap volume πh²(3r − h)/3 (handbook formula)', () => {
    const p = compile([cont('a', 1), cont('b', 1), cont('c', 1)], { value: 'a + b + c', op: '>=', limit: 0.2 });
    const rows = Array.from({ length: 41 }, (_, i) => ({ a: -0.2 + i * 0.01, b: 0.1, c: 0.05 }));
    const delta = 0.1;
    const res = run(p, columns(p, rows), [delta]);
    rows.forEach((row, i) => {
      const dist = (row.a + row.b + row.c - 0.2) / Math.sqrt(3); // > 0: eligible side
      const r = delta;
      let expected: number;
      if (dist >= r) expected = 1;
      else if (dist <= -r) expected = 0;
      else {
        const h = r - Math.abs(dist); // height of the cap on the far side of the plane
        const cap = (Math.PI * h * h * (3 * r - h)) / 3 / ((4 / 3) * Math.PI * r ** 3);
        expected = dist > 0 ? 1 - cap : cap;
      }
      expect(res.aps[0]![i]).toBeCloseTo(expected, 12);
      if (expected > 0 && expected < 1) expect(res.method[0]![i]).toBe(METHOD_EXACT);
    });
  });

  it('d = 5 and 10: matches slice integration of the marginal density (1 − s²)^((d−1)/2)', () => {
    for (const d of [5, 10]) {
      const keys = Array.from({ length: d }, (_, j) => `v${j}`);
      const p = compile(keys.map((k) => cont(k, 1)), { value: 'v0', op: '<=', limit: 0 });
      const rows = [-0.08, -0.03, 0, 0.02, 0.07].map((v0) => Object.fromEntries(keys.map((k, j) => [k, j === 0 ? v0 : 0.3])));
      const res = run(p, columns(p, rows), [0.1]);
      rows.forEach((row, i) => {
        const t = -row.v0! / 0.1; // eligible where z0 ≤ t
        const f = (s: number) => Math.pow(1 - s * s, (d - 1) / 2);
        const expected = simpson(f, -1, t) / simpson(f, -1, 1);
        expect(res.aps[0]![i]).toBeCloseTo(expected, 9);
      });
    }
  });
});

describe('corners: two straddling criteria', () => {
  it('two perpendicular cut-offs through the centre: APS = 1/4 with "all" and 3/4 with "any" (symmetry), exactly; simulated within the bound', () => {
    const vars = [cont('x', 1), cont('y', 1)];
    const all = compile(vars, { all: [{ value: 'x', op: '<=', limit: 0 }, { value: 'y', op: '<=', limit: 0 }] });
    const any = compile(vars, { any: [{ value: 'x', op: '<=', limit: 0 }, { value: 'y', op: '<=', limit: 0 }] });
    const cols = columns(all, [{ x: 0, y: 0 }]);
    const a = run(all, cols, [0.1]);
    const b = run(any, cols, [0.1]);
    expect(a.method[0]![0]).toBe(METHOD_EXACT_CORNER);
    expect(a.aps[0]![0]).toBeCloseTo(0.25, 14);
    expect(b.aps[0]![0]).toBeCloseTo(0.75, 14);
    const sim = computeApsBlock(all, cols, [1, 1], a.settings, ballPointSet(2, 4000, 1), { simulateAll: true });
    expect(sim.method[0]![0]).toBe(METHOD_SIMULATED);
    expect(Math.abs(sim.aps[0]![0]! - 0.25)).toBeLessThan(4 * a.mcSdBound);
    expect(sim.se[0]![0]).toBeGreaterThan(0);
  });

  it('off-centre corners in the disk: exact to 1e-12; the simulation within its bound, its replicate SE covering the error', () => {
    // Exact value: the area of {z ∈ disk : z1 ≤ a, z2 ≤ b} over π, integrating the chord length
    // min(b, √(1 − z1²)) + √(1 − z1²) in closed form (∫√(1 − x²) dx = (x√(1 − x²) + asin x)/2).
    const exactCorner = (a: number, b: number) => {
      const F = (x: number) => (x * Math.sqrt(1 - x * x) + Math.asin(x)) / 2; // ∫√(1 − x²)
      const top = Math.min(1, a);
      if (b <= -1 || top <= -1) return 0;
      // where √(1 − z1²) < b the chord is cut by the circle: |z1| > √(1 − b²) (if b < 1)
      const x0 = b < 1 ? Math.sqrt(1 - b * b) : 0;
      let area = 0;
      const piece = (lo: number, hi: number, cut: boolean) => {
        if (!(hi > lo)) return;
        area += cut ? b * (hi - lo) + (F(hi) - F(lo)) : 2 * (F(hi) - F(lo));
      };
      if (b >= 1) piece(-1, top, false);
      else if (b >= 0) { piece(-1, Math.min(top, -x0), false); piece(Math.max(-1, -x0), Math.min(top, x0), true); piece(x0, top, false); }
      else piece(-x0, Math.min(top, x0), true); // b < 0: only where −√(1 − z1²) < b, i.e. |z1| < √(1 − b²)
      return area / Math.PI;
    };
    const p = compile([cont('x', 1), cont('y', 1)], { all: [{ value: 'x', op: '<=', limit: 0 }, { value: 'y', op: '<=', limit: 0 }] });
    const rng = createRng(17);
    const rows = Array.from({ length: 120 }, () => ({ x: (rng.next() - 0.5) * 0.12, y: (rng.next() - 0.5) * 0.12 }));
    const delta = 0.1;
    const cols = columns(p, rows);
    const res = run(p, cols, [delta], 4000, 9);
    const sim = computeApsBlock(p, cols, [1, 1], res.settings, ballPointSet(2, 4000, 9), { simulateAll: true });
    let covered = 0;
    let corners = 0;
    rows.forEach((row, i) => {
      const exact = exactCorner(-row.x / delta, -row.y / delta);
      expect(Math.abs(res.aps[0]![i]! - exact)).toBeLessThan(1e-12);
      const err = Math.abs(sim.aps[0]![i]! - exact);
      expect(err).toBeLessThan(4 * res.mcSdBound); // METHOD.md §1: MC SD at most 0.5/√S
      if (res.method[0]![i] === METHOD_EXACT_CORNER) {
        corners++;
        if (err <= 3 * sim.se[0]![i]! + 1e-6) covered++;
      }
    });
    expect(corners).toBeGreaterThan(60);
    expect(covered / corners).toBeGreaterThan(0.9);
  });
});

describe('discrete inputs, lookups, lotteries and logic', () => {
  it('a lookup limit by household size is a hyperplane per size; a lottery scales the APS', () => {
    const p = compile(
      [cont('income', 1000), disc('size')],
      { value: 'income', op: '<=', limit: { by: 'size', table: { '1': 21000, '2': 28000 }, else: '35000 + 7000 * (size - 3)' } },
      { ifEligible: 0.6, ifIneligible: 0 },
    );
    const rows = [
      { income: 21000, size: 1 }, // on the line: half the interval
      { income: 28500, size: 2 }, // 500 above, δ·scale = 1000: (1000 − 500)/2000 = 0.25
      { income: 41500, size: 4 }, // limit 42,000: 500 below → 0.75
      { income: 10000, size: 3 }, // far below
    ];
    const res = run(p, columns(p, rows), [1]);
    const expected = [0.5, 0.25, 0.75, 1].map((v) => 0.6 * v);
    expected.forEach((v, i) => expect(res.aps[0]![i]).toBeCloseTo(v, 12));
  });

  it('income per person (linear once size is fixed) is exact; "not" and "atLeast" follow the logic', () => {
    const vars = [cont('income', 1000), disc('size')];
    const p = compile(vars, { not: { value: 'income / size', op: '>', limit: 6000 } });
    const res = run(p, columns(p, [{ income: 12400, size: 2 }]), [0.5]);
    // per-person margin 6,200 − 6,000 = 200 per person = 400 of income; half-width 500 → (500 − 400)/1000
    expect(res.aps[0]![0]).toBeCloseTo(0.1, 12);
    expect(res.method[0]![0]).toBe(METHOD_EXACT);

    const q = compile([cont('x', 1), cont('y', 1)], {
      atLeast: 2,
      of: [{ value: 'x', op: '>=', limit: 0 }, { value: 'y', op: '>=', limit: 5 }, { value: 'x', op: '<=', limit: 10 }],
    });
    // y far below 5: needs both x criteria; at x = 0 one of them straddles → exact ½
    const r2 = run(q, columns(q, [{ x: 0, y: 0 }, { x: 3, y: 0 }, { x: 0, y: 5 }]), [0.1]);
    expect(r2.aps[0]![0]).toBeCloseTo(0.5, 12);
    expect(r2.aps[0]![1]).toBe(1);
    // at (0, 5) both x ≥ 0 and y ≥ 5 straddle through the centre and one of them must hold: 3/4
    expect(r2.aps[0]![2]).toBeCloseTo(0.75, 12);
    expect(r2.method[0]![2]).toBe(METHOD_EXACT_CORNER);
  });

  it('two parallel limits on the same variable are combined exactly (segment formula)', () => {
    // income ≤ 13,000 and income/2 ≤ 6,000 (i.e. income ≤ 12,000), with a second continuous input:
    // the eligible part of the disk is the segment beyond the nearer line.
    const p = compile([cont('income', 1000), cont('age', 10), disc('size')], {
      all: [{ value: 'income', op: '<=', limit: 13000 }, { value: 'income / size', op: '<=', limit: 6000 }],
    });
    const rows = [11000, 11800, 12000, 12300, 12900, 13100].map((income) => ({ income, age: 40, size: 2 }));
    const delta = 1.5; // radius 1,500 of income
    const res = run(p, columns(p, rows), [delta]);
    rows.forEach((row, i) => {
      const dist = (row.income - 12000) / 1000; // scaled distance to the binding line, > 0 ineligible
      const r = delta;
      const h = Math.abs(dist);
      const seg = h >= r ? 0 : (r * r * Math.acos(h / r) - h * Math.sqrt(r * r - h * h)) / (Math.PI * r * r);
      const expected = dist > 0 ? seg : 1 - seg;
      expect(res.aps[0]![i]).toBeCloseTo(expected, 12);
      expect(res.method[0]![i]).not.toBe(METHOD_SIMULATED);
    });
  });

  it('a non-linear criterion is proved constant by interval bounds far away and simulated near its edge', () => {
    const p = compile([cont('x', 1), cont('y', 1)], { value: 'x * y', op: '<=', limit: 1 });
    const rows = [{ x: 0.2, y: 0.2 }, { x: 3, y: 3 }, { x: 1, y: 1 }];
    const res = run(p, columns(p, rows), [0.1], 4000, 4);
    expect(res.method[0]![0]).toBe(METHOD_CONSTANT);
    expect(res.aps[0]![0]).toBe(1);
    expect(res.method[0]![1]).toBe(METHOD_CONSTANT);
    expect(res.aps[0]![1]).toBe(0);
    expect(res.method[0]![2]).toBe(METHOD_SIMULATED);
    // reference: plain Monte Carlo with 400,000 pseudo-random points in the disk around (1, 1)
    const rng = createRng(77);
    let hits = 0;
    const m = 400_000;
    for (let i = 0; i < m; i++) {
      let u: number, v: number;
      do { u = 2 * rng.next() - 1; v = 2 * rng.next() - 1; } while (u * u + v * v > 1);
      if ((1 + 0.1 * u) * (1 + 0.1 * v) <= 1) hits++;
    }
    const ref = hits / m;
    expect(Math.abs(res.aps[0]![2]! - ref)).toBeLessThan(4 * res.mcSdBound + 4 * Math.sqrt(0.25 / m));
  });
});

describe('settings and scaling', () => {
  it('without a scale, distances use the sample SD (n − 1) of the rows given, and record it', () => {
    const p = compile([cont('x')], { value: 'x', op: '>=', limit: 2 });
    const xs = [1, 2, 3, 4];
    const res = run(p, columns(p, xs.map((x) => ({ x }))), [0.5]);
    const sd = Math.sqrt(((1.5 ** 2 + 0.5 ** 2) * 2) / 3);
    expect(res.scales[0]).toEqual({ key: 'x', column: 'X', scale: sd, source: 'sample-sd' });
    const h = 0.5 * sd;
    expect(res.aps[0]![1]).toBeCloseTo(0.5, 12);
    expect(res.aps[0]![2]).toBeCloseTo(Math.min(1, (3 + h - 2) / (2 * h)), 12);
  });

  it('a constant column without a scale is refused with the variable path and what to do', () => {
    const p = compile([cont('x')], { value: 'x', op: '>=', limit: 2 });
    const r = computePropensity(p, columns(p, [{ x: 5 }, { x: 5 }]), { deltas: [0.1], draws: 100, seed: 1 });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problems[0]!.path).toBe('program.variables[0].scale');
      expect(r.problems[0]!.message).toMatch(/same value in every usable row/);
    }
  });

  it('bad settings are refused, each with its path', () => {
    const p = compile([cont('x', 1)], { value: 'x', op: '>=', limit: 2 });
    const r = computePropensity(p, columns(p, [{ x: 1 }]), { deltas: [0.1, -1], draws: 3.5, seed: -2 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.map((x) => x.path)).toEqual(['settings.deltas[1]', 'settings.draws', 'settings.seed']);
  });

  it('reports progress and stops when cancelled', () => {
    const p = compile([cont('x', 1)], { value: 'x', op: '>=', limit: 0.5 });
    const cols = columns(p, Array.from({ length: 1000 }, (_, i) => ({ x: i / 1000 })));
    const seen: number[] = [];
    run(p, cols, [0.1]);
    const r = computePropensity(p, cols, { deltas: [0.1], draws: 100, seed: 1 }, { blockSize: 100, onProgress: (e) => seen.push(e.done) });
    expect(r.ok).toBe(true);
    expect(seen[0]).toBe(0);
    expect(seen.at(-1)).toBe(1000);
    expect(seen.length).toBe(11);
    const signal = { aborted: false };
    expect(() => computePropensity(p, cols, { deltas: [0.1], draws: 100, seed: 1 }, {
      blockSize: 100, signal, onProgress: (e) => { if (e.done >= 300) signal.aborted = true; },
    })).toThrow(/cancelled/);
  });

  it('the same seed gives identical results; results move smoothly with delta', () => {
    const p = compile([cont('x', 1), cont('y', 1)], { any: [{ value: 'x', op: '<=', limit: 0 }, { value: 'y', op: '<=', limit: 0 }] });
    const cols = columns(p, [{ x: 0.01, y: -0.02 }]);
    const deltas = [0.1, 0.101, 0.102];
    const a = run(p, cols, deltas, 2000, 5);
    const b = run(p, cols, deltas, 2000, 5);
    expect(a.aps.map((x) => x[0])).toEqual(b.aps.map((x) => x[0]));
    // common points across deltas: neighbouring deltas give neighbouring values
    expect(Math.abs(a.aps[0]![0]! - a.aps[1]![0]!)).toBeLessThan(0.01);
    expect(Math.abs(a.aps[1]![0]! - a.aps[2]![0]!)).toBeLessThan(0.01);
  });
});
