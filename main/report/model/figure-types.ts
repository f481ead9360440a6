// The data behind the memo's figures, computed from a run's per-unit arrays by
// main/report/figure-data.ts (not stored in results.json). Counts arrive already suppressed
// (null = a small bin, drawn blank); means over a bin with a hidden count arrive as null.
// Figures are pictures: no number printed in the memo's text or tables comes from here.

import type { Side } from '../charts/spec.ts';

export interface AxisVariable {
  key: string;
  label: string;
  unit?: string;
}

/** How units are shown on the map. */
export type MapView = 'binned' | 'units';

interface BoundaryMapBase {
  x: AxisVariable;
  y: AxisVariable;
  /** The delta of the band (the headline delta unless another was asked for). */
  delta: number;
  grid: { xEdges: number[]; yEdges: number[]; probability: number[][]; inBand: boolean[][] };
  /** The discrete inputs held fixed, e.g. "People in household: 2 (the most common among units near the edge)". */
  panel: string | null;
  /** Other continuous inputs held at a value, e.g. "Years employed held at 4.5 (median near the edge)". */
  heldFixed: string[];
  /** The discrete cell drawn: one code per discrete input, in the program's order. */
  cell: Array<{ key: string; value: number }>;
}

/** The memo's and every export's view: counts per bin, small bins already hidden (null). */
export interface BinnedBoundaryMap extends BoundaryMapBase {
  view: 'binned';
  counts: { xEdges: number[]; yEdges: number[]; values: Array<Array<number | null>> };
}

/** A unit drawn as a point in the analyst's private view. */
export interface UnitPoint { x: number; y: number }

/**
 * The analyst's private view, in the app only: individual units of the drawn cell as points,
 * offered and not offered apart. Never part of FigureData, so the memo cannot carry it, and
 * memo-files.ts refuses it at run time as well.
 */
export interface UnitsBoundaryMap extends BoundaryMapBase {
  view: 'units';
  units: {
    offered: UnitPoint[];
    notOffered: UnitPoint[];
    /** Units of the cell inside the plotted range, and how many of them are drawn (an even sample when there are many). */
    total: number;
    drawn: number;
  };
}

export type BoundaryMapData = BinnedBoundaryMap | UnitsBoundaryMap;

export interface BinnedMean {
  x: number;
  mean: number | null;
  side: Side;
}

export interface SideFit {
  side: Side;
  points: Array<{ x: number; y: number }>;
}

export interface BinnedSeries {
  bins: BinnedMean[];
  fits: SideFit[];
}

/** Outcomes and take-up against the signed distance to the nearest edge (docs/memo.md). */
export interface SignedDistanceData {
  /** Half-width of the window shown, in scaled units. */
  window: number;
  binWidth: number;
  /** Take-up (share receiving) per bin; null without a treatment column. */
  takeUp: BinnedSeries | null;
  outcomes: Array<{ column: string; series: BinnedSeries }>;
}

export interface DensityFigureData {
  /** Index into results.density. */
  check: number;
  atom: number;
  x: AxisVariable;
  bins: Array<{ from: number; to: number; count: number | null }>;
}

export interface FigureData {
  /** Null with a reason when no map can be drawn (fewer than two continuous inputs, no unit near the edge). */
  boundaryMap: BinnedBoundaryMap | null;
  boundaryMapNote: string | null;
  signedDistance: SignedDistanceData | null;
  density: DensityFigureData[];
  /** Standardized differences over all units (offered minus not offered, no adjustment), per covariate. */
  balanceAll: Array<{ covariate: string; standardizedDiff: number | null }>;
}

export const NO_FIGURES: FigureData = { boundaryMap: null, boundaryMapNote: null, signedDistance: null, density: [], balanceAll: [] };
