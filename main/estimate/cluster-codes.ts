// Dense cluster codes: the one place that turns analyst-given cluster ids into 0..G−1, shared by
// the variance formulas (variance.ts) and the sample helpers (subset.ts) without an import cycle.
// Pure.

import type { ClusterIds } from './types.ts';

/** Dense cluster codes 0..count−1, in order of first appearance. */
export interface ClusterCodes {
  codes: Int32Array;
  count: number;
}

/**
 * Codes 0..count−1 for every unit in order of first appearance; −1 where the id is missing
 * (a non-finite number or a blank string), so callers can exclude and count those units.
 */
export function globalClusterCodes(ids: ClusterIds): { codes: Int32Array; count: number } {
  const n = ids.length;
  const codes = new Int32Array(n);
  const seen = new Map<number | string, number>();
  for (let i = 0; i < n; i++) {
    const id = ids[i]!;
    if ((typeof id === 'number' && !Number.isFinite(id)) || (typeof id === 'string' && id.trim() === '')) {
      codes[i] = -1;
      continue;
    }
    let c = seen.get(id);
    if (c === undefined) {
      c = seen.size;
      seen.set(id, c);
    }
    codes[i] = c;
  }
  return { codes, count: seen.size };
}

/** Dense cluster codes for the rows idx (none of them missing), renumbered from 0. */
export function subsetClusters(global: { codes: Int32Array; count: number }, idx: Int32Array): ClusterCodes {
  const local = new Int32Array(global.count).fill(-1);
  const codes = new Int32Array(idx.length);
  let count = 0;
  for (let j = 0; j < idx.length; j++) {
    const g = global.codes[idx[j]!]!;
    let c = local[g]!;
    if (c < 0) {
      c = count++;
      local[g] = c;
    }
    codes[j] = c;
  }
  return { codes, count };
}
