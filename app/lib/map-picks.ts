// The Map screen's choices (axes, delta, discrete cell, view) and the figure.map arguments they
// make. Plain functions, so the screen stays thin and this is tested in vitest.

import type { MapArgs, MapCellValue, MapFigure } from '../../main/contract/api.ts';

export interface MapPicks {
  /** Continuous input keys across and up; null = let the engine pick the busiest pair. */
  x: string | null;
  y: string | null;
  /** Index into the study's deltas; null = the headline delta. */
  deltaIndex: number | null;
  /** A code per discrete input key; absent = the most common near the edge. */
  cell: Record<string, number>;
  /** The private view: individual units as points. */
  units: boolean;
}

export const NO_PICKS: MapPicks = { x: null, y: null, deltaIndex: null, cell: {}, units: false };

export function mapArgs(runId: number, picks: MapPicks, deltas: readonly number[]): MapArgs {
  const delta = picks.deltaIndex === null ? undefined : deltas[picks.deltaIndex];
  const cell = Object.entries(picks.cell).map(([key, value]) => ({ key, value }));
  return {
    runId,
    ...(picks.x !== null && picks.y !== null ? { axes: { x: picks.x, y: picks.y } } : {}),
    ...(delta !== undefined ? { delta } : {}),
    ...(cell.length ? { cell } : {}),
    ...(picks.units ? { view: 'units' as const } : {}),
  };
}

/** The picks after a figure came back: the engine's defaults become explicit, so the controls show them. */
export function picksFromFigure(picks: MapPicks, figure: MapFigure): MapPicks {
  const i = figure.deltas.indexOf(figure.drawn.delta);
  return {
    ...picks,
    x: figure.drawn.axes?.x ?? picks.x,
    y: figure.drawn.axes?.y ?? picks.y,
    deltaIndex: i >= 0 ? i : picks.deltaIndex,
  };
}

/** Put `key` on one axis; choosing the other axis's input swaps the two, so the axes never coincide. */
export function pickAxis(picks: MapPicks, side: 'x' | 'y', key: string): MapPicks {
  const other = side === 'x' ? 'y' : 'x';
  if (picks[other] === key) return { ...picks, [side]: key, [other]: picks[side] };
  return { ...picks, [side]: key };
}

/** Choose a code for a discrete input, or '' for the most common near the edge. */
export function pickCell(picks: MapPicks, key: string, value: string): MapPicks {
  const cell = { ...picks.cell };
  if (value === '') delete cell[key];
  else cell[key] = Number(value);
  return { ...picks, cell };
}

/** An option of a discrete-value selector, e.g. "2 — 341 near the edge", "5 — few near the edge". */
export function cellOptionText(v: MapCellValue): string {
  const near = v.nearEdge === null ? 'few near the edge' : v.nearEdge === 0 ? 'none near the edge' : `${v.nearEdge.toLocaleString('en-US')} near the edge`;
  return `${v.label} — ${near}`;
}

/** The delta slider's reading, e.g. "0.1 (the headline delta)". */
export function deltaText(delta: number, headline: number): string {
  return delta === headline ? `${delta} (the headline delta)` : String(delta);
}
