// The approximate propensity score (APS) of every unit at every delta.
//
// Method (Y. Narita and K. Yata, "Algorithm is Experiment: Machine Learning, Market Design, and
// Policy Eligibility Rules", 2021): p(x; δ) is the average of the rule's offer probability A
// over the Euclidean ball of radius δ around the unit's continuous inputs (in scaled units),
// discrete inputs held fixed. Fenceline computes it exactly wherever geometry allows:
//   1. every criterion whose sign cannot change on the ball is constant there (linear criteria
//      by the distance to their hyperplane; others by interval bounds over the enclosing box);
//      if the rule's verdict is then determined (three-valued logic, logic.ts) the APS is A(x);
//   2. if the undecided criteria are all linear with parallel normals (one straddling cut-off is
//      the common case), the verdict depends only on the position along that normal, whose
//      distribution is the ball's one-dimensional marginal (cap fractions, ball-geometry.ts):
//      the APS is exact;
//   3. if they are all linear and their normals span two or three dimensions (a corner), the
//      verdict depends only on the projection onto that span, whose law is the ball's 2- or
//      3-dimensional marginal: the APS is integrated numerically to about 1e-10 (corners.ts);
//   4. otherwise (a non-linear criterion, or normals spanning more than three dimensions) the APS
//      is estimated from a randomized quasi-Monte Carlo point set in the ball (ball-points.ts),
//      with a standard error from independent replicates. A unit whose estimate comes out exactly
//      0 or 1 although its ball crosses an edge gets more points, doubling up to 64 times
//      (MAX_REFINEMENT): a sequential stopping rule of the kind common in Monte Carlo practice, so
//      a small but positive propensity does not drop the unit from the sample.

import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import { intervalColumns, evalColumn, gradColumn } from '../rules/evaluate-columns.ts';
import { compilePoint, type PointFn } from '../rules/evaluate-scalar.ts';
import { atomTruthColumn, holds } from '../rules/atoms.ts';
import { evalTree, evalTree3, FALSE, TRUE, UNKNOWN } from '../rules/logic.ts';
import type { Comparator } from '../rules/types.ts';
import { ballMarginalCdf } from './ball-geometry.ts';
import { ballPointExtension, MAX_REFINEMENT, type BallPointSet } from './ball-points.ts';
import { cornerProbability, type LinearCut } from './corners.ts';

export const METHOD_CONSTANT = 0;
export const METHOD_EXACT = 1;
export const METHOD_SIMULATED = 2;
export const METHOD_UNDEFINED = 3;
/** Exact up to a stated numerical-integration error: two or three independent linear criteria cross the ball. */
export const METHOD_EXACT_CORNER = 4;
export const METHOD_NAMES = ['constant', 'exact', 'simulated', 'undefined', 'exact-corner'] as const;
export type ApsMethodName = (typeof METHOD_NAMES)[number];

export interface ApsSettings {
  deltas: number[];
  draws: number;
  seed: number;
}

/** Per delta, one entry per unit. */
export interface ApsColumns {
  n: number;
  deltas: number[];
  aps: Float64Array[];
  /**
   * Standard error of a simulated APS; for an exact corner, the numerical integration's error
   * estimate (0 when constant or exact in closed form).
   */
  se: Float64Array[];
  method: Uint8Array[];
  /** Bit a set when atom a (a < 32) can change value on the unit's ball. */
  straddle: Uint32Array[];
  /**
   * Simulated units whose first estimate was exactly 0 or 1: the number of doublings of the draws
   * used (1 ... MAX_REFINEMENT), plus REFINED_AT_BOUND if still 0 or 1 after the last; 0 otherwise.
   */
  refined: Uint8Array[];
}

/** Flag in `refined`: the estimate was still exactly 0 or 1 after MAX_REFINEMENT doublings. */
export const REFINED_AT_BOUND = 128;

type AtomPlan =
  | { kind: 'fixed'; truth: Uint8Array }
  | { kind: 'linear'; op: Comparator; m0: Float64Array; w: Float64Array; norm: Float64Array }
  | { kind: 'nonlinear'; op: Comparator; index: number; fn: PointFn };

/** Precompute per-atom columns for a block of units (all deltas share them). */
function planAtoms(program: CompiledProgram, cols: DesignColumns, scales: ArrayLike<number>): AtomPlan[] {
  const d = program.continuous.length;
  const n = cols.n;
  return program.atoms.map((atom): AtomPlan => {
    if (atom.kind === 'member' || !atom.dependsOnContinuous) return { kind: 'fixed', truth: atomTruthColumn(atom, cols) };
    if (!atom.linear) return { kind: 'nonlinear', op: atom.op, index: atom.index, fn: compilePoint(atom.margin) };
    const m0 = evalColumn(atom.margin, cols);
    // scaled gradient w_j = ∂margin/∂x_j · scale_j: the margin at x + δ·scale∘z is m0 + δ⟨w, z⟩
    const w = new Float64Array(n * d);
    const norm = new Float64Array(n);
    for (let j = 0; j < d; j++) {
      const g = gradColumn(atom.margin, j, cols);
      if (!g) continue;
      const s = scales[j]!;
      for (let r = 0; r < n; r++) {
        const v = g[r]! * s;
        w[r * d + j] = v;
        norm[r] = norm[r]! + v * v;
      }
    }
    for (let r = 0; r < n; r++) norm[r] = Math.sqrt(norm[r]!);
    return { kind: 'linear', op: atom.op, m0, w, norm };
  });
}

/** Three-valued state of a criterion whose margin lies in [lo, hi] on the whole ball. */
function stateFromBounds(lo: number, hi: number, op: Comparator): number {
  if (Number.isNaN(lo) || Number.isNaN(hi)) return UNKNOWN;
  switch (op) {
    case '<=': return hi <= 0 ? TRUE : lo > 0 ? FALSE : UNKNOWN;
    case '<': return hi < 0 ? TRUE : lo >= 0 ? FALSE : UNKNOWN;
    case '>=': return lo >= 0 ? TRUE : hi < 0 ? FALSE : UNKNOWN;
    case '>': return lo > 0 ? TRUE : hi <= 0 ? FALSE : UNKNOWN;
    case '==': return lo > 0 || hi < 0 ? FALSE : lo === 0 && hi === 0 ? TRUE : UNKNOWN;
    case '!=': return lo > 0 || hi < 0 ? TRUE : lo === 0 && hi === 0 ? FALSE : UNKNOWN;
  }
}

/**
 * State of a linear criterion on the ball B(x, δ): constant when the hyperplane misses the
 * ball (|m0| ≥ δ‖w‖); `==` and `!=` are constant almost everywhere once the margin moves.
 */
function linearState(m0: number, norm: number, delta: number, op: Comparator): number {
  if (Number.isNaN(m0)) return UNKNOWN;
  if (norm === 0 || Math.abs(m0) >= norm * delta) return holds(m0, op) ? TRUE : FALSE;
  if (op === '==') return FALSE;
  if (op === '!=') return TRUE;
  return UNKNOWN;
}

export interface BlockOptions {
  /**
   * Diagnostics only (the benchmark): simulate every criterion that moves with a continuous
   * input, even where geometry gives the exact answer, to measure the simulation's error.
   */
  simulateAll?: boolean;
}

/** Compute the APS for every unit of `cols` (a block of a dataset) at every delta. Pure. */
export function computeApsBlock(
  program: CompiledProgram,
  cols: DesignColumns,
  scales: ArrayLike<number>,
  settings: ApsSettings,
  points: BallPointSet,
  options: BlockOptions = {},
): ApsColumns {
  const simulateAll = options.simulateAll === true;
  const n = cols.n;
  const d = program.continuous.length;
  const deltas = settings.deltas;
  const nd = deltas.length;
  const plans = planAtoms(program, cols, scales);
  const nAtoms = plans.length;
  const { ifEligible: qE, ifIneligible: qI } = program.offer;

  const aps = deltas.map(() => new Float64Array(n));
  const se = deltas.map(() => new Float64Array(n));
  const method = deltas.map(() => new Uint8Array(n));
  const straddle = deltas.map(() => new Uint32Array(n));
  const refined = deltas.map(() => new Uint8Array(n));

  // interval bounds of non-linear criteria over the box enclosing each ball, per delta
  const bounds: Array<Array<{ lo: Float64Array; hi: Float64Array } | null>> = deltas.map((delta) =>
    plans.map((p) => {
      if (p.kind !== 'nonlinear') return null;
      const half = Array.from({ length: d }, (_, j) => delta * scales[j]!);
      const atom = program.atoms[p.index]!;
      return atom.kind === 'compare' ? intervalColumns(atom.margin, cols, half) : null;
    }),
  );

  const state = new Uint8Array(nAtoms);
  const realState = new Uint8Array(nAtoms); // simulateAll only: the states geometry proves
  const unknown: number[] = [];
  const total = points.replicates * points.perReplicate;
  const proj = plans.map((p) => (p.kind === 'linear' ? new Float64Array(total) : null));
  const projFor = new Int32Array(nAtoms).fill(-1); // unit whose projections are cached
  const x0 = new Float64Array(d);
  const disc = new Float64Array(program.discrete.length);
  const repHits = new Float64Array(points.replicates);

  for (let r = 0; r < n; r++) {
    for (let k = 0; k < nd; k++) {
      const delta = deltas[k]!;
      unknown.length = 0;
      let mask = 0;
      for (let a = 0; a < nAtoms; a++) {
        const p = plans[a]!;
        let s: number;
        if (p.kind === 'fixed') s = p.truth[r]!;
        else if (p.kind === 'linear') s = linearState(p.m0[r]!, p.norm[r]!, delta, p.op);
        else { const b = bounds[k]![a]!; s = stateFromBounds(b.lo[r]!, b.hi[r]!, p.op); }
        if (simulateAll) { realState[a] = s; if (p.kind !== 'fixed') s = UNKNOWN; }
        state[a] = s;
        if (s === UNKNOWN) { unknown.push(a); if (a < 32) mask |= 1 << a; }
      }
      // more draws only where the ball is not proved to lie on one side of the edge
      const crossesEdge = !simulateAll || evalTree3(program.tree, realState) === UNKNOWN;
      straddle[k]![r] = mask >>> 0;
      const verdict = unknown.length === 0 ? (evalTree(program.tree, state) ? TRUE : FALSE) : evalTree3(program.tree, state);
      if (verdict !== UNKNOWN) {
        aps[k]![r] = verdict === TRUE ? qE : qI;
        method[k]![r] = METHOD_CONSTANT;
        continue;
      }

      const exact = simulateAll ? null : exactAlongCommonNormal(program, plans, unknown, state, r, d, delta);
      if (exact !== null) {
        aps[k]![r] = qI + (qE - qI) * exact;
        method[k]![r] = METHOD_EXACT;
        continue;
      }
      const corner = simulateAll ? null : exactCorner(program, plans, unknown, state, r, d, delta);
      if (corner !== null) {
        aps[k]![r] = qI + (qE - qI) * corner.value;
        se[k]![r] = Math.abs(qE - qI) * corner.error;
        method[k]![r] = METHOD_EXACT_CORNER;
        continue;
      }

      // simulation: the same points for every unit and delta
      for (const a of unknown) {
        const p = plans[a]!;
        if (p.kind === 'linear' && projFor[a] !== r) {
          const buf = proj[a]!;
          const pts = points.points;
          const off = r * d;
          for (let s = 0; s < total; s++) {
            let v = 0;
            for (let j = 0; j < d; j++) v += p.w[off + j]! * pts[s * d + j]!;
            buf[s] = v;
          }
          projFor[a] = r;
        }
      }
      for (let j = 0; j < d; j++) x0[j] = cols.continuous[j]![r]!;
      for (let j = 0; j < disc.length; j++) disc[j] = cols.discrete[j]![r]!;
      const table = verdictTable(program, unknown, state);
      const unit: UnitSim = { plans, unknown, verdict: table, r, delta, x0, disc, scales };
      repHits.fill(0);
      let undefinedPoint = countHits(unit, points, proj, repHits);
      let perRep = points.perReplicate;
      let hits = 0;
      for (let rep = 0; rep < points.replicates; rep++) hits += repHits[rep]!;
      const all = points.replicates * perRep;
      // the ball crosses an edge (unknown is not empty) but no point, or every point, was offered:
      // double the points until one lands on the other side, up to 2^MAX_REFINEMENT times
      if (!undefinedPoint && crossesEdge && (hits === 0 || hits === all)) {
        let level = 0;
        let total = all;
        while (level < MAX_REFINEMENT && (hits === 0 || hits === total)) {
          level++;
          const more = ballPointExtension(points, settings.seed, level);
          const add = new Float64Array(points.replicates);
          if (countHits(unit, more, null, add)) { undefinedPoint = true; break; }
          for (let rep = 0; rep < points.replicates; rep++) { repHits[rep] = repHits[rep]! + add[rep]!; hits += add[rep]!; }
          perRep += more.perReplicate;
          total = points.replicates * perRep;
        }
        refined[k]![r] = level | (hits === 0 || hits === total ? REFINED_AT_BOUND : 0);
      }
      if (undefinedPoint) {
        aps[k]![r] = NaN;
        method[k]![r] = METHOD_UNDEFINED;
        continue;
      }
      let mean = 0;
      for (let rep = 0; rep < points.replicates; rep++) mean += repHits[rep]! / perRep;
      mean /= points.replicates;
      let ss = 0;
      for (let rep = 0; rep < points.replicates; rep++) ss += (repHits[rep]! / perRep - mean) ** 2;
      const sdMean = Math.sqrt(ss / (points.replicates - 1) / points.replicates);
      aps[k]![r] = qI + (qE - qI) * mean;
      se[k]![r] = Math.abs(qE - qI) * sdMean;
      method[k]![r] = METHOD_SIMULATED;
    }
  }
  return { n, deltas: deltas.slice(), aps, se, method, straddle, refined };
}

/** The rule's verdict (1 = offer) for every combination of the undecided criteria, bit i for unknown[i]. */
function verdictTable(program: CompiledProgram, unknown: number[], state: Uint8Array): Uint8Array {
  const u = unknown.length;
  const verdict = new Uint8Array(1 << u);
  for (let mask = 0; mask < verdict.length; mask++) {
    for (let i = 0; i < u; i++) state[unknown[i]!] = (mask >> i) & 1 ? TRUE : FALSE;
    verdict[mask] = evalTree(program.tree, state) ? 1 : 0;
  }
  for (const a of unknown) state[a] = UNKNOWN;
  return verdict;
}

/** What the simulation of one unit at one delta needs. */
interface UnitSim {
  plans: AtomPlan[];
  unknown: number[];
  verdict: Uint8Array;
  r: number;
  delta: number;
  x0: Float64Array;
  disc: Float64Array;
  scales: ArrayLike<number>;
}

/**
 * Count, replicate by replicate, the points of `points` at which the rule offers on one unit's
 * ball (added to `repHits`). Linear margins come from `proj` (⟨w, z⟩ per point, cached per unit)
 * when given, else are computed here. Returns true if some point's margin was undefined (a
 * division by zero inside the ball).
 */
function countHits(unit: UnitSim, points: BallPointSet, proj: Array<Float64Array | null> | null, repHits: Float64Array): boolean {
  const { plans, unknown, verdict, r, delta, x0, disc, scales } = unit;
  const u = unknown.length;
  const d = x0.length;
  const pts = points.points;
  const x = new Float64Array(d);
  let undefinedPoint = false;
  for (let rep = 0; rep < points.replicates; rep++) {
    let hits = 0;
    const start = rep * points.perReplicate;
    for (let s = start; s < start + points.perReplicate; s++) {
      let mask = 0;
      let movedX = false;
      for (let i = 0; i < u; i++) {
        const p = plans[unknown[i]!]!;
        let m: number;
        if (p.kind === 'linear') {
          let v: number;
          if (proj) v = proj[unknown[i]!]![s]!;
          else { v = 0; for (let j = 0; j < d; j++) v += p.w[r * d + j]! * pts[s * d + j]!; }
          m = p.m0[r]! + delta * v;
        } else if (p.kind === 'nonlinear') {
          if (!movedX) { for (let j = 0; j < d; j++) x[j] = x0[j]! + delta * scales[j]! * pts[s * d + j]!; movedX = true; }
          m = p.fn(x, disc);
          if (Number.isNaN(m)) undefinedPoint = true;
        } else continue;
        if (holds(m, p.op)) mask |= 1 << i;
      }
      hits += verdict[mask]!;
    }
    repHits[rep] = repHits[rep]! + hits;
  }
  return undefinedPoint;
}

/**
 * When every undecided criterion is linear and their normals span two or three dimensions, the
 * exact offer probability on the unit ball (corners.ts), with its integration error; else null.
 */
function exactCorner(
  program: CompiledProgram,
  plans: AtomPlan[],
  unknown: number[],
  state: Uint8Array,
  r: number,
  d: number,
  delta: number,
): { value: number; error: number } | null {
  if (unknown.length < 2 || unknown.length > 24) return null;
  const cuts: LinearCut[] = [];
  for (const a of unknown) {
    const p = plans[a]!;
    if (p.kind !== 'linear') return null;
    cuts.push({ m: p.m0[r]!, w: p.w.subarray(r * d, r * d + d), op: p.op });
  }
  return cornerProbability(cuts, delta, d, verdictTable(program, unknown, state));
}

/**
 * When every undecided criterion is linear and all their normals are parallel, the verdict on the
 * ball is a function of s = ⟨u, z⟩ alone (u the common unit normal, z uniform in the unit ball).
 * Split [−1, 1] at each criterion's root, evaluate the rule on each piece and add the pieces'
 * probabilities under the ball's marginal CDF. Returns P(eligible), or null if not applicable.
 */
function exactAlongCommonNormal(
  program: CompiledProgram,
  plans: AtomPlan[],
  unknown: number[],
  state: Uint8Array,
  r: number,
  d: number,
  delta: number,
): number | null {
  const first = plans[unknown[0]!]!;
  if (first.kind !== 'linear') return null;
  const off = r * d;
  const n0 = first.norm[r]!;
  // slope of each margin along u: m(s) = m0 + δ·slope·s, slope = ±‖w‖
  const slopes: number[] = [];
  for (const a of unknown) {
    const p = plans[a]!;
    if (p.kind !== 'linear') return null;
    let dot = 0;
    for (let j = 0; j < d; j++) dot += p.w[off + j]! * first.w[off + j]!;
    const na = p.norm[r]!;
    if (Math.abs(Math.abs(dot) - na * n0) > 1e-12 * na * n0) return null;
    slopes.push(dot >= 0 ? na : -na);
  }
  const cuts = [-1, 1];
  unknown.forEach((a, i) => {
    const p = plans[a] as Extract<AtomPlan, { kind: 'linear' }>;
    const root = -p.m0[r]! / (delta * slopes[i]!);
    if (root > -1 && root < 1) cuts.push(root);
  });
  cuts.sort((a, b) => a - b);
  let prob = 0;
  for (let c = 0; c + 1 < cuts.length; c++) {
    const lo = cuts[c]!;
    const hi = cuts[c + 1]!;
    if (!(hi > lo)) continue;
    const mid = (lo + hi) / 2;
    unknown.forEach((a, i) => {
      const p = plans[a] as Extract<AtomPlan, { kind: 'linear' }>;
      state[a] = holds(p.m0[r]! + delta * slopes[i]! * mid, p.op) ? TRUE : FALSE;
    });
    if (evalTree(program.tree, state)) prob += ballMarginalCdf(hi, d) - ballMarginalCdf(lo, d);
  }
  for (const a of unknown) state[a] = UNKNOWN;
  return Math.min(1, Math.max(0, prob));
}

/** A view of rows [start, end) of the columns, without copying. */
export function sliceColumns(cols: DesignColumns, start: number, end: number): DesignColumns {
  return {
    n: end - start,
    continuous: cols.continuous.map((c) => c.subarray(start, end)),
    discrete: cols.discrete.map((c) => c.subarray(start, end)),
  };
}

/** Empty result arrays for n units. */
export function allocateApsColumns(n: number, deltas: number[]): ApsColumns {
  return {
    n,
    deltas: deltas.slice(),
    aps: deltas.map(() => new Float64Array(n)),
    se: deltas.map(() => new Float64Array(n)),
    method: deltas.map(() => new Uint8Array(n)),
    straddle: deltas.map(() => new Uint32Array(n)),
    refined: deltas.map(() => new Uint8Array(n)),
  };
}

/** Copy a block's results into the full arrays at row `start`. */
export function placeBlock(into: ApsColumns, block: ApsColumns, start: number): void {
  for (let k = 0; k < into.deltas.length; k++) {
    into.aps[k]!.set(block.aps[k]!, start);
    into.se[k]!.set(block.se[k]!, start);
    into.method[k]!.set(block.method[k]!, start);
    into.straddle[k]!.set(block.straddle[k]!, start);
    into.refined[k]!.set(block.refined[k]!, start);
  }
}
