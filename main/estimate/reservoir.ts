// A seeded uniform sample of fixed size from rows that arrive in chunks: Algorithm R (J. S.
// Vitter, "Random sampling with a reservoir", ACM Transactions on Mathematical Software
// 11(1):37–57, 1985). The first K rows fill the reservoir; row t (0-based, t ≥ K) replaces slot
// j = ⌊u·(t + 1)⌋ when j < K, u uniform on [0, 1) from the study's seeded generator (random.ts).
// Every row ends in the sample with probability K/N, and the sample depends only on the rows'
// order and the seed — never on how the rows were cut into chunks. With N ≤ K the sample is every
// row, in file order. Used by the streamed path for the checks that need the units at once. Pure.

import { createRng, type Rng } from '../design/random.ts';

/** Stream number of the reservoir's generator (apart from the other draws seeded by the study). */
export const RESERVOIR_STREAM = 0x7e5e;

export interface Reservoir {
  size: number;
  /** Rows offered so far. */
  seen: number;
  /** One array of `size` values per column. */
  columns: Float64Array[];
  rng: Rng;
}

export function createReservoir(size: number, columnCount: number, seed: number): Reservoir {
  return { size, seen: 0, columns: Array.from({ length: columnCount }, () => new Float64Array(size)), rng: createRng(seed, RESERVOIR_STREAM) };
}

/** Offer rows 0..count−1 of `columns` (one array per reservoir column), in order. */
export function offerRows(res: Reservoir, columns: readonly Float64Array[], count: number): void {
  const k = res.size;
  const p = res.columns.length;
  for (let r = 0; r < count; r++) {
    const t = res.seen++;
    const slot = t < k ? t : Math.floor(res.rng.next() * (t + 1));
    if (slot >= k) continue;
    for (let j = 0; j < p; j++) res.columns[j]![slot] = columns[j]![r]!;
  }
}

/** The sample: per column, the filled slots (min(seen, size) values). */
export function reservoirColumns(res: Reservoir): Float64Array[] {
  const m = Math.min(res.seen, res.size);
  return res.columns.map((c) => c.subarray(0, m));
}
