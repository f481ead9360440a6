// How a column is cut into chunks and each chunk turned into bytes for a BLOB.
//
// Numeric chunks hold the raw IEEE 754 binary64 (f64) or two's-complement 32-bit (i32) values in
// little-endian byte order (IEEE 754-2019 §3.4 for the binary64 layout), so the file reads the
// same on any machine and, on the little-endian machines Fenceline runs on, loading a chunk is
// one memory copy. Every bit is kept, NaN payloads included. Text chunks hold the chunk's strings
// concatenated (UTF-8, RFC 3629) behind a table of offsets; see encodeTextChunk.

import { Buffer } from 'node:buffer';

/** Rows per chunk for new datasets (stored per dataset, so it may change later). */
export const DEFAULT_CHUNK_ROWS = 65_536;

export const HOST_IS_LITTLE_ENDIAN: boolean = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

export type NumericArray = Float64Array | Int32Array;

export function chunkCount(rowCount: number, chunkRows: number): number {
  return Math.ceil(rowCount / chunkRows);
}

/** [start, end) rows of chunk `index`. */
export function chunkRange(index: number, rowCount: number, chunkRows: number): [number, number] {
  const start = index * chunkRows;
  return [start, Math.min(rowCount, start + chunkRows)];
}

/** Little-endian bytes of rows [start, end) of a numeric column. */
export function encodeNumericChunk(values: NumericArray, start: number, end: number, littleEndianHost = HOST_IS_LITTLE_ENDIAN): Uint8Array {
  const width = values.BYTES_PER_ELEMENT;
  if (littleEndianHost) {
    // A view, not a copy: SQLite copies the bytes when the statement binds them.
    return Buffer.from(values.buffer, values.byteOffset + start * width, (end - start) * width);
  }
  const out = new Uint8Array((end - start) * width);
  const view = new DataView(out.buffer);
  if (values instanceof Float64Array) {
    for (let i = start; i < end; i++) view.setFloat64((i - start) * 8, values[i]!, true);
  } else {
    for (let i = start; i < end; i++) view.setInt32((i - start) * 4, values[i]!, true);
  }
  return out;
}

/**
 * Copy a little-endian chunk into `target` from row `startRow`.
 * Returns false (and writes nothing) when the chunk's length does not match `rows`.
 */
export function decodeNumericChunkInto(target: NumericArray, startRow: number, rows: number, blob: Uint8Array, littleEndianHost = HOST_IS_LITTLE_ENDIAN): boolean {
  const width = target.BYTES_PER_ELEMENT;
  if (blob.byteLength !== rows * width || startRow + rows > target.length) return false;
  if (littleEndianHost) {
    new Uint8Array(target.buffer, target.byteOffset + startRow * width, blob.byteLength).set(blob);
    return true;
  }
  const view = new DataView(blob.buffer, blob.byteOffset, blob.byteLength);
  if (target instanceof Float64Array) {
    for (let i = 0; i < rows; i++) target[startRow + i] = view.getFloat64(i * 8, true);
  } else {
    for (let i = 0; i < rows; i++) target[startRow + i] = view.getInt32(i * 4, true);
  }
  return true;
}

/** Text encodings of a chunk's characters (first byte of a text chunk). */
const TEXT_UTF8 = 1;
const TEXT_UTF16LE = 2;
const TEXT_HEADER_BYTES = 8;

/** Most UTF-16 code units one text chunk may hold (V8 strings stop near 2^29). */
export const MAX_TEXT_CHUNK_UNITS = 2 ** 28;

/** An unpaired surrogate, which UTF-8 cannot carry (it would turn into U+FFFD). */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/**
 * Rows [start, end) of a text column as one blob:
 *   byte 0: 1 = UTF-8, 2 = UTF-16LE (used only when the text holds an unpaired surrogate);
 *   bytes 4-7: number of strings n (u32 LE);
 *   then n + 1 offsets (i32 LE) into the text, in UTF-16 code units;
 *   then the strings' characters, concatenated.
 * Reading is one decode per chunk plus a slice per string (several times faster than a JSON
 * array), and any JavaScript string, empty or not, comes back exactly.
 */
export function encodeTextChunk(values: readonly string[], start: number, end: number): Uint8Array {
  const count = end - start;
  const offsets = new Int32Array(count + 1);
  let units = 0;
  for (let i = 0; i < count; i++) {
    offsets[i] = units;
    units += values[start + i]!.length;
  }
  offsets[count] = units;
  const joined = values.slice(start, end).join('');
  // Offsets count code units of the joined text, so a pair split across two strings is still sliced apart.
  const utf8 = !LONE_SURROGATE.test(joined);
  const body = Buffer.from(joined, utf8 ? 'utf8' : 'utf16le');
  const out = Buffer.alloc(TEXT_HEADER_BYTES + 4 * (count + 1) + body.length);
  out[0] = utf8 ? TEXT_UTF8 : TEXT_UTF16LE;
  out.writeUInt32LE(count, 4);
  for (let i = 0; i <= count; i++) out.writeInt32LE(offsets[i]!, TEXT_HEADER_BYTES + 4 * i);
  body.copy(out, TEXT_HEADER_BYTES + 4 * (count + 1));
  return out;
}

/** The strings of a text chunk, or null when the bytes are not a well-formed chunk of `rows` strings. */
export function decodeTextChunk(blob: Uint8Array, rows: number): string[] | null {
  const bytes = Buffer.from(blob.buffer, blob.byteOffset, blob.byteLength);
  const bodyStart = TEXT_HEADER_BYTES + 4 * (rows + 1);
  if (bytes.length < bodyStart) return null;
  const format = bytes[0];
  if ((format !== TEXT_UTF8 && format !== TEXT_UTF16LE) || bytes.readUInt32LE(4) !== rows) return null;
  const body = bytes.subarray(bodyStart);
  if (format === TEXT_UTF16LE && body.length % 2 !== 0) return null;
  const text = body.toString(format === TEXT_UTF8 ? 'utf8' : 'utf16le');
  const out = new Array<string>(rows);
  let from = bytes.readInt32LE(TEXT_HEADER_BYTES);
  if (from !== 0) return null;
  for (let i = 0; i < rows; i++) {
    const to = bytes.readInt32LE(TEXT_HEADER_BYTES + 4 * (i + 1));
    if (to < from || to > text.length) return null;
    out[i] = text.slice(from, to);
    from = to;
  }
  return from === text.length ? out : null;
}
