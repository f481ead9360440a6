// The Map screen's choices and the figure.map arguments they make (app/lib/map-picks.ts).
import { describe, expect, it } from 'vitest';
import type { MapFigure } from '../../main/contract/api.ts';
import { cellOptionText, deltaText, mapArgs, NO_PICKS, pickAxis, pickCell, picksFromFigure } from '../../app/lib/map-picks.ts';

const DELTAS = [0.05, 0.1, 0.2];

describe('map picks → figure.map arguments', () => {
  it('asks for the defaults when nothing is chosen', () => {
    expect(mapArgs(7, NO_PICKS, DELTAS)).toEqual({ runId: 7 });
  });
  it('sends the axes, the delta of the slider position, the chosen codes and the private view', () => {
    const picks = { x: 'age', y: 'income', deltaIndex: 2, cell: { size: 3 }, units: true };
    expect(mapArgs(7, picks, DELTAS)).toEqual({
      runId: 7, axes: { x: 'age', y: 'income' }, delta: 0.2, cell: [{ key: 'size', value: 3 }], view: 'units',
    });
  });
  it('takes the engine’s defaults as the controls’ positions once a map is drawn', () => {
    const fig = { deltas: DELTAS, drawn: { axes: { x: 'income', y: 'age' }, delta: 0.1, cell: [], view: 'binned' } } as unknown as MapFigure;
    expect(picksFromFigure(NO_PICKS, fig)).toEqual({ ...NO_PICKS, x: 'income', y: 'age', deltaIndex: 1 });
  });
});

describe('choosing', () => {
  it('an axis already on the other side swaps the two, so they never coincide', () => {
    const p = { ...NO_PICKS, x: 'income', y: 'age' };
    expect(pickAxis(p, 'x', 'age')).toMatchObject({ x: 'age', y: 'income' });
    expect(pickAxis(p, 'y', 'income')).toMatchObject({ x: 'age', y: 'income' });
    expect(pickAxis({ ...p, y: 'w' }, 'x', 'age')).toMatchObject({ x: 'age', y: 'w' });
  });
  it('a discrete value, and back to the most common', () => {
    const p = pickCell(NO_PICKS, 'size', '3');
    expect(p.cell).toEqual({ size: 3 });
    expect(pickCell(p, 'size', '').cell).toEqual({});
  });
  it('words the options and the slider reading', () => {
    expect(cellOptionText({ value: 2, label: '2', nearEdge: 1341 })).toBe('2 — 1,341 near the edge');
    expect(cellOptionText({ value: 5, label: '5', nearEdge: null })).toBe('5 — few near the edge');
    expect(cellOptionText({ value: 6, label: '6', nearEdge: 0 })).toBe('6 — none near the edge');
    expect(deltaText(0.1, 0.1)).toBe('0.1 (the headline delta)');
    expect(deltaText(0.2, 0.1)).toBe('0.2');
  });
});
