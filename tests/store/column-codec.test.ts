// Column chunks as bytes. Expected byte patterns are the IEEE 754-2019 binary64 encodings
// (sign bit, 11-bit exponent biased by 1023, 52-bit fraction; §3.4) and 32-bit two's
// complement, written least significant byte first.

import { describe, expect, it } from 'vitest';
import { chunkCount, chunkRange, decodeNumericChunkInto, decodeTextChunk, encodeNumericChunk, encodeTextChunk } from '../../main/store/column-codec.ts';

const hex = (b: Uint8Array): string => Buffer.from(b).toString('hex');

/** A Float64Array whose elements have the given bit patterns (big-endian hex, as usually written). */
function fromBits(patterns: string[]): Float64Array {
  const out = new Float64Array(patterns.length);
  const view = new DataView(out.buffer);
  patterns.forEach((p, i) => view.setBigUint64(i * 8, BigInt('0x' + p), true));
  return out;
}

describe('numeric chunks', () => {
  it('are the little-endian IEEE 754 binary64 bytes', () => {
    const v = new Float64Array([1, -2, 0.5, -0, Infinity]);
    expect(hex(encodeNumericChunk(v, 0, 5))).toBe([
      '000000000000f03f', // 1.0      = 0x3FF0000000000000
      '00000000000000c0', // -2.0     = 0xC000000000000000
      '000000000000e03f', // 0.5      = 0x3FE0000000000000
      '0000000000000080', // -0.0     = 0x8000000000000000
      '000000000000f07f', // +Inf     = 0x7FF0000000000000
    ].join(''));
  });

  it('are the little-endian two\'s-complement bytes for i32', () => {
    const v = new Int32Array([1, -1, -2147483648, 2147483647]);
    expect(hex(encodeNumericChunk(v, 0, 4))).toBe('01000000' + 'ffffffff' + '00000080' + 'ffffff7f');
  });

  it('keep every bit, NaN payloads and signalling NaNs included, on either byte order', () => {
    const v = fromBits(['7ff8000000000001', 'fff8000000000000', '7ff0000000000001', '0000000000000001', '7fefffffffffffff']);
    for (const hostLE of [true, false]) {
      const bytes = encodeNumericChunk(v, 0, v.length, hostLE);
      const back = new Float64Array(v.length);
      expect(decodeNumericChunkInto(back, 0, v.length, bytes, hostLE)).toBe(true);
      expect(hex(new Uint8Array(back.buffer))).toBe(hex(new Uint8Array(v.buffer)));
    }
  });

  it('write the same bytes whatever the host byte order (the file is portable)', () => {
    const f = new Float64Array([3.141592653589793, -1e-310, 6.02214076e23]);
    const i = new Int32Array([123456789, -42]);
    expect(hex(encodeNumericChunk(f, 0, 3, false))).toBe(hex(encodeNumericChunk(f, 0, 3, true)));
    expect(hex(encodeNumericChunk(i, 0, 2, false))).toBe(hex(encodeNumericChunk(i, 0, 2, true)));
    const back = new Int32Array(2);
    decodeNumericChunkInto(back, 0, 2, encodeNumericChunk(i, 0, 2, true), false);
    expect(Array.from(back)).toEqual([123456789, -42]);
  });

  it('encode a slice and decode it at an offset', () => {
    const v = new Float64Array([10, 11, 12, 13, 14]);
    const target = new Float64Array(5).fill(-1);
    expect(decodeNumericChunkInto(target, 2, 2, encodeNumericChunk(v, 1, 3))).toBe(true);
    expect(Array.from(target)).toEqual([-1, -1, 11, 12, -1]);
  });

  it('refuse a chunk of the wrong size without writing', () => {
    const target = new Float64Array(4);
    expect(decodeNumericChunkInto(target, 0, 4, new Uint8Array(31))).toBe(false);
    expect(decodeNumericChunkInto(target, 2, 4, new Uint8Array(32))).toBe(false);
    expect(Array.from(target)).toEqual([0, 0, 0, 0]);
  });
});

describe('text chunks', () => {
  it('keep empty strings and any Unicode text, including unpaired surrogates', () => {
    const v = ['', 'Zoë', '北京', '👩‍👩‍👧', 'e\u0301', '\ud800', 'tab\tnew\nline "quoted" \\', ' '];
    const back = decodeTextChunk(encodeTextChunk(v, 0, v.length), v.length);
    expect(back).toEqual(v);
  });

  it('keep lone surrogates even when two strings would pair up across their boundary', () => {
    const v = ['x\ud83d', '\ude00y', '\ud83d\ude00'];
    expect(decodeTextChunk(encodeTextChunk(v, 0, 3), 3)).toEqual(v);
    expect(encodeTextChunk(v, 0, 3)[0]).toBe(1); // joined text is well formed, so UTF-8 suffices
    expect(encodeTextChunk(['\udc00'], 0, 1)[0]).toBe(2); // a truly unpaired surrogate needs UTF-16
  });

  it('are laid out as documented: format byte, count, offsets in code units, UTF-8 text', () => {
    // "é" is two UTF-8 bytes (RFC 3629 §3) but one UTF-16 code unit.
    expect(hex(encodeTextChunk(['ab', '', 'é'], 0, 3))).toBe('01000000' + '03000000' + '00000000' + '02000000' + '02000000' + '03000000' + '6162' + 'c3a9');
  });

  it('refuse bytes that are not a chunk of the expected number of strings', () => {
    const good = encodeTextChunk(['a', 'bc'], 0, 2);
    expect(decodeTextChunk(good, 2)).toEqual(['a', 'bc']);
    expect(decodeTextChunk(good, 3)).toBeNull(); // wrong count
    expect(decodeTextChunk(good.subarray(0, good.length - 1), 2)).toBeNull(); // text cut short
    expect(decodeTextChunk(good.subarray(0, 10), 2)).toBeNull(); // offsets cut short
    const badFormat = Buffer.from(good); badFormat[0] = 9;
    expect(decodeTextChunk(badFormat, 2)).toBeNull();
    const backwards = Buffer.from(good); backwards.writeInt32LE(5, 12);
    expect(decodeTextChunk(backwards, 2)).toBeNull();
    expect(decodeTextChunk(Buffer.from('["a", "b"]'), 2)).toBeNull();
  });
});

describe('chunking', () => {
  it('covers every row exactly once', () => {
    expect(chunkCount(0, 4)).toBe(0);
    expect(chunkCount(8, 4)).toBe(2);
    expect(chunkCount(9, 4)).toBe(3);
    expect([0, 1, 2].map((k) => chunkRange(k, 9, 4))).toEqual([[0, 4], [4, 8], [8, 9]]);
  });
});
