// Seeded pseudo-random numbers for every random choice of the design stage (same seed → same
// numbers on every machine and for any number of workers).
// Generator: xorshift128 (G. Marsaglia, "Xorshift RNGs", Journal of Statistical Software
// 8(14), 2003, the 128-bit example on p. 5). Seeding: the 32-bit finalizer of MurmurHash3
// (A. Appleby, public-domain reference code) mixes (seed, stream) into four non-zero words.

function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

export interface Rng {
  /** Uniform on [0, 1) with 53 random bits. */
  next(): number;
  /** Raw 32-bit output. */
  nextUint32(): number;
}

/** A generator from an explicit state (x, y, z, w), as in the paper's listing; not all zero. */
export function rngFromState(state: [number, number, number, number]): Rng {
  return fromWords(Uint32Array.from(state));
}

export function createRng(seed: number, stream = 0): Rng {
  const s = new Uint32Array(4);
  let h = fmix32((seed >>> 0) ^ 0x9e3779b9) ^ fmix32(Math.floor(seed / 4294967296) + 0x632be5ab);
  for (let i = 0; i < 4; i++) {
    h = fmix32(h + Math.imul(i + 1, 0x9e3779b9) + fmix32(stream + i * 0x7f4a7c15));
    s[i] = h === 0 ? 0x6d2b79f5 : h;
  }
  return fromWords(s);
}

function fromWords(s: Uint32Array): Rng {
  // state (x, y, z, w) = s[0..3]; the update is the paper's xor128 line for line
  const nextUint32 = (): number => {
    const x = s[0]!;
    const t = (x ^ (x << 11)) >>> 0;
    s[0] = s[1]!;
    s[1] = s[2]!;
    s[2] = s[3]!;
    const w = s[3]!;
    s[3] = (w ^ (w >>> 19) ^ (t ^ (t >>> 8))) >>> 0;
    return s[3]!;
  };
  return {
    nextUint32,
    next: () => ((nextUint32() >>> 5) * 67108864 + (nextUint32() >>> 6)) / 9007199254740992,
  };
}
