// Opaque RGBA pixels → an RGB PNG (no alpha channel). Charts are drawn on an opaque background, so
// the alpha channel carries nothing; without it pdfkit embeds the image in one step (with an alpha
// channel it deflates image and mask concurrently and the PDF's object order varies from run to run).
// Format: PNG specification (ISO/IEC 15948:2004): signature, IHDR (colour type 2, 8 bits), IDAT with
// zlib-compressed scanlines using filter type 1 ("Sub", §9.2), IEND; chunk CRC-32 over type + data.

import { crc32, deflateSync } from 'node:zlib';

function chunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'ascii');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])) >>> 0, 0);
  return Buffer.concat([head, data, crc]);
}

/** rgba: width·height·4 bytes, row by row; alpha is dropped (the caller guarantees it is opaque). */
export function encodeRgbPng(rgba: Uint8Array, width: number, height: number): Buffer {
  if (rgba.length !== width * height * 4) throw new RangeError(`expected ${width * height * 4} bytes of RGBA, got ${rgba.length}`);
  const stride = width * 3 + 1;
  const raw = Buffer.alloc(stride * height);
  for (let y = 0; y < height; y++) {
    const o = y * stride;
    raw[o] = 1; // Sub: each byte minus the same channel of the pixel to its left
    for (let x = 0; x < width; x++) {
      const s = (y * width + x) * 4;
      for (let c = 0; c < 3; c++) {
        const left = x > 0 ? rgba[s - 4 + c]! : 0;
        raw[o + 1 + x * 3 + c] = (rgba[s + c]! - left) & 0xff;
      }
    }
  }
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: truecolour
  ihdr[10] = 0; ihdr[11] = 0; ihdr[12] = 0;
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(raw, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}
