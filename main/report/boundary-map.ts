// The boundary-region map's data, from one run's per-unit arrays. Pure: values in, values out.
//
// Two continuous inputs on the axes: by default the pair with most units near the edge at the
// delta drawn (a unit counts for a pair when its ball crosses a criterion that mentions either
// input); the app may pick any two. The offer probability is the rule's own verdict on a grid
// (rules/atoms.ts `verdicts` on synthetic DesignColumns); the band is where 0 < APS < 1 at the
// delta drawn, computed on the same grid by the design engine itself (design/aps.ts) with the
// run's scales. Discrete inputs are fixed at one cell: by default their most common combination
// among units near the edge, or values the caller picks; other continuous inputs are held at
// their median near the edge within that cell (named in `heldFixed`).
//
// Units are shown in one of two views:
//  - 'binned' (the memo's and every export's): counts per bin with small bins hidden
//    (suppress.ts, docs/method.md §7), so no individual can be picked out;
//  - 'units' (the analyst's private view in the app only): each unit of the cell a point,
//    offered and not offered apart. Its type is not part of FigureData, and memo-files.ts refuses
//    it at run time, so the memo cannot carry it.

import { verdicts } from '../rules/atoms.ts';
import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import { edges, fmt, mentions, niceRange, quantile, sortedFinite, variableAxis } from './figure-math.ts';
import type {
  AxisVariable, BinnedBoundaryMap, BoundaryMapData, MapView, UnitPoint, UnitsBoundaryMap,
} from './model/figure-types.ts';
import { headlineIndex } from './model/memo-format.ts';
import { suppressBinnedCounts, suppressCount } from './model/suppress.ts';
import type { GridBand, RunView } from './run-view.ts';

/** What a map needs of a run (a RunView fits): the rule, the inputs and offers, each delta's APS and crossings, the results. */
export interface MapRun {
  program: RunView['program'];
  prepared: Pick<RunView['prepared'], 'cols' | 'z'>;
  propensity: RunView['propensity'];
  results: RunView['results'];
  band: GridBand;
}

export interface BoundaryMapOptions {
  /** Continuous input keys across and up (default: the pair with most units near the edge). */
  axes?: { x: string; y: string };
  /** One of the run's deltas (default: the headline delta). */
  delta?: number;
  /** Codes of discrete inputs to draw; inputs left out take their most common value near the edge. */
  cell?: ReadonlyArray<{ key: string; value: number }>;
  /** 'binned' (default; the memo's) or 'units' (the app's private view). */
  view?: MapView;
  /** Cells per side of the offer-probability grid (default 60). */
  mapCells?: number;
  /** Bins per side of the unit-count grid (default 20 across, 16 up). */
  countCells?: [number, number];
  /** Ball points for the band on the grid (default: the run's draws, at most 1,000). */
  draws?: number;
  /** At most this many points in the units view (default 6,000; an even sample beyond). */
  maxPoints?: number;
}

export interface BoundaryMapAnswer<M> { map: M | null; note: string | null }

const DEFAULT_MAX_POINTS = 6000;

/** Index of `delta` among the run's deltas (equal up to rounding), or -1. */
export function deltaIndex(deltas: readonly number[], delta: number): number {
  return deltas.findIndex((d) => Math.abs(d - delta) <= 1e-9 * Math.max(1, Math.abs(d)));
}

/** The name of a discrete input's code: its declared label, else the number. */
export function codeLabel(program: CompiledProgram, i: number, code: number): string {
  const declared = program.discrete[i]!.variable.values ?? [];
  for (const v of declared) if (typeof v === 'object' && v.value === code) return v.label;
  return fmt(code);
}

/** Codes a discrete input takes among the run's units, and the ones the program declares. */
export function discreteCodes(run: MapRun, i: number): number[] {
  const seen = new Set<number>();
  const col = run.prepared.cols.discrete[i]!;
  for (let r = 0; r < col.length; r++) if (Number.isFinite(col[r]!)) seen.add(col[r]!);
  for (const v of run.program.discrete[i]!.variable.values ?? []) seen.add(typeof v === 'object' ? v.value : v);
  return [...seen].sort((a, b) => a - b);
}

/** Units near the edge (0 < APS < 1) at delta index k. */
function nearUnits(run: MapRun, k: number): number[] {
  const aps = run.propensity.aps[k]!;
  const near: number[] = [];
  for (let r = 0; r < run.prepared.cols.n; r++) if (aps[r]! > 0 && aps[r]! < 1) near.push(r);
  return near;
}

/** The pair of continuous inputs with most units near a criterion that mentions one of them. */
function busiestPair(run: MapRun, k: number, near: readonly number[]): [number, number] {
  const { program } = run;
  const d = program.continuous.length;
  const straddle = run.propensity.straddle[k]!;
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
  return best;
}

interface Cell {
  values: number[];
  /** Which inputs took their value by default (most common), not by the caller's choice. */
  defaulted: boolean[];
  /** Several combinations were possible for the defaulted inputs. */
  alternatives: boolean;
}

/** The discrete cell: the caller's codes, the rest the most common combination among matching units near the edge. */
function chooseCell(run: MapRun, near: readonly number[], chosen: ReadonlyArray<{ key: string; value: number }>): Cell {
  const { program, prepared } = run;
  const disc = prepared.cols.discrete;
  const fixed = program.discrete.map((v) => chosen.find((c) => c.key === v.key)?.value);
  const matches = (r: number) => fixed.every((f, i) => f === undefined || disc[i]![r] === f);
  const mostCommon = (rows: Iterable<number>) => {
    const tally = new Map<string, { count: number; values: number[] }>();
    for (const r of rows) {
      if (!matches(r)) continue;
      const values = disc.map((c) => c[r]!);
      const key = values.join('|');
      const t = tally.get(key);
      if (t) t.count++; else tally.set(key, { count: 1, values });
    }
    const top = [...tally.entries()].sort((p, q) => q[1].count - p[1].count || (p[0] < q[0] ? -1 : 1))[0];
    return top ? { values: top[1].values, size: tally.size } : null;
  };
  const all = { *[Symbol.iterator]() { for (let r = 0; r < prepared.cols.n; r++) yield r; } };
  const found = mostCommon(near) ?? mostCommon(all);
  const values = program.discrete.map((_, i) => fixed[i] ?? found?.values[i] ?? discreteCodes(run, i)[0] ?? NaN);
  return { values, defaulted: fixed.map((f) => f === undefined), alternatives: (found?.size ?? 0) > 1 };
}

function panelText(program: CompiledProgram, cell: Cell, anyChosen: boolean): string | null {
  if (!program.discrete.length) return null;
  const named = program.discrete.map((v, i) => `${v.variable.label ?? v.key}: ${codeLabel(program, i, cell.values[i]!)}`);
  if (!anyChosen) return named.join(', ') + (cell.alternatives ? ' (the most common among units near the edge; other values have their limits elsewhere)' : '');
  return named.map((t, i) => (cell.defaulted[i] && cell.alternatives ? `${t} (the most common near the edge)` : t)).join(', ');
}

export function boundaryMapData(run: MapRun, opts?: BoundaryMapOptions & { view?: 'binned' }): BoundaryMapAnswer<BinnedBoundaryMap>;
export function boundaryMapData(run: MapRun, opts: BoundaryMapOptions & { view: 'units' }): BoundaryMapAnswer<UnitsBoundaryMap>;
export function boundaryMapData(run: MapRun, opts: BoundaryMapOptions): BoundaryMapAnswer<BoundaryMapData>;
export function boundaryMapData(run: MapRun, opts: BoundaryMapOptions = {}): BoundaryMapAnswer<BoundaryMapData> {
  const { program, prepared, propensity, results } = run;
  const cols = prepared.cols;
  const deltas = results.settings.deltas;
  const d = program.continuous.length;
  if (d < 2) return { map: null, note: `The map of the rule’s edge needs two continuous inputs; this rule has ${d === 1 ? 'one' : 'none'}, so no map is drawn; the distance and density figures show the edge along that input (outcomes and take-up by distance to the limit, and how many units sit on each side of it).` };
  // Options arrive checked (main/api/figures.ts says what is wrong in words); a bad one here is a fault.
  const k = opts.delta === undefined ? headlineIndex(results) : deltaIndex(deltas, opts.delta);
  if (k < 0) throw new RangeError(`boundaryMapData: delta ${opts.delta} is not one of the run's deltas`);
  const index = (key: string) => {
    const j = program.continuous.findIndex((v) => v.key === key);
    if (j < 0) throw new RangeError(`boundaryMapData: "${key}" is not a continuous input of the program`);
    return j;
  };
  const chosenAxes = opts.axes ? [index(opts.axes.x), index(opts.axes.y)] as const : null;
  if (chosenAxes && chosenAxes[0] === chosenAxes[1]) throw new RangeError('boundaryMapData: the two axes must be different inputs');
  for (const c of opts.cell ?? []) if (!program.discrete.some((v) => v.key === c.key)) throw new RangeError(`boundaryMapData: "${c.key}" is not a discrete input of the program`);

  const aps = propensity.aps[k]!;
  const near = nearUnits(run, k);
  const atDelta = opts.delta === undefined ? 'at the headline delta' : `at delta ${deltas[k]}`;
  if (!near.length) return { map: null, note: `No unit is near the edge of the rule ${atDelta}, so there is no band to map.` };
  const [xa, ya] = chosenAxes ?? busiestPair(run, k, near);

  const cell = chooseCell(run, near, opts.cell ?? []);
  const inPanel = (r: number) => cell.values.every((v, i) => cols.discrete[i]![r] === v);
  const panel = panelText(program, cell, (opts.cell ?? []).length > 0);
  const heldFixed: string[] = [];
  const fixedValue = program.continuous.map((v, j) => {
    if (j === xa || j === ya) return NaN;
    // The median near the edge in this cell; failing that, of the cell; failing that, of all units.
    let where = 'median near the edge';
    let s = sortedFinite(cols.continuous[j]!, (r) => inPanel(r) && aps[r]! > 0 && aps[r]! < 1);
    if (!s.length) { where = 'median of the units in this cell'; s = sortedFinite(cols.continuous[j]!, inPanel); }
    if (!s.length) { where = 'median of all units'; s = sortedFinite(cols.continuous[j]!, () => true); }
    const m = quantile(s, 0.5);
    heldFixed.push(`${v.variable.label ?? v.key} held at ${fmt(m)}${v.variable.unit ? ' ' + v.variable.unit : ''} (${where})`);
    return m;
  });

  const range = (j: number): [number, number] => {
    // The middle 98% of the cell's units (of all units when the cell has none).
    let s = sortedFinite(cols.continuous[j]!, inPanel);
    if (!s.length) s = sortedFinite(cols.continuous[j]!, () => true);
    let lo = quantile(s, 0.01);
    let hi = quantile(s, 0.99);
    if (!Number.isFinite(lo) || !Number.isFinite(hi)) { lo = 0; hi = 1; }
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
    discrete: cell.values.map((v) => new Float64Array(n).fill(v)),
  };
  const offer = verdicts(program, gridCols).offerProbability;
  const draws = opts.draws ?? Math.min(1000, results.settings.draws);
  const delta = deltas[k]!;
  const band = run.band(gridCols, delta, draws);
  const probability: number[][] = [];
  const inBand: boolean[][] = [];
  for (let iy = 0; iy < cells; iy++) {
    probability.push(Array.from({ length: cells }, (_, ix) => offer[iy * cells + ix]!));
    inBand.push(Array.from({ length: cells }, (_, ix) => { const p = band[iy * cells + ix]!; return p > 0 && p < 1; }));
  }
  const base = {
    x: variableAxis(program, xa),
    y: variableAxis(program, ya),
    delta,
    grid: { xEdges, yEdges, probability, inBand },
    panel,
    heldFixed,
    cell: program.discrete.map((v, i) => ({ key: v.key, value: cell.values[i]! })),
  };

  const xs = cols.continuous[xa]!;
  const ys = cols.continuous[ya]!;
  const inRange = (r: number) => xs[r]! >= x0 && xs[r]! <= x1 && ys[r]! >= y0 && ys[r]! <= y1;
  if (opts.view === 'units') {
    const rows: number[] = [];
    for (let r = 0; r < cols.n; r++) if (inPanel(r) && inRange(r)) rows.push(r);
    const stride = Math.max(1, Math.ceil(rows.length / (opts.maxPoints ?? DEFAULT_MAX_POINTS)));
    const offered: UnitPoint[] = [];
    const notOffered: UnitPoint[] = [];
    for (let i = 0; i < rows.length; i += stride) {
      const r = rows[i]!;
      (prepared.z[r] === 1 ? offered : notOffered).push({ x: xs[r]!, y: ys[r]! });
    }
    return { map: { ...base, view: 'units', units: { offered, notOffered, total: rows.length, drawn: offered.length + notOffered.length } }, note: null };
  }

  const [cx, cy] = opts.countCells ?? [20, 16];
  const counts = Array.from({ length: cy }, () => new Array<number>(cx).fill(0));
  for (let r = 0; r < cols.n; r++) {
    if (!inPanel(r)) continue;
    const ix = Math.floor(((xs[r]! - x0) / (x1 - x0)) * cx);
    const iy = Math.floor(((ys[r]! - y0) / (y1 - y0)) * cy);
    if (ix < 0 || iy < 0 || ix >= cx || iy >= cy) continue;
    counts[iy]![ix]!++;
  }
  return {
    map: { ...base, view: 'binned', counts: { xEdges: edges(x0, x1, cx), yEdges: edges(y0, y1, cy), values: suppressBinnedCounts(counts, results.settings.smallCellMax) } },
    note: null,
  };
}

/** What the app's pickers offer for a run: the continuous inputs, the deltas, each discrete input's codes. */
export interface BoundaryMapChoices {
  continuous: AxisVariable[];
  deltas: number[];
  headlineDelta: number;
  /** Per discrete input, its codes with the units near the edge at the delta drawn (null: 1 to the small-cell threshold, hidden). */
  discrete: Array<{ key: string; label: string; values: Array<{ value: number; label: string; nearEdge: number | null }> }>;
}

export function boundaryMapChoices(run: MapRun, delta?: number): BoundaryMapChoices {
  const { program, prepared, results } = run;
  const deltas = results.settings.deltas;
  const k = delta === undefined ? headlineIndex(results) : deltaIndex(deltas, delta);
  if (k < 0) throw new RangeError(`boundaryMapChoices: delta ${delta} is not one of the run's deltas`);
  const near = nearUnits(run, k);
  const threshold = results.settings.smallCellMax;
  return {
    continuous: program.continuous.map((_, j) => variableAxis(program, j)),
    deltas: [...deltas],
    headlineDelta: deltas[headlineIndex(results)]!,
    discrete: program.discrete.map((v, i) => {
      const tally = new Map<number, number>();
      for (const r of near) tally.set(prepared.cols.discrete[i]![r]!, (tally.get(prepared.cols.discrete[i]![r]!) ?? 0) + 1);
      return {
        key: v.key,
        label: v.variable.label ?? v.key,
        values: discreteCodes(run, i).map((code) => {
          const shown = suppressCount(tally.get(code) ?? 0, threshold);
          return { value: code, label: codeLabel(program, i, code), nearEdge: shown.shown ? shown.value : null };
        }),
      };
    }),
  };
}
