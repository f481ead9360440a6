// The data behind the memo's figures, from one run's per-unit arrays (RunView: a run just computed or read back from the workspace). Pure: values in,
// values out. Counts are suppressed here (suppress.ts, docs/method.md §7) before they leave, and a
// mean over a bin with a hidden count is dropped, so a figure never shows a small cell.
//
//  - Boundary-region map: boundary-map.ts (its options: axes, delta, discrete cell, view). The
//    memo's figures take its binned view only.
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

import { atomTruthColumn, treeColumn } from '../rules/atoms.ts';
import { evalColumn, gradColumn } from '../rules/evaluate-columns.ts';
import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import { boundaryMapData } from './boundary-map.ts';
import { mentions, niceStep } from './figure-math.ts';
import type { BinnedSeries, DensityFigureData, FigureData, SignedDistanceData } from './model/figure-types.ts';
import type { RunView } from './run-view.ts';
import { dependentFigure, suppressBinnedCounts, suppressCount } from './model/suppress.ts';

export { boundaryMapData, boundaryMapChoices, type BoundaryMapOptions, type MapRun } from './boundary-map.ts';
export { niceStep } from './figure-math.ts';

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

export function signedDistanceData(run: RunView, opts: FigureDataOptions = {}): SignedDistanceData | null {
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

export function densityData(run: RunView): DensityFigureData[] {
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

export function balanceAllData(run: RunView): FigureData['balanceAll'] {
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
export function figureData(run: RunView, opts: FigureDataOptions = {}): FigureData {
  // The memo's map: default axes, headline delta, most common cell, binned counts (never individual units).
  const map = boundaryMapData(run, {
    view: 'binned',
    ...(opts.mapCells !== undefined ? { mapCells: opts.mapCells } : {}),
    ...(opts.countCells ? { countCells: opts.countCells } : {}),
    ...(opts.draws !== undefined ? { draws: opts.draws } : {}),
  });
  return {
    boundaryMap: map.map,
    boundaryMapNote: map.note,
    signedDistance: signedDistanceData(run, opts),
    density: densityData(run),
    balanceAll: balanceAllData(run),
  };
}

