import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { createGrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage, rectangleSum } from '../../src/image/integral-image.js';
import { windowStatistics } from '../../src/image/window-statistics.js';
import { bruteForceSum, randomGrayImage } from '../helpers/random-image.js';

// Summed-area table: S(x, y) = Σ_{x' < x, y' < y} I(x', y') (Crow 1984), and any rectangle's
// sum from four corners (Viola & Jones 2001 §2.1, Figure 2: D = 4 + 1 − (2 + 3)).
describe('integral image', () => {
  it('holds the summed-area table definition at every entry (brute-force twin)', () => {
    const image = randomGrayImage(7, 5, 'definition');
    const integral = computeIntegralImage(image);
    for (let y = 0; y <= 5; y++) {
      for (let x = 0; x <= 7; x++) {
        expect(integral.sum[y * 8 + x]).toBe(bruteForceSum(image, 0, 0, x, y));
        expect(integral.squaredSum[y * 8 + x]).toBe(bruteForceSum(image, 0, 0, x, y, 2));
      }
    }
  });

  it('matches the worked 3×3 example: table of [[1,2,3],[4,5,6],[7,8,9]]', () => {
    // Hand-computed: row sums of the running table are 1,3,6 / 5,12,21 / 12,27,45.
    const integral = computeIntegralImage(createGrayImage(3, 3, new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9])));
    expect(Array.from(integral.sum)).toEqual([0, 0, 0, 0, 0, 1, 3, 6, 0, 5, 12, 21, 0, 12, 27, 45]);
    // The centre-right 2×2 block 5+6+8+9 = 28 from four corners.
    expect(rectangleSum(integral.sum, integral.stride, 1, 1, 2, 2)).toBe(28);
  });

  for (const [width, height] of [[1, 1], [1, 37], [41, 1], [13, 29], [64, 3]] as const) {
    it(`sums every rectangle of a random ${width}×${height} image exactly as brute force`, () => {
      const image = randomGrayImage(width, height, `rects-${width}-${height}`);
      const integral = computeIntegralImage(image);
      const random = seedrandom(`pick-${width}-${height}`);
      for (let trial = 0; trial < 300; trial++) {
        const x = Math.floor(random() * width);
        const y = Math.floor(random() * height);
        const w = 1 + Math.floor(random() * (width - x));
        const h = 1 + Math.floor(random() * (height - y));
        expect(rectangleSum(integral.sum, integral.stride, x, y, w, h)).toBe(bruteForceSum(image, x, y, w, h));
        expect(rectangleSum(integral.squaredSum, integral.stride, x, y, w, h)).toBe(bruteForceSum(image, x, y, w, h, 2));
      }
    });
  }

  it('is exact on an 8192×8192 white image (2^26 pixels): sum 255·2^26, squared 255²·2^26', () => {
    const side = 8192;
    const integral = computeIntegralImage(createGrayImage(side, side, new Uint8Array(side * side).fill(255)));
    expect(rectangleSum(integral.sum, integral.stride, 0, 0, side, side)).toBe(255 * 2 ** 26);
    expect(rectangleSum(integral.squaredSum, integral.stride, 0, 0, side, side)).toBe(255 * 255 * 2 ** 26);
    // A one-pixel rectangle at the far corner still differences exactly.
    expect(rectangleSum(integral.sum, integral.stride, side - 1, side - 1, 1, 1)).toBe(255);
  });
});

describe('window statistics', () => {
  it('gives the population mean and standard deviation of the window', () => {
    const image = randomGrayImage(20, 16, 'stats');
    const integral = computeIntegralImage(image);
    const n = 9 * 7;
    const mean = bruteForceSum(image, 3, 4, 9, 7) / n;
    const variance = bruteForceSum(image, 3, 4, 9, 7, 2) / n - mean * mean;
    const stats = windowStatistics(integral, 3, 4, 9, 7);
    expect(stats.mean).toBeCloseTo(mean, 12);
    expect(stats.standardDeviation).toBeCloseTo(Math.sqrt(variance), 10);
  });

  it('reports a flat window as standard deviation 0', () => {
    const integral = computeIntegralImage(createGrayImage(5, 5, new Uint8Array(25).fill(77)));
    expect(windowStatistics(integral, 0, 0, 5, 5)).toEqual({ mean: 77, standardDeviation: 0 });
  });
});
