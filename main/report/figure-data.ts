// The data behind the memo's figures, from one run's per-unit arrays (StudyRun). Pure: values in,
// values out. Counts are suppressed here (suppress.ts, docs/method.md §7) before they leave, and a
// mean over a bin with a hidden count is dropped, so a figure never shows a small cell.
//
//  - Boundary-region map: of the pairs of continuous inputs, the one with most units near the
//    edge at the headline delta (a unit counts for a pair when its ball crosses a criterion that
//    mentions either input). The offer probability is the rule's own verdict on a grid (rules/
//    atoms.ts `verdicts` on synthetic DesignColumns); the band is where 0 < APS < 1 at the headline
//    delta, computed on the same grid by the design engine itself (design/aps.ts) with the run's
//    scales; discrete inputs are fixed at their most common combination among units near the edge
//    and other continuous inputs at their median there (named in the panel note).
//  - Signed distance to the nearest edge (docs/memo.md): for each linear criterion that moves with
//    a continuous input and whose reversal alone would reverse the unit's verdict, the distance
//    in scaled units to its plane is |m(x)| / ‖∇m · scale‖ (the margin m is affine, so this is
//    exact for that plane); the unit's distance is the smallest, positive when eligible and
//    negative when not. Units with no such criterion are left out of these figures.
//  - Density: counts of value − limit in bins of the density test's width (results.density),
//    widened so at most 50 bins fall on each side and rounded up to a round width, over the
//    test's bandwidth (the bins' edges sit on multiples of the width, so the limit is an edge).
//  - Balance over all units: (mean among offered − mean among not offered) / √((s₁² + s₀²)/2)
//    (Austin 2009, Statistics in Medicine 28(25):3083–3107), no adjustment.

import { computeApsBlock } from '../design/aps.ts';
import { ballPointSet } from '../design/ball-points.ts';
import { atomTruthColumn, treeColumn, verdicts } from '../rules/atoms.ts';
import { evalColumn, gradColumn } from '../rules/evaluate-columns.ts';
import type { CompiledProgram, DesignColumns, IrNode } from '../rules/ir.ts';
import type { StudyRun } from '../study.ts';
import type {
  AxisVariable, BinnedSeries, BoundaryMapData, DensityFigureData, FigureData, SignedDistanceData,
} from './model/figure-types.ts';
import { headlineIndex } from './model/memo-format.ts';
import { dependentFigure, suppressBinnedCounts, suppressCount } from './model/suppress.ts';

export interface FigureDataOptions {
  /** Cells per side of the offer-probability grid (default 60). */
  mapCells?: number;
  /** Bins per side of the unit-count grid (default 20 across, 16 up). */
  countCells?: [number, number];
  /** Ball points for the band on the grid (default: the run's draws, at most 1,000). */
  draws?: number;
  /** Bins on each side of the edge in the distance figures (default 10). */
  distanceBins?: number;
}

/** The input nodes an expression mentions. */
function mentions(node: IrNode, i: number): boolean {
  switch (node.k) {
    case 'const': case 'disc': return false;
    case 'cont': return node.i === i;
    case 'neg': return mentions(node.a, i);
    case 'min': case 'max': return node.args.some((a) => mentions(a, i));
    case 'lookup': return [...node.table.values()].some((a) => mentions(a, i)) || (node.otherwise !== null && mentions(node.otherwise, i));
    default: return mentions(node.a, i) || mentions(node.b, i);
  }
}

function quantile(sorted: Float64Array, q: number): number {
  if (!sorted.length) return NaN;
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (pos - lo);
}

function sortedFinite(values: ArrayLike<number>, keep: (r: number) => boolean): Float64Array {
  const out: number[] = [];
  for (let r = 0; r < values.length; r++) if (keep(r) && Number.isFinite(values[r]!)) out.push(values[r]!);
  return Float64Array.from(out).sort();
}

function edges(lo: number, hi: number, cells: number): number[] {
  return Array.from({ length: cells + 1 }, (_, i) => lo + ((hi - lo) * i) / cells);
}

function variableAxis(program: CompiledProgram, j: number): AxisVariable {
  const v = program.continuous[j]!.variable;
  return { key: v.key, label: v.label ?? v.key, ...(v.unit ? { unit: v.unit } : {}) };
}

/** The smallest of 1, 2, 2.5, 5 × 10^k at least x (round axis steps; common practice). */
export function niceStep(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 1;
  const p = Math.pow(10, Math.floor(Math.log10(x)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= x * (1 - 1e-12)) return m * p;
  return 10 * p;
}

/** [lo, hi] widened to multiples of a round step (about a tenth of the range). */
function niceRange(lo: number, hi: number): [number, number] {
  const step = niceStep((hi - lo) / 10);
  return [Math.floor(lo / step) * step, Math.ceil(hi / step) * step];
}

const fmt = (v: number) => v.toLocaleString('en-US', { maximumSignificantDigits: 4 });

export function boundaryMapData(run: StudyRun, opts: FigureDataOptions = {}): { map: BoundaryMapData | null; note: string | null } {
  const { program, prepared, propensity, results } = run;
  const cols = prepared.cols;
  const k = headlineIndex(results);
  const d = program.continuous.length;
  if (d < 2) return { map: null, note: `The map of the rule’s edge needs two continuous inputs; this rule has ${d === 1 ? 'one' : 'none'}, so the edge is shown in the distance and density figures instead.` };
  const aps = propensity.aps[k]!;
  const straddle = propensity.straddle[k]!;
  const near: number[] = [];
  for (let r = 0; r < cols.n; r++) if (aps[r]! > 0 && aps[r]! < 1) near.push(r);
  if (!near.length) return { map: null, note: 'No unit is near the edge of the rule at the headline delta, so there is no band to map.' };

  // The pair of continuous inputs with most units near a criterion that mentions one of them.
  const atomMentions = program.atoms.map((a) => program.continuous.map((_, j) => a.kind === 'compare' && mentions(a.margin, j)));
  let best: [number, number] = [0, 1];
  let bestCount = -1;
  for (let a = 0; a < d; a++) for (let b = a + 1; b < d; b++) {
    let count = 0;
    for (const r of near) {
      const mask = straddle[r]! >>> 0;
      if (atomMentions.some((m, i) => i < 32 && (mask & (1 << i)) !== 0 && (m[a] || m[b]))) count++;
    }
    if (count > bestCount) { bestCount = count; best = [a, b]; }
  }
  const [xa, ya] = best;

  // The most common combination of discrete inputs near the edge.
  const keyOf = (r: number) => cols.discrete.map((c) => c[r]).join('|');
  const tally = new Map<string, number>();
  for (const r of near) tally.set(keyOf(r), (tally.get(keyOf(r)) ?? 0) + 1);
  const panelKey = [...tally.entries()].sort((p, q) => q[1] - p[1] || (p[0] < q[0] ? -1 : 1))[0]![0];
  const inPanel = (r: number) => keyOf(r) === panelKey;
  const discreteValues = cols.discrete.map((c) => c[near.find(inPanel)!]!);
  const panel = program.discrete.length
    ? program.discrete.map((v, i) => `${v.variable.label ?? v.key}: ${fmt(discreteValues[i]!)}`).join(', ') + (tally.size > 1 ? ' (the most common among units near the edge; other values have their limits elsewhere)' : '')
    : null;
  const heldFixed: string[] = [];
  const fixedValue = program.continuous.map((v, j) => {
    if (j === xa || j === ya) return NaN;
    const m = quantile(sortedFinite(cols.continuous[j]!, (r) => inPanel(r) && aps[r]! > 0 && aps[r]! < 1), 0.5);
    heldFixed.push(`${v.variable.label ?? v.key} held at ${fmt(m)}${v.variable.unit ? ' ' + v.variable.unit : ''} (median near the edge)`);
    return m;
  });

  const range = (j: number): [number, number] => {
    const s = sortedFinite(cols.continuous[j]!, inPanel);
    let lo = quantile(s, 0.01);
    let hi = quantile(s, 0.99);
    if (!(hi > lo)) { const pad = Math.abs(lo) * 0.1 || 1; lo -= pad; hi += pad; }
    return niceRange(lo, hi);
  };
  const [x0, x1] = range(xa);
  const [y0, y1] = range(ya);
  const cells = opts.mapCells ?? 60;
  const xEdges = edges(x0, x1, cells);
  const yEdges = edges(y0, y1, cells);
  const n = cells * cells;
  const gridCols: DesignColumns = {
    n,
    continuous: program.continuous.map((_, j) => {
      const c = new Float64Array(n);
      for (let iy = 0; iy < cells; iy++) for (let ix = 0; ix < cells; ix++) {
        c[iy * cells + ix] = j === xa ? (xEdges[ix]! + xEdges[ix + 1]!) / 2 : j === ya ? (yEdges[iy]! + yEdges[iy + 1]!) / 2 : fixedValue[j]!;
      }
      return c;
    }),
    discrete: discreteValues.map((v) => new Float64Array(n).fill(v)),
  };
  const offer = verdicts(program, gridCols).offerProbability;
  const scaleOf = new Map(results.scales.map((s) => [s.key, s.scale]));
  const scales = program.continuous.map((v) => scaleOf.get(v.key) ?? 1);
  const draws = opts.draws ?? Math.min(1000, results.settings.draws);
  const delta = results.settings.deltas[k]!;
  const band = computeApsBlock(program, gridCols, scales, { deltas: [delta], draws, seed: results.settings.seed }, ballPointSet(d, draws, results.settings.seed)).aps[0]!;
  const probability: number[][] = [];
  const inBand: boolean[][] = [];
  for (let iy = 0; iy < cells; iy++) {
    probability.push(Array.from({ length: cells }, (_, ix) => offer[iy * cells + ix]!));
    inBand.push(Array.from({ length: cells }, (_, ix) => { const p = band[iy * cells + ix]!; return p > 0 && p < 1; }));
  }

  const [cx, cy] = opts.countCells ?? [20, 16];
  const cxEdges = edges(x0, x1, cx);
  const cyEdges = edges(y0, y1, cy);
  const counts = Array.from({ length: cy }, () => new Array<number>(cx).fill(0));
  const xs = cols.continuous[xa]!;
  const ys = cols.continuous[ya]!;
  for (let r = 0; r < cols.n; r++) {
    if (!inPanel(r)) continue;
    const ix = Math.floor(((xs[r]! - x0) / (x1 - x0)) * cx);
    const iy = Math.floor(((ys[r]! - y0) / (y1 - y0)) * cy);
    if (ix < 0 || iy < 0 || ix >= cx || iy >= cy) continue;
    counts[iy]![ix]!++;
  }
  return {
    map: {
      x: variableAxis(program, xa),
      y: variableAxis(program, ya),
      delta,
      grid: { xEdges, yEdges, probability, inBand },
      counts: { xEdges: cxEdges, yEdges: cyEdges, values: suppressBinnedCounts(counts, results.settings.smallCellMax) },
      panel,
      heldFixed,
    },
    note: null,
  };
}

/** Signed distance to the nearest edge, in scaled units (NaN where no linear criterion is pivotal). */
export function signedDistance(program: CompiledProgram, cols: DesignColumns, eligible: Uint8Array, scales: readonly number[]): Float64Array {
  const n = cols.n;
  const margins = program.atoms.map((a) => (a.kind === 'compare' ? evalColumn(a.margin, cols) : null));
  const truth = program.atoms.map((a, i) => atomTruthColumn(a, cols, margins[i] ?? undefined));
  const out = new Float64Array(n).fill(Infinity);
  program.atoms.forEach((atom, i) => {
    if (atom.kind !== 'compare' || !atom.linear || !atom.dependsOnContinuous) return;
    const flipped = truth.slice();
    flipped[i] = truth[i]!.map((t) => 1 - t);
    const verdictFlipped = treeColumn(program.tree, flipped, n);
    const norm2 = new Float64Array(n);
    program.continuous.forEach((_, j) => {
      const g = gradColumn(atom.margin, j, cols);
      if (!g) return;
      for (let r = 0; r < n; r++) norm2[r] = norm2[r]! + (g[r]! * scales[j]!) ** 2;
    });
    const m = margins[i]!;
    for (let r = 0; r < n; r++) {
      if (verdictFlipped[r] === eligible[r] || !(norm2[r]! > 0)) continue;
      const dist = Math.abs(m[r]!) / Math.sqrt(norm2[r]!);
      if (dist < out[r]!) out[r] = dist;
    }
  });
  for (let r = 0; r < n; r++) out[r] = Number.isFinite(out[r]!) ? (eligible[r] ? out[r]! : -out[r]!) : NaN;
  return out;
}

function binnedSeries(x: Float64Array, y: ArrayLike<number>, window: number, bins: number, threshold: number): BinnedSeries {
  const width = window / bins;
  const count = new Array<number>(2 * bins).fill(0);
  const sum = new Array<number>(2 * bins).fill(0);
  const fit = { below: [0, 0, 0, 0, 0], above: [0, 0, 0, 0, 0] }; // n, Σx, Σy, Σxx, Σxy
  for (let r = 0; r < x.length; r++) {
    const xi = x[r]!;
    const yi = y[r]!;
    if (!Number.isFinite(xi) || !Number.isFinite(yi) || Math.abs(xi) > window) continue;
    // Eligible units (x ≥ 0, including those exactly on the edge) go on the "above" side.
    const b = Math.min(2 * bins - 1, Math.max(0, Math.floor(xi / width) + bins));
    count[b]!++;
    sum[b]! += yi;
    const f = xi >= 0 ? fit.above : fit.below;
    f[0]!++; f[1]! += xi; f[2]! += yi; f[3]! += xi * xi; f[4]! += xi * yi;
  }
  const line = (f: number[], from: number, to: number) => {
    const [nn, sx, sy, sxx, sxy] = f as [number, number, number, number, number];
    const den = nn * sxx - sx * sx;
    if (nn <= threshold || !(Math.abs(den) > 0)) return null;
    const slope = (nn * sxy - sx * sy) / den;
    const icpt = (sy - slope * sx) / nn;
    return [{ x: from, y: icpt + slope * from }, { x: to, y: icpt + slope * to }];
  };
  const below = line(fit.below, -window, 0);
  const above = line(fit.above, 0, window);
  return {
    bins: count.map((c, b) => {
      const shown = suppressCount(c, threshold);
      const mean = c > 0 && shown.shown ? sum[b]! / c : null;
      return { x: (b - bins + 0.5) * width, mean, side: b < bins ? 'below' as const : 'above' as const };
    }),
    fits: [...(below ? [{ side: 'below' as const, points: below }] : []), ...(above ? [{ side: 'above' as const, points: above }] : [])],
  };
}

export function signedDistanceData(run: StudyRun, opts: FigureDataOptions = {}): SignedDistanceData | null {
  const { program, prepared, results } = run;
  const scaleOf = new Map(results.scales.map((s) => [s.key, s.scale]));
  const scales = program.continuous.map((v) => scaleOf.get(v.key) ?? 1);
  const x = signedDistance(program, prepared.cols, prepared.eligible, scales);
  if (!x.some(Number.isFinite)) return null;
  const window = 2 * Math.max(...results.settings.deltas);
  const bins = opts.distanceBins ?? 10;
  const threshold = results.settings.smallCellMax;
  const d = prepared.data.treatment;
  return {
    window,
    binWidth: window / bins,
    takeUp: d && results.estimand.kind === 'treatment' ? binnedSeries(x, d, window, bins, threshold) : null,
    outcomes: results.outcomes.map((o, i) => ({ column: o.column, series: binnedSeries(x, prepared.data.outcomes[i]!, window, bins, threshold) })),
  };
}

export function densityData(run: StudyRun): DensityFigureData[] {
  const { program, prepared, results } = run;
  const threshold = results.settings.smallCellMax;
  return results.density.flatMap((check, k): DensityFigureData[] => {
    const atom = program.atoms[check.atom];
    const bin = check.binWidth;
    const h = check.bandwidth;
    if (!atom || atom.kind !== 'compare' || bin === null || h === null || !(bin > 0) || !(h > 0)) return [];
    const m = evalColumn(atom.margin, prepared.cols);
    const perSide = Math.max(1, Math.ceil(h / bin));
    const width = niceStep(bin * Math.max(1, Math.ceil(perSide / 50)));
    const side = Math.ceil(h / width);
    const counts = new Array<number>(2 * side).fill(0);
    for (let r = 0; r < m.length; r++) {
      const v = m[r]!;
      if (!Number.isFinite(v)) continue;
      const b = Math.floor(v / width) + side;
      if (b >= 0 && b < 2 * side) counts[b]!++;
    }
    const shown = suppressBinnedCounts([counts], threshold)[0]!;
    const vars = program.continuous.map((_, j) => j).filter((j) => mentions(atom.margin, j));
    const unit = vars.length === 1 ? program.continuous[vars[0]!]!.variable.unit : undefined;
    return [{
      check: k,
      atom: check.atom,
      x: { key: atom.path, label: 'Value minus limit', ...(unit ? { unit } : {}) },
      bins: counts.map((_, b) => ({ from: (b - side) * width, to: (b - side + 1) * width, count: shown[b]! })),
    }];
  });
}

export function balanceAllData(run: StudyRun): FigureData['balanceAll'] {
  const { prepared, results } = run;
  const names = [...new Set(results.balance.map((b) => b.covariate))];
  const threshold = results.settings.smallCellMax;
  const z = prepared.z;
  return prepared.data.covariates.slice(0, names.length).map((values, i) => {
    const acc = [[0, 0, 0], [0, 0, 0]]; // per group: n, Σx, Σx²
    for (let r = 0; r < values.length; r++) {
      const v = values[r]!;
      if (!Number.isFinite(v) || (z[r] !== 0 && z[r] !== 1)) continue;
      const g = acc[z[r]!]!;
      g[0]!++; g[1]! += v; g[2]! += v * v;
    }
    const stats = acc.map(([nn, s, ss]) => ({ n: nn!, mean: s! / nn!, variance: nn! > 1 ? (ss! - (s! * s!) / nn!) / (nn! - 1) : NaN }));
    const pooled = Math.sqrt((stats[0]!.variance + stats[1]!.variance) / 2);
    const value = pooled > 0 ? (stats[1]!.mean - stats[0]!.mean) / pooled : NaN;
    const state = dependentFigure([suppressCount(stats[0]!.n, threshold), suppressCount(stats[1]!.n, threshold)], value);
    return { covariate: names[i]!, standardizedDiff: state.shown && Number.isFinite(value) ? value : null };
  });
}

/** Every figure's data for one run. */
export function figureData(run: StudyRun, opts: FigureDataOptions = {}): FigureData {
  const map = boundaryMapData(run, opts);
  return {
    boundaryMap: map.map,
    boundaryMapNote: map.note,
    signedDistance: signedDistanceData(run, opts),
    density: densityData(run),
    balanceAll: balanceAllData(run),
  };
}

