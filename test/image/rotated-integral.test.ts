import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage, tiltedRectangleSum } from '../../src/image/integral-image.js';
import { randomGrayImage } from '../helpers/random-image.js';

// Brute-force twins of the rotated table, written from its definition pixel by pixel.

/** The cone above corner (x, y): pixels (i, j) with j < y and x − (y − j) ≤ i ≤ x + (y − j) − 1. */
function bruteForceCone(image: GrayImage, x: number, y: number): number {
  let total = 0;
  for (let j = 0; j < y; j++) {
    for (let i = 0; i < image.width; i++) {
      if (i >= x - (y - j) && i <= x + (y - j) - 1) total += image.data[j * image.width + i]!;
    }
  }
  return total;
}

/** The pixels of a tilted rectangle, by their rotated coordinates (see tiltedRectangleSum). */
function tiltedPixels(x: number, y: number, width: number, height: number, imageWidth: number, imageHeight: number): Array<[number, number]> {
  const pixels: Array<[number, number]> = [];
  for (let j = 0; j < imageHeight; j++) {
    for (let i = 0; i < imageWidth; i++) {
      const u = i + j + 1;
      const v = j - i;
      if (u > x + y && u <= x + y + 2 * width && v > y - x && v <= y - x + 2 * height) pixels.push([i, j]);
    }
  }
  return pixels;
}

describe('rotated summed-area table', () => {
  for (const [width, height] of [[1, 1], [1, 9], [9, 1], [7, 5], [5, 11], [13, 13], [3, 17]] as const) {
    it(`holds the cone definition at every corner of a random ${width}×${height} image (brute force)`, () => {
      const image = randomGrayImage(width, height, `rotated-${width}-${height}`);
      const integral = computeIntegralImage(image, { rotated: true });
      const stride = width + 1;
      expect(integral.rotatedAt).toBe(stride * (height + 1));
      for (let y = 0; y <= height; y++) {
        for (let x = 0; x <= width; x++) expect(integral.sum[integral.rotatedAt! + y * stride + x]).toBe(bruteForceCone(image, x, y));
      }
    });
  }

  it('worked 3×3 example: corner (1, 2) covers pixels 0,1 of row 1 and 0..2 of row 0', () => {
    // [[1,2,3],[4,5,6],[7,8,9]]: the cone of (1, 2) is row 1 columns 0..1 (4 + 5)
    // plus row 0 columns −1..2 clipped to 0..2 (1 + 2 + 3): 15.
    const integral = computeIntegralImage(createGrayImage(3, 3, new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9])), { rotated: true });
    expect(integral.sum[integral.rotatedAt! + 2 * 4 + 1]).toBe(15);
    // The unit tilted square with top corner (1, 0) is pixels (0, 1) and (1, 1): 4 + 5.
    expect(tiltedRectangleSum(integral.sum, integral.rotatedAt!, 4, 1, 0, 1, 1)).toBe(9);
  });

  it('leaves the upright and squared tables as they are without the rotated part', () => {
    const image = randomGrayImage(9, 7, 'both');
    const plain = computeIntegralImage(image);
    const both = computeIntegralImage(image, { rotated: true });
    expect(plain.rotatedAt).toBeUndefined();
    expect(plain.sum.length).toBe(10 * 8);
    expect(Array.from(both.sum.subarray(0, 80))).toEqual(Array.from(plain.sum));
    expect(Array.from(both.squaredSum)).toEqual(Array.from(plain.squaredSum));
  });

  for (const [width, height] of [[7, 9], [15, 11], [21, 21]] as const) {
    it(`sums every fitting tilted rectangle of a random ${width}×${height} image from four reads, as brute force`, () => {
      const image = randomGrayImage(width, height, `tilted-${width}-${height}`);
      const integral = computeIntegralImage(image, { rotated: true });
      const random = seedrandom(`tilted-pick-${width}-${height}`);
      let checked = 0;
      for (let trial = 0; trial < 400; trial++) {
        const w = 1 + Math.floor(random() * (width - 1));
        const h = 1 + Math.floor(random() * (width - w));
        if (w + h > height) continue;
        const x = h + Math.floor(random() * (width - w - h + 1));
        const y = Math.floor(random() * (height - w - h + 1));
        const pixels = tiltedPixels(x, y, w, h, width, height);
        // The 45° rectangle of sides w√2 and h√2 holds 2wh pixels, all inside its footprint.
        expect(pixels.length).toBe(2 * w * h);
        for (const [i, j] of pixels) {
          expect(i >= x - h && i < x + w && j >= y && j < y + w + h).toBe(true);
        }
        const expected = pixels.reduce((total, [i, j]) => total + image.data[j * width + i]!, 0);
        expect(tiltedRectangleSum(integral.sum, integral.rotatedAt!, width + 1, x, y, w, h)).toBe(expected);
        checked++;
      }
      expect(checked).toBeGreaterThan(100);
    });
  }

  it('the pixel centres of a tilted rectangle lie in its closed 45° footprint', () => {
    // Geometry check of the convention: the centre (i + ½, j + ½) of every pixel lies
    // within the square rotated by 45° with corners top, right, bottom, left.
    const [x, y, w, h] = [5, 1, 3, 2];
    for (const [i, j] of tiltedPixels(x, y, w, h, 20, 20)) {
      const u = i + 0.5 + j + 0.5;
      const v = j + 0.5 - (i + 0.5);
      expect(u >= x + y && u <= x + y + 2 * w && v >= y - x && v <= y - x + 2 * h).toBe(true);
    }
  });
});
