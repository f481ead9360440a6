// Reservoir sampling (Algorithm R, Vitter 1985; main/estimate/reservoir.ts): every row is kept with
// probability K/N (checked against that closed form over many seeds, within 5 binomial standard
// deviations), and the sample does not depend on how the rows are cut into chunks.

import { describe, expect, it } from 'vitest';
import { createReservoir, offerRows, reservoirColumns } from '../../main/estimate/reservoir.ts';

const N = 1_000;
const K = 100;
const rows = Float64Array.from({ length: N }, (_, i) => i);

function sample(seed: number, chunk: number): Float64Array {
  const res = createReservoir(K, 1, seed);
  for (let from = 0; from < N; from += chunk) offerRows(res, [rows.subarray(from, Math.min(N, from + chunk))], Math.min(N, from + chunk) - from);
  return reservoirColumns(res)[0]!;
}

describe('reservoir sample of fixed size', () => {
  it('is the same whatever the chunk size', () => {
    const whole = sample(5, N);
    for (const chunk of [1, 7, 333]) expect(sample(5, chunk)).toEqual(whole);
    expect(new Set(whole).size).toBe(K);
  });
  it('keeps every row when there are fewer rows than slots, in order', () => {
    const res = createReservoir(2 * N, 1, 1);
    offerRows(res, [rows], N);
    expect(reservoirColumns(res)[0]).toEqual(rows);
  });
  it('keeps each row with probability K/N', () => {
    const seeds = 400;
    const counts = new Float64Array(N);
    for (let s = 0; s < seeds; s++) for (const v of sample(s, 97)) counts[v]!++;
    const p = K / N;
    const sd = Math.sqrt(seeds * p * (1 - p));
    // first rows, last rows and the middle: no position is favoured
    for (const i of [0, 1, 99, 100, 500, 998, 999]) expect(Math.abs(counts[i]! - seeds * p)).toBeLessThan(5 * sd);
    const mean = counts.reduce((a, b) => a + b, 0) / N;
    expect(mean).toBeCloseTo(seeds * p, 10);
  });
});
