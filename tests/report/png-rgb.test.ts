// The RGB PNG writer of the memo's figures (main/report/render/png-rgb.ts), checked against the PNG
// specification (ISO/IEC 15948:2004) by hand on a tiny image, and decoded by a general-purpose
// library (@napi-rs/canvas's image loader, Skia) on a larger one.
import { createCanvas, loadImage } from '@napi-rs/canvas';
import { describe, expect, it } from 'vitest';
import { inflateSync } from 'node:zlib';
import { encodeRgbPng, subFilteredRgb } from '../../main/report/render/png-rgb.ts';
import { createRng } from '../../main/design/random.ts';

describe('encodeRgbPng', () => {
  it('writes each scanline with filter type 1 (Sub, §9.2): the byte minus the same channel of the pixel to its left, modulo 256', () => {
    // two pixels a row, two rows: (10,20,30) (5,25,30) / (255,0,1) (0,255,2)
    const rgba = Uint8Array.from([10, 20, 30, 255, 5, 25, 30, 255, 255, 0, 1, 255, 0, 255, 2, 255]);
    expect(Array.from(subFilteredRgb(rgba, 2, 2))).toEqual([1, 10, 20, 30, 251, 5, 0, 1, 255, 0, 1, 1, 255, 1]);
  });

  it('gives an image a PNG decoder reads back pixel for pixel (alpha dropped, opaque)', async () => {
    const w = 37, h = 23;
    const rng = createRng(7);
    const rgba = new Uint8Array(w * h * 4);
    for (let i = 0; i < rgba.length; i++) rgba[i] = i % 4 === 3 ? 255 : Math.floor(rng.next() * 256);
    const png = await encodeRgbPng(rgba, w, h);
    expect(png.subarray(12, 16).toString('ascii')).toBe('IHDR');
    const img = await loadImage(png);
    const canvas = createCanvas(w, h);
    const ctx = canvas.getContext('2d');
    ctx.drawImage(img, 0, 0);
    expect(Array.from(ctx.getImageData(0, 0, w, h).data)).toEqual(Array.from(rgba));
    // the IDAT holds the filtered scanlines, zlib-compressed (RFC 1950)
    const idatLength = png.readUInt32BE(33);
    expect(png.subarray(37, 41).toString('ascii')).toBe('IDAT');
    expect(inflateSync(png.subarray(41, 41 + idatLength)).equals(subFilteredRgb(rgba, w, h))).toBe(true);
  });

  it('refuses pixels of the wrong length', async () => {
    await expect(encodeRgbPng(new Uint8Array(7), 2, 1)).rejects.toThrow(RangeError);
  });
});
