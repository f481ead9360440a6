// Finding the row that holds the column names. Agencies often put a title, a date or a note
// above the table; the header is the first row whose cells are mostly filled with distinct
// text and that is followed by data rows. Pure.

import { CellKind, type CellKindCode } from './types.ts';

export interface ScannedRow {
  rowNumber: number;
  kinds: readonly CellKindCode[];
  /** Display text of each cell ('' for blanks). */
  texts: readonly string[];
}

/** How many rows after a candidate are looked at to judge the table's width. */
const LOOK_AHEAD = 20;

function widthOf(kinds: readonly CellKindCode[]): number {
  for (let i = kinds.length - 1; i >= 0; i--) if (kinds[i] !== CellKind.Blank) return i + 1;
  return 0;
}

interface RowShape {
  filled: number;
  qualifies: boolean;
}

function median(values: number[]): number {
  if (values.length === 0) return 0;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor((sorted.length - 1) / 2)]!;
}

/**
 * Index (into `rows`) of the header row, or null when no row looks like one. A row qualifies
 * when (common practice, no published source): at least half of its filled cells are text,
 * its filled cells cover at least 60% of the table's width (the larger of its own width and
 * the median width of the next rows, so a one-cell title above a wide table does not
 * qualify), and at least half of its names are distinct. The first qualifying row wins, unless
 * the next filled row also qualifies and has more filled cells (a short title line such as
 * "Program: X | Date: Y" directly above the real header).
 */
export function findHeaderRow(rows: readonly ScannedRow[]): number | null {
  const shapes: RowShape[] = rows.map((row, i) => {
    const width = widthOf(row.kinds);
    let filled = 0;
    let text = 0;
    const names = new Set<string>();
    for (let c = 0; c < width; c++) {
      const kind = row.kinds[c];
      if (kind === CellKind.Blank) continue;
      filled++;
      if (kind === CellKind.Text) text++;
      names.add((row.texts[c] ?? '').trim().toLowerCase());
    }
    const following: number[] = [];
    for (let j = i + 1; j < rows.length && j <= i + LOOK_AHEAD; j++) following.push(widthOf(rows[j]!.kinds));
    const tableWidth = Math.max(width, median(following));
    const qualifies = filled > 0 && text * 2 >= filled && filled >= 0.6 * tableWidth && names.size * 2 >= filled;
    return { filled, qualifies };
  });
  for (let i = 0; i < shapes.length; i++) {
    const here = shapes[i]!;
    if (!here.qualifies) continue;
    const next = shapes[i + 1];
    if (next !== undefined && next.qualifies && next.filled > here.filled) continue;
    return i;
  }
  return null;
}
