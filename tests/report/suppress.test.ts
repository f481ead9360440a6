// Small-cell suppression. Policy sources: US CMS cell size suppression policy (no count from 1 to 10
// shown, nor a figure from which one could be derived); Washington State DOH small-numbers guidelines
// (fewer than 10). Secondary suppression is checked against an independent brute-force reader who
// enumerates every table consistent with what is printed (the attack described in Cox 1980, JASA
// 75(370):377–385: recovering a hidden cell from the margins).

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  DEFAULT_SMALL_CELL_MAX, dependentFigure, isSmallCount, suppressBinnedCounts, suppressCount, suppressCountTable,
  suppressCounts, suppressionLegend, toCell, type CellState,
} from '../../main/report/model/suppress.ts';

const hidden = (s: CellState) => !s.shown;

describe('primary suppression (CMS: counts 1 to 10)', () => {
  it('hides 10 and shows 11 at the default threshold', () => {
    expect(DEFAULT_SMALL_CELL_MAX).toBe(10);
    expect(suppressCount(10, DEFAULT_SMALL_CELL_MAX)).toEqual({ shown: false, reason: 'small' });
    expect(suppressCount(11, DEFAULT_SMALL_CELL_MAX)).toEqual({ shown: true, value: 11 });
    expect(suppressCount(1, DEFAULT_SMALL_CELL_MAX).shown).toBe(false);
  });
  it('shows zero (not a small cell under either policy)', () => {
    expect(suppressCount(0, 10)).toEqual({ shown: true, value: 0 });
    expect(isSmallCount(0, 10)).toBe(false);
  });
  it('follows a configured threshold (Washington State DOH: fewer than 10 → 9) and 0 turns it off', () => {
    expect(isSmallCount(9, 9)).toBe(true);
    expect(isSmallCount(10, 9)).toBe(false);
    expect(isSmallCount(1, 0)).toBe(false);
    expect(suppressCountTable({ counts: [[1, 2], [3, 400]], rowTotals: true, columnTotals: true }, 0).counts.flat().every((s) => s.shown)).toBe(true);
  });
  it('refuses a threshold or count that is not a whole number ≥ 0', () => {
    expect(() => isSmallCount(3, -1)).toThrow(/whole number/);
    expect(() => suppressCount(2.5, 10)).toThrow(/whole number/);
  });
});

describe('secondary suppression', () => {
  it('a lone hidden cell in a row with a shown total is protected by hiding the next smallest cell', () => {
    const t = suppressCountTable({ counts: [[5, 100, 40]], rowTotals: true }, 10);
    expect(t.counts[0]![0]).toEqual({ shown: false, reason: 'small' });
    // 40 is the smallest shown positive member: hiding it loses the least.
    expect(t.counts[0]![2]).toEqual({ shown: false, reason: 'derived' });
    expect(t.counts[0]![1]).toEqual({ shown: true, value: 100 });
    expect(t.rowTotals![0]).toEqual({ shown: true, value: 145 });
  });
  it('two hidden cells whose sum is itself small get a third hidden', () => {
    // 3 + 4 = 7 = total − shown: a small combined count; rule b.
    const t = suppressCountTable({ counts: [[3, 4, 50, 60]], rowTotals: true }, 10);
    expect(t.counts[0]!.map(hidden)).toEqual([true, true, true, false]);
  });
  it('two hidden cells pinned by their total (10 + 10 = 20) are protected by hiding the total', () => {
    const t = suppressCountTable({ counts: [[10, 10]], rowTotals: true }, 10);
    expect(t.counts[0]!.every(hidden)).toBe(true);
    expect(t.rowTotals![0]).toEqual({ shown: false, reason: 'derived' });
  });
  it('a hidden total with every member shown is protected by hiding a member', () => {
    const state = suppressCounts([40, 30, 70], [{ members: [0, 1], total: 2 }], 10);
    expect(state[2]!.shown).toBe(true);
    const forced = suppressCounts([4, 7, 11], [{ members: [0, 1], total: 2 }], 10);
    expect(forced.map(hidden)).toEqual([true, true, false]); // 4 + 7 = 11 > 10 and neither is pinned
  });
  it('propagates across rows and columns until every line is safe', () => {
    const t = suppressCountTable({ counts: [[2, 50, 60], [70, 80, 90], [100, 3, 120]], rowTotals: true, columnTotals: true }, 10);
    const grid = t.counts.map((r, i) => [...r, t.rowTotals![i]!]);
    grid.push([...t.columnTotals!, t.grandTotal!]);
    for (let r = 0; r < 4; r++) {
      const n = grid[r]!.filter(hidden).length;
      expect(n === 0 || n >= 2).toBe(true);
    }
    for (let c = 0; c < 4; c++) {
      const n = grid.map((row) => row[c]!).filter(hidden).length;
      expect(n === 0 || n >= 2).toBe(true);
    }
  });
  it('refuses a relation whose members do not add up to its total (an internal fault)', () => {
    expect(() => suppressCounts([1, 2, 4], [{ members: [0, 1], total: 2 }], 10)).toThrow(/add up to 3/);
  });
});

/**
 * Independent check: a reader who knows the printed values, that hidden small cells are 1..N and that
 * hidden derived cells are ≥ 0, enumerates every completion of a one-way table with its printed
 * total. Each hidden small cell must still be able to take at least two values.
 */
function bruteForceRecoverable(values: number[], state: CellState[], n: number, maxValue: number): boolean {
  const hiddenIdx = state.map((s, i) => (s.shown ? -1 : i)).filter((i) => i >= 0);
  const seen = new Map<number, Set<number>>();
  for (const i of hiddenIdx) seen.set(i, new Set());
  const members = values.length - 1;
  const cand = [...values];
  const rec = (k: number): void => {
    if (k === hiddenIdx.length) {
      const sum = cand.slice(0, members).reduce((a, b) => a + b, 0);
      if (sum !== cand[members]) return;
      for (const i of hiddenIdx) seen.get(i)!.add(cand[i]!);
      return;
    }
    const i = hiddenIdx[k]!;
    const s = state[i]!;
    const lo = !s.shown && s.reason === 'small' ? 1 : 0;
    const hi = !s.shown && s.reason === 'small' ? n : maxValue;
    for (let v = lo; v <= hi; v++) { cand[i] = v; rec(k + 1); }
  };
  rec(0);
  return hiddenIdx.some((i) => state[i]!.shown === false && (state[i] as { reason: string }).reason === 'small' && seen.get(i)!.size < 2);
}

describe('property: no hidden small count can be worked out from a printed total', () => {
  it('one-way tables with a total (brute-force reader, N = 3)', () => {
    const N = 3;
    fc.assert(fc.property(fc.array(fc.integer({ min: 0, max: 8 }), { minLength: 1, maxLength: 4 }), (counts) => {
      const total = counts.reduce((a, b) => a + b, 0);
      const values = [...counts, total];
      const state = suppressCounts(values, [{ members: counts.map((_, i) => i), total: counts.length }], N);
      // Every primary small cell is hidden.
      counts.forEach((v, i) => { if (v >= 1 && v <= N) expect(state[i]!.shown).toBe(false); });
      // A reader bounding derived cells by the largest possible value (sum of all) cannot pin one.
      expect(bruteForceRecoverable(values, state, N, Math.max(total, N))).toBe(false);
    }), { numRuns: 150, seed: 20250312 });
  });
  it('two-way tables with margins: every line has 0 or ≥ 2 hidden entries, and a shown total never leaves a small hidden sum', () => {
    fc.assert(fc.property(
      fc.array(fc.array(fc.integer({ min: 0, max: 40 }), { minLength: 3, maxLength: 3 }), { minLength: 1, maxLength: 5 }),
      (counts) => {
        const N = 10;
        const t = suppressCountTable({ counts, rowTotals: true, columnTotals: true }, N);
        const lines: Array<{ members: CellState[]; memberValues: number[]; total: CellState }> = [];
        counts.forEach((row, r) => lines.push({ members: t.counts[r]!, memberValues: row, total: t.rowTotals![r]! }));
        for (let c = 0; c < 3; c++) {
          lines.push({ members: t.counts.map((row) => row[c]!), memberValues: counts.map((row) => row[c]!), total: t.columnTotals![c]! });
        }
        for (const line of lines) {
          const k = line.members.filter(hidden).length + (line.total.shown ? 0 : 1);
          expect(k === 0 || k >= 2).toBe(true);
          if (line.total.shown) {
            const s = line.memberValues.filter((_, i) => !line.members[i]!.shown).reduce((a, b) => a + b, 0);
            expect(s === 0 || s > N).toBe(true);
          }
        }
      },
    ), { numRuns: 200, seed: 7 });
  });
});

describe('figures and bins', () => {
  it('a figure computed from a hidden count is hidden too', () => {
    expect(dependentFigure([{ shown: true, value: 50 }, { shown: false, reason: 'small' }], 0.12)).toEqual({ shown: false, reason: 'derived' });
    expect(dependentFigure([{ shown: true, value: 50 }], 0.12)).toEqual({ shown: true, value: 0.12 });
  });
  it('small bins are blank; with a printed total a lone small bin takes another with it', () => {
    expect(suppressBinnedCounts([[0, 5], [40, 60]], 10)).toEqual([[0, null], [40, 60]]);
    expect(suppressBinnedCounts([[0, 5], [40, 60]], 10, true)).toEqual([[0, null], [null, 60]]);
  });
  it('cells and legend carry no hidden value', () => {
    const cell = toCell({ shown: false, reason: 'small' });
    expect(JSON.stringify(cell)).not.toMatch(/\d/);
    const legend = suppressionLegend(10);
    expect(legend.smallMark).toBe('≤10');
    expect(legend.smallLegend).toContain('1 to 10');
    expect(suppressionLegend(0).smallLegend).toMatch(/off/);
  });
});
