// Opaque RGBA pixels → an RGB PNG (no alpha channel). Charts are drawn on an opaque background, so
// the alpha channel carries nothing; without it pdfkit embeds the image in one step (with an alpha
// channel it deflates image and mask concurrently and the PDF's object order varies from run to run).
// Format: PNG specification (ISO/IEC 15948:2004): signature, IHDR (colour type 2, 8 bits), IDAT with
// zlib-compressed scanlines using filter type 1 ("Sub", §9.2), IEND; chunk CRC-32 over type + data.

import { promisify } from 'node:util';
import { crc32, deflate } from 'node:zlib';

function chunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'ascii');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])) >>> 0, 0);
  return Buffer.concat([head, data, crc]);
}

/**
 * The scanlines of an RGB image with filter type 1 (Sub, §9.2) before each: each byte minus the same
 * channel of the pixel to its left. rgba: width·height·4 bytes, row by row; alpha is dropped.
 */
export function subFilteredRgb(rgba: Uint8Array, width: number, height: number): Buffer {
  if (rgba.length !== width * height * 4) throw new RangeError(`expected ${width * height * 4} bytes of RGBA, got ${rgba.length}`);
  const raw = Buffer.allocUnsafe((width * 3 + 1) * height); // every byte is written below
  let s = 0;
  let o = 0;
  for (let y = 0; y < height; y++) {
    raw[o++] = 1;
    let r0 = 0, g0 = 0, b0 = 0;
    for (let x = 0; x < width; x++, s += 4) {
      const r = rgba[s]!, g = rgba[s + 1]!, b = rgba[s + 2]!;
      raw[o++] = (r - r0) & 0xff;
      raw[o++] = (g - g0) & 0xff;
      raw[o++] = (b - b0) & 0xff;
      r0 = r; g0 = g; b0 = b;
    }
  }
  return raw;
}

const deflateAsync = promisify(deflate);

/**
 * rgba: width·height·4 bytes, row by row; alpha is dropped (the caller guarantees it is opaque).
 * The pixels are read before this returns (the caller may reuse them at once); the compression
 * runs on libuv's thread pool, so several figures compress at the same time as the next is drawn.
 * Same bytes as compressing on the calling thread: the same zlib at the same level.
 */
export async function encodeRgbPng(rgba: Uint8Array, width: number, height: number): Promise<Buffer> {
  const idat = deflateAsync(subFilteredRgb(rgba, width, height), { level: 9 });
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: truecolour
  ihdr[10] = 0; ihdr[11] = 0; ihdr[12] = 0;
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', await idat),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}
