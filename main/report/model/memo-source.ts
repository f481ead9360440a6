// Numbers in the memo, each tied to where it comes from in results.json.
// Every number the memo prints is built here from a path into the results (valueAt), so the
// value and its `source` are written together; tests/report/memo-numbers.test.ts resolves the
// sources with its own reader and checks each printed number against results.json.

import type { Results } from '../../contract/results.ts';
import type { Cell, Inline, NumberCell, NumberFormat, NumberRun, TextRun, TextStyle } from './document.ts';
import type { CellState } from './suppress.ts';

/** The value at a path such as "outcomes[0].byDelta[1].ci[0]" (undefined when absent). */
export function valueAt(results: Results, path: string): unknown {
  let cur: unknown = results;
  for (const part of path.match(/[^.[\]]+/g) ?? []) {
    if (cur === null || cur === undefined) return undefined;
    cur = (cur as Record<string, unknown>)[part];
  }
  return cur;
}

/** The number at a path; a missing or non-numeric value is a fault of the memo model. */
export function numberAt(results: Results, path: string): number {
  const v = valueAt(results, path);
  if (typeof v !== 'number') throw new Error(`memo: results.${path} is not a number (${JSON.stringify(v)})`);
  return v;
}

export function text(t: string, style?: TextStyle): TextRun {
  return style ? { kind: 'text', text: t, style } : { kind: 'text', text: t };
}

/** A number in running text, read from results.json at `path`. */
export function num(results: Results, path: string, format: NumberFormat, style?: TextStyle): NumberRun {
  const run: NumberRun = { kind: 'number', value: numberAt(results, path), format, source: path };
  if (style) run.style = style;
  return run;
}

/** |value at path| in running text ("lowered by 50 USD"). */
export function absNum(results: Results, path: string, format: NumberFormat): NumberRun {
  return { kind: 'number', value: Math.abs(numberAt(results, path)), format, source: `abs(${path})` };
}

/** a / b in running text (a share). */
export function ratioNum(results: Results, a: string, b: string, format: NumberFormat): NumberRun {
  return { kind: 'number', value: numberAt(results, a) / numberAt(results, b), format, source: `${a} / ${b}` };
}

/** A fixed constant of the method (memo-constants.ts), named so the test can check it. */
export function constNum(name: string, value: number, format: NumberFormat): NumberRun {
  return { kind: 'number', value, format, source: `constant:${name}` };
}

/** A table cell read from results.json at `path`. */
export function numCell(results: Results, path: string, format?: NumberFormat): NumberCell {
  const c: NumberCell = { kind: 'number', value: numberAt(results, path), source: path };
  if (format) c.format = format;
  return c;
}

/** A cell for a nullable result: the number, or a word when there is none. */
export function numCellOr(results: Results, path: string, missing: string, format?: NumberFormat): Cell {
  const v = valueAt(results, path);
  return typeof v === 'number' && Number.isFinite(v) ? numCell(results, path, format) : { kind: 'text', text: missing };
}

/** A count (or share of counts) after suppression, with its source kept when shown. */
export function stateRun(state: CellState, source: string, format: NumberFormat = { style: 'integer' }): Inline {
  return state.shown ? { kind: 'number', value: state.value, format, source } : { kind: 'suppressed', reason: state.reason };
}

export function stateCell(state: CellState, source: string, format?: NumberFormat): Cell {
  if (!state.shown) return { kind: 'suppressed', reason: state.reason };
  const c: NumberCell = { kind: 'number', value: state.value, source };
  if (format) c.format = format;
  return c;
}

export const textCell = (t: string): Cell => ({ kind: 'text', text: t });
export const emptyCell: Cell = { kind: 'empty' };

/** "p = 0.016" or "p < 0.001" (the p-value format writes "< 0.001" itself). */
export function pRun(results: Results, path: string): Inline[] {
  const v = numberAt(results, path);
  return [text(v < 0.001 ? 'p ' : 'p = '), num(results, path, { style: 'pvalue' })];
}
