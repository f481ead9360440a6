// Small helpers to take the rows of an estimation sample out of whole-data columns. Pure.

import type { ClusterCodes, ClusterIds } from './types.ts';

/** Positions (ascending) where mask is 1. */
export function indicesOf(mask: Uint8Array): Int32Array {
  let count = 0;
  for (let i = 0; i < mask.length; i++) count += mask[i]!;
  const out = new Int32Array(count);
  let j = 0;
  for (let i = 0; i < mask.length; i++) if (mask[i]) out[j++] = i;
  return out;
}

/** values[idx[0]], values[idx[1]], … */
export function gather(values: ArrayLike<number>, idx: Int32Array): Float64Array {
  const out = new Float64Array(idx.length);
  for (let j = 0; j < idx.length; j++) out[j] = values[idx[j]!]!;
  return out;
}

export function sameIndices(a: Int32Array, b: Int32Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
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

/** A number for messages: up to 4 significant digits, no exponent for ordinary sizes. */
export function formatNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x !== 0 && (Math.abs(x) >= 1e6 || Math.abs(x) < 1e-3)) return x.toPrecision(4);
  return String(Number(x.toPrecision(4)));
}
