// Small-cell suppression for every shared output (tables, text, figures).
//
// Policy (docs/method.md §7): no count from 1 to N is shown (N = settings.smallCellMax, default 10;
// N = 0 turns suppression off), nor any figure from which such a count could be worked out.
// Sources: US Centers for Medicare & Medicaid Services, cell size suppression policy (counts 1–10
// are not shown, nor figures from which they can be derived); Washington State Department of
// Health, Guidelines for working with small numbers (uses fewer than 10). Zero is shown: it is not
// a small cell under either policy.
//
// What is hidden here, and why:
//  1. Primary suppression: every count from 1 to N (mark: reason 'small').
//  2. Secondary suppression (mark: reason 'derived'), applied to every additive relation the table
//     prints ("these members add up to this total": a row with its row total, a column with its
//     column total, excluded rows with rows read, map bins with a printed unit count):
//     a. a relation never has exactly one hidden entry — otherwise it is the total minus the rest
//        (or the sum of the members);
//     b. when the total is shown, the hidden members together (which a reader can compute as the
//        total minus the shown members) must add up to more than N, so their combined count is not
//        itself a small count;
//     c. no hidden small count may be pinned to a single value by the relation (e.g. two hidden cells
//        that must add up to 20 when each is at most 10 are both 10).
//     When a relation breaks a rule, the smallest shown positive member is hidden as well (the
//     usual choice: it loses the least information); when no member is left, the total is hidden.
//     Hiding in one relation can break another, so the rules are applied until nothing changes.
//  3. Figures computed from counts (a share, a rate, a mean over a group) are hidden when any count
//     they are computed from is hidden: dependentFigure.
//
// Limits: this is the usual line-by-line rule. It does not solve the full linear-programming audit
// of tables with many interlocking totals (Cox, L. H. 1980, "Suppression methodology and statistical
// disclosure control", JASA 75(370):377–385; Hundepool, A. et al. 2012, Statistical Disclosure
// Control, Wiley, ch. 4), which is why the memo's tables are kept to one- and two-way counts.

import type { Cell, Inline, NumberFormat, SuppressionLegend, SuppressionReason } from './document.ts';

/** settings.smallCellMax when the study does not set it (docs/method.md §7). */
export const DEFAULT_SMALL_CELL_MAX = 10;

export type CellState =
  | { shown: true; value: number }
  | { shown: false; reason: SuppressionReason };

/** An additive relation the output prints: values[members] add up to values[total]. Indices into a flat list. */
export interface CountRelation {
  members: number[];
  total: number;
}

function assertThreshold(threshold: number): void {
  // The study-file validator refuses bad settings with a message; reaching here with one is a fault.
  if (!Number.isInteger(threshold) || threshold < 0) {
    throw new RangeError(`small-cell threshold must be a whole number ≥ 0, got ${threshold}`);
  }
}

function assertCount(value: number, where: string): void {
  if (!Number.isInteger(value) || value < 0) {
    throw new RangeError(`${where}: a count must be a whole number ≥ 0, got ${value}`);
  }
}

/** True for a count from 1 to threshold (never for 0, never when threshold is 0). */
export function isSmallCount(value: number, threshold: number): boolean {
  assertThreshold(threshold);
  return value >= 1 && value <= threshold;
}

/** One count printed on its own (no total it adds up to). */
export function suppressCount(value: number, threshold: number): CellState {
  assertCount(value, 'suppressCount');
  return isSmallCount(value, threshold) ? { shown: false, reason: 'small' } : { shown: true, value };
}

/** A figure computed from counts (share, rate, mean over a group): hidden when any source is hidden. */
export function dependentFigure(sources: readonly CellState[], value: number): CellState {
  return sources.every((s) => s.shown) ? { shown: true, value } : { shown: false, reason: 'derived' };
}

/** Range a reader can work out for values[target] from one relation, given what is hidden. */
function readerRange(
  values: readonly number[],
  state: readonly CellState[],
  rel: CountRelation,
  target: number,
  threshold: number,
): [number, number] {
  // A hidden small count is known to be in [1, N]; a hidden derived figure in [0, ∞).
  const bounds = (i: number): [number, number] => {
    const s = state[i]!;
    if (s.shown) return [values[i]!, values[i]!];
    return s.reason === 'small' ? [1, threshold] : [0, Infinity];
  };
  // total − Σ members = 0. Solve for the target using interval arithmetic on the others.
  let lo: number;
  let hi: number;
  if (target === rel.total) {
    lo = 0; hi = 0;
    for (const m of rel.members) { const [a, b] = bounds(m); lo += a; hi += b; }
  } else {
    const [tLo, tHi] = bounds(rel.total);
    lo = tLo; hi = tHi;
    for (const m of rel.members) {
      if (m === target) continue;
      const [a, b] = bounds(m);
      lo -= b; hi -= a;
    }
  }
  const [ownLo, ownHi] = bounds(target);
  return [Math.max(lo, ownLo), Math.min(hi, ownHi)];
}

/** Does this relation reveal (or pin down) a hidden count? */
function relationLeaks(values: readonly number[], state: readonly CellState[], rel: CountRelation, threshold: number): boolean {
  const entries = [...rel.members, rel.total];
  const hidden = entries.filter((i) => !state[i]!.shown);
  if (hidden.length === 0) return false;
  if (hidden.length === 1) return true; // rule a
  const totalState = state[rel.total]!;
  if (totalState.shown) {
    const hiddenSum = rel.members.filter((i) => !state[i]!.shown).reduce((s, i) => s + values[i]!, 0);
    if (hiddenSum >= 1 && hiddenSum <= threshold) return true; // rule b
  }
  for (const i of hidden) { // rule c
    const s = state[i]!;
    if (s.shown || s.reason !== 'small') continue;
    const [lo, hi] = readerRange(values, state, rel, i, threshold);
    if (lo >= hi) return true;
  }
  return false;
}

/**
 * Suppress a flat list of counts tied together by additive relations. Returns one state per value.
 * Throws (an internal fault: the memo model built a wrong relation) when a relation does not add up.
 */
export function suppressCounts(values: readonly number[], relations: readonly CountRelation[], threshold: number): CellState[] {
  assertThreshold(threshold);
  values.forEach((v, i) => assertCount(v, `count ${i}`));
  for (const rel of relations) {
    const idx = [...rel.members, rel.total];
    if (idx.some((i) => !Number.isInteger(i) || i < 0 || i >= values.length)) {
      throw new RangeError('suppressCounts: a relation refers to a count that is not in the list');
    }
    const sum = rel.members.reduce((s, i) => s + values[i]!, 0);
    if (sum !== values[rel.total]) {
      throw new RangeError(`suppressCounts: members add up to ${sum}, but their total is ${values[rel.total]}`);
    }
  }
  const state: CellState[] = values.map((v) => suppressCount(v, threshold));
  if (threshold === 0) return state;

  let changed = true;
  while (changed) {
    changed = false;
    for (const rel of relations) {
      if (!relationLeaks(values, state, rel, threshold)) continue;
      // Hide the smallest shown positive member; if none is left, the total.
      let pick = -1;
      for (const m of rel.members) {
        if (state[m]!.shown && values[m]! > 0 && (pick < 0 || values[m]! < values[pick]!)) pick = m;
      }
      if (pick < 0 && state[rel.total]!.shown && values[rel.total]! > 0) pick = rel.total;
      if (pick < 0) continue; // everything that can be hidden is hidden
      state[pick] = { shown: false, reason: 'derived' };
      changed = true;
    }
  }
  return state;
}

export interface CountTableInput {
  /** counts[row][column] */
  counts: number[][];
  /** Print a total for each row (the sum of its cells). */
  rowTotals?: boolean;
  /** Print a total for each column (the sum of its cells). */
  columnTotals?: boolean;
}

export interface SuppressedCountTable {
  counts: CellState[][];
  /** Present when rowTotals was asked for. */
  rowTotals?: CellState[];
  /** Present when columnTotals was asked for. */
  columnTotals?: CellState[];
  /** Present when both totals were asked for. */
  grandTotal?: CellState;
}

/** A one- or two-way table of counts with the totals it prints, computed here so they always add up. */
export function suppressCountTable(input: CountTableInput, threshold: number): SuppressedCountTable {
  const rows = input.counts.length;
  const cols = rows === 0 ? 0 : input.counts[0]!.length;
  if (input.counts.some((r) => r.length !== cols)) throw new RangeError('suppressCountTable: rows have different lengths');
  const values: number[] = input.counts.flat();
  const cell = (r: number, c: number) => r * cols + c;
  const relations: CountRelation[] = [];
  const rowTotalIdx: number[] = [];
  const colTotalIdx: number[] = [];
  if (input.rowTotals) {
    for (let r = 0; r < rows; r++) {
      rowTotalIdx.push(values.length);
      values.push(input.counts[r]!.reduce((s, v) => s + v, 0));
      relations.push({ members: Array.from({ length: cols }, (_, c) => cell(r, c)), total: rowTotalIdx[r]! });
    }
  }
  if (input.columnTotals) {
    for (let c = 0; c < cols; c++) {
      colTotalIdx.push(values.length);
      values.push(input.counts.reduce((s, row) => s + row[c]!, 0));
      relations.push({ members: Array.from({ length: rows }, (_, r) => cell(r, c)), total: colTotalIdx[c]! });
    }
  }
  let grandIdx = -1;
  if (input.rowTotals && input.columnTotals) {
    grandIdx = values.length;
    values.push(input.counts.flat().reduce((s, v) => s + v, 0));
    relations.push({ members: rowTotalIdx, total: grandIdx });
    relations.push({ members: colTotalIdx, total: grandIdx });
  }
  const state = suppressCounts(values, relations, threshold);
  const out: SuppressedCountTable = {
    counts: input.counts.map((row, r) => row.map((_, c) => state[cell(r, c)]!)),
  };
  if (input.rowTotals) out.rowTotals = rowTotalIdx.map((i) => state[i]!);
  if (input.columnTotals) out.columnTotals = colTotalIdx.map((i) => state[i]!);
  if (grandIdx >= 0) out.grandTotal = state[grandIdx]!;
  return out;
}

/**
 * Binned unit counts for a map or histogram: small bins become null (drawn blank). When the output
 * also prints how many units the bins hold in all (`printedTotal`), that total is a relation and
 * secondary suppression applies, so a lone hidden bin cannot be recovered by subtraction.
 */
export function suppressBinnedCounts(
  bins: number[][],
  threshold: number,
  printedTotal = false,
): Array<Array<number | null>> {
  const cols = bins.length === 0 ? 0 : bins[0]!.length;
  if (bins.some((r) => r.length !== cols)) throw new RangeError('suppressBinnedCounts: rows have different lengths');
  const values = bins.flat();
  const relations: CountRelation[] = [];
  if (printedTotal) {
    relations.push({ members: values.map((_, i) => i), total: values.length });
    values.push(values.reduce((s, v) => s + v, 0));
  }
  const state = suppressCounts(values, relations, threshold);
  return bins.map((row, r) => row.map((_, c) => {
    const s = state[r * cols + c]!;
    return s.shown ? s.value : null;
  }));
}

/** A document cell for a suppression state. */
export function toCell(state: CellState, format?: NumberFormat): Cell {
  if (!state.shown) return { kind: 'suppressed', reason: state.reason };
  return format ? { kind: 'number', value: state.value, format } : { kind: 'number', value: state.value };
}

/** An inline run for a suppression state (a count in running text). */
export function toInline(state: CellState, format: NumberFormat = { style: 'integer' }): Inline {
  return state.shown ? { kind: 'number', value: state.value, format } : { kind: 'suppressed', reason: state.reason };
}

/** Marks and legend sentences for a threshold, in words a policy analyst understands. */
export function suppressionLegend(threshold: number): SuppressionLegend {
  assertThreshold(threshold);
  if (threshold === 0) {
    return {
      threshold,
      smallMark: '',
      derivedMark: '',
      smallLegend: 'Small-cell suppression is turned off for this memo: every count is shown.',
      derivedLegend: '',
    };
  }
  const range = threshold === 1 ? 'a count of 1' : `a count from 1 to ${threshold}`;
  return {
    threshold,
    smallMark: `≤${threshold}`,
    derivedMark: '—',
    smallLegend: `≤${threshold}: ${range}, hidden to protect the people counted.`,
    derivedLegend: '—: hidden because a hidden count could otherwise be worked out from it.',
  };
}
