// Small helpers to take the rows of an estimation sample out of whole-data columns. Pure.
// (Cluster codes live in cluster-codes.ts, shared with variance.ts; re-exported here for callers.)

export { globalClusterCodes, subsetClusters } from './cluster-codes.ts';

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

/** A number for messages: up to 4 significant digits, no exponent for ordinary sizes. */
export function formatNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x !== 0 && (Math.abs(x) >= 1e6 || Math.abs(x) < 1e-3)) return x.toPrecision(4);
  return String(Number(x.toPrecision(4)));
}
