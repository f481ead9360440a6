// Chart specs: what a figure shows, as plain JSON data (no functions, no chart.js objects).
// The memo model puts these in the document tree; config.ts turns one into a chart.js
// configuration, used by the app's live charts and, through @napi-rs/canvas, by the memo's PNGs.
// Values arrive already suppressed (main/report/model/suppress.ts): a null count or mean is a
// hidden bin and is drawn blank.

/** An axis: its title is "label (unit)". */
export interface AxisSpec {
  label: string;
  unit?: string;
}

export type ChartSpec =
  | DeltaSensitivitySpec
  | BinnedMeansSpec
  | DensitySpec
  | BalanceSpec
  | BoundaryMapSpec;

interface ChartBase {
  /** Printed above the plot area (the figure caption lives in the document, not here). */
  title?: string;
  /** A second line under the title, e.g. "Households of 3 (the most common size)". */
  subtitle?: string;
}

/** Estimate and 95% interval for each ball radius delta. */
export interface DeltaSensitivitySpec extends ChartBase {
  kind: 'deltaSensitivity';
  /** The effect's axis, e.g. { label: 'Effect on arrears', unit: 'USD' }. */
  effect: AxisSpec;
  points: Array<{ delta: number; estimate: number; low: number; high: number }>;
  /** Dashed horizontal reference lines, e.g. the naive comparison. "No effect" at 0 is always drawn. */
  references?: Array<{ label: string; value: number }>;
}

export type Side = 'below' | 'above';

export interface SideLabels {
  /** e.g. "Not offered (below the edge)" */
  below: string;
  /** e.g. "Offered (above the edge)" */
  above: string;
}

/** Binned means of an outcome or of take-up against the signed distance to the nearest edge. */
export interface BinnedMeansSpec extends ChartBase {
  kind: 'binnedMeans';
  /** The signed distance, e.g. { label: 'Distance to the nearest edge', unit: 'scaled units' }. */
  x: AxisSpec;
  y: AxisSpec;
  sides: SideLabels;
  /** Bin centre and mean; mean null = hidden (too few units in the bin). */
  bins: Array<{ x: number; mean: number | null; side: Side }>;
  /** Fitted line on each side (e.g. local linear), as points to join. */
  fits?: Array<{ side: Side; points: Array<{ x: number; y: number }> }>;
  /** Fixed y range, e.g. [0, 1] for take-up. */
  yRange?: [number, number];
}

/** Histogram of a running variable around one threshold with a fitted density line on each side. */
export interface DensitySpec extends ChartBase {
  kind: 'density';
  x: AxisSpec;
  /** The threshold value on the x axis. */
  threshold: number;
  thresholdLabel?: string;
  sides: SideLabels;
  /** Bins [from, to); count null = hidden small bin. */
  bins: Array<{ from: number; to: number; count: number | null }>;
  /** Fitted counts per bin on each side, as points to join. */
  fits?: Array<{ side: Side; points: Array<{ x: number; y: number }> }>;
  /** y-axis title; "Units per bin" when absent. */
  yLabel?: string;
}

/**
 * Standardized differences in covariates between offered and not-offered units, with a shaded
 * reference band of ±band. 0.1 is common practice, not a test: Austin (2009), "Balance diagnostics
 * for comparing the distribution of baseline covariates between treatment groups in
 * propensity-score matched samples", Statistics in Medicine 28(25):3083–3107, reports it as the
 * usual threshold for a negligible difference.
 */
export interface BalanceSpec extends ChartBase {
  kind: 'balance';
  covariates: string[];
  /** One series per comparison (e.g. "All units", "Boundary units, APS-controlled"). */
  series: Array<{ name: string; values: Array<number | null> }>;
  /** Half-width of the reference band; 0.1 when absent. */
  band?: number;
  xLabel?: string;
}

/**
 * The boundary-region map: two continuous inputs of the formula on the axes, the offer probability
 * shaded over a precomputed grid, the boundary band for one delta (a mask on the same grid) and the
 * units as binned counts (already suppressed: null = hidden, drawn blank) — or, in the app's
 * private view only, as individual points (`units`; memo-files.ts refuses a spec that has them).
 */
export interface BoundaryMapSpec extends ChartBase {
  kind: 'boundaryMap';
  x: AxisSpec;
  y: AxisSpec;
  /** Cell edges: xEdges has nx + 1 increasing values, yEdges ny + 1. */
  grid: {
    xEdges: number[];
    yEdges: number[];
    /** probability[iy][ix] in [0, 1]. */
    probability: number[][];
    /** inBand[iy][ix]: the cell lies in the boundary band (0 < APS < 1 at `delta`). */
    inBand: boolean[][];
  };
  delta: number;
  /** Unit counts on their own (coarser or equal) grid: the memo's and every export's view. */
  counts?: {
    xEdges: number[];
    yEdges: number[];
    values: Array<Array<number | null>>;
  };
  /** The analyst's private view in the app: each unit a point, offered and not offered told apart by shape and colour. */
  units?: {
    offered: Array<{ x: number; y: number }>;
    notOffered: Array<{ x: number; y: number }>;
  };
}

/** True when a map spec shows individual units (allowed in the app's private view only). */
export function showsIndividualUnits(spec: ChartSpec): boolean {
  return spec.kind === 'boundaryMap' && spec.units !== undefined;
}

export function axisTitle(axis: AxisSpec): string {
  return axis.unit ? `${axis.label} (${axis.unit})` : axis.label;
}
