// The Halton sequence (J. H. Halton, "On the efficiency of certain quasi-random sequences of
// points in evaluating multi-dimensional integrals", Numerische Mathematik 2:84–90, 1960):
// coordinate j of point i is the radical inverse of i in the j-th prime base (van der Corput's
// construction in base 2 for the first coordinate).

const PRIMES = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89, 97];

export const MAX_HALTON_DIMENSION = PRIMES.length;

/** Radical inverse φ_b(i): the digits of i in base b mirrored about the radix point. */
export function radicalInverse(i: number, base: number): number {
  let result = 0;
  let f = 1 / base;
  let k = i;
  while (k > 0) {
    result += f * (k % base);
    k = Math.floor(k / base);
    f /= base;
  }
  return result;
}

/**
 * Points i = first, ..., first + count − 1 of the `dims`-dimensional Halton sequence, row-major.
 * Point 0 is the origin; callers usually start at 1.
 */
export function haltonPoints(count: number, dims: number, first = 1): Float64Array {
  if (dims > PRIMES.length) throw new RangeError(`Halton sequence supports at most ${PRIMES.length} dimensions`);
  const out = new Float64Array(count * dims);
  for (let p = 0; p < count; p++) {
    for (let j = 0; j < dims; j++) out[p * dims + j] = radicalInverse(first + p, PRIMES[j]!);
  }
  return out;
}
