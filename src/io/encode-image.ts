import sharp from 'sharp';
import type { GrayImage } from '../image/gray-image.js';

/** Encodes a gray image as PNG bytes. */
export async function encodeGrayPng(image: GrayImage): Promise<Buffer> {
  return sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.length), {
    raw: { width: image.width, height: image.height, channels: 1 },
  })
    .png()
    .toBuffer();
}

/** An 8-bit RGB image, row-major, 3 bytes a pixel; used for drawings. */
export interface RgbImage {
  readonly width: number;
  readonly height: number;
  readonly data: Uint8Array;
}

/** Encodes an RGB image as PNG bytes. */
export async function encodeRgbPng(image: RgbImage): Promise<Buffer> {
  return sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.length), {
    raw: { width: image.width, height: image.height, channels: 3 },
  })
    .png()
    .toBuffer();
}
