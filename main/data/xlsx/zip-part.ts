// Streaming one part of a zip package through node:zlib's raw inflate (RFC 1951; zip method 8,
// APPNOTE.TXT §4.4.5), with its size and CRC-32 (§4.4.7) checked again as the bytes arrive: the
// part handed to a parser is exactly the one the central directory describes.

import { createReadStream } from 'node:fs';
import { pipeline } from 'node:stream/promises';
import { createInflateRaw, crc32 } from 'node:zlib';
import { DAMAGED, ZipRefusal, type ZipEntry } from '../zip-check.ts';

const CHUNK = 1 << 20;

/** Feed the part's bytes to `consume`, chunk by chunk. Throws ZipRefusal('damaged') on a mismatch. */
export async function streamPart(path: string, entry: ZipEntry, consume: (chunk: Buffer) => void | Promise<void>, signal?: AbortSignal): Promise<void> {
  if (entry.method !== 0 && entry.method !== 8) throw new ZipRefusal('unsupported', DAMAGED);
  let size = 0;
  let crc = 0;
  const sink = async (source: AsyncIterable<Buffer>) => {
    for await (const chunk of source) {
      size += chunk.length;
      if (size > entry.uncompressedSize) throw new ZipRefusal('damaged', DAMAGED);
      crc = crc32(chunk, crc);
      await consume(chunk);
    }
  };
  if (entry.compressedSize > 0) {
    const input = createReadStream(path, { start: entry.dataStart, end: entry.dataStart + entry.compressedSize - 1, highWaterMark: CHUNK });
    if (entry.method === 8) await pipeline(input, createInflateRaw({ chunkSize: CHUNK }), sink, { signal });
    else await pipeline(input, sink, { signal });
  }
  if (size !== entry.uncompressedSize || (crc >>> 0) !== (entry.crc >>> 0)) throw new ZipRefusal('damaged', DAMAGED);
}

/** A small part as text (UTF-8). */
export async function partText(path: string, entry: ZipEntry, signal?: AbortSignal): Promise<string> {
  const chunks: Buffer[] = [];
  await streamPart(path, entry, (c) => { chunks.push(c); }, signal);
  return Buffer.concat(chunks).toString('utf8');
}
