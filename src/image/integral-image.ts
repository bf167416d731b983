import type { GrayImage } from './gray-image.js';

/**
 * Summed-area tables of an image and of its squared pixels
 * (Crow 1984; Viola & Jones 2001 §2.1).
 *
 * Layout: (width + 1) × (height + 1) Float64, row-major with `stride = width + 1`;
 * the first row and first column are zero, and entry (x, y) holds the sum of all
 * pixels with column < x and row < y. A half-open rectangle {x, y, w, h} then sums
 * from four corners: S(x+w, y+h) − S(x, y+h) − S(x+w, y) + S(x, y).
 *
 * Exactness: every entry is an integer. For images up to 2^26 pixels the squared
 * table is at most 2^26 · 255² < 2^42, far below 2^53, so Float64 holds every
 * sum and every four-corner difference exactly.
 */
export interface IntegralImage {
  readonly width: number;
  readonly height: number;
  /** width + 1 */
  readonly stride: number;
  readonly sum: Float64Array;
  readonly squaredSum: Float64Array;
}

/** Builds both tables in one pass over the image. O(width · height). */
export function computeIntegralImage(image: GrayImage): IntegralImage {
  const { width, height, data } = image;
  const stride = width + 1;
  const sum = new Float64Array(stride * (height + 1));
  const squaredSum = new Float64Array(stride * (height + 1));
  for (let y = 0; y < height; y++) {
    let rowSum = 0;
    let rowSquaredSum = 0;
    const source = y * width;
    const above = y * stride;
    const here = above + stride;
    for (let x = 0; x < width; x++) {
      const value = data[source + x]!;
      rowSum += value;
      rowSquaredSum += value * value;
      sum[here + x + 1] = sum[above + x + 1]! + rowSum;
      squaredSum[here + x + 1] = squaredSum[above + x + 1]! + rowSquaredSum;
    }
  }
  return { width, height, stride, sum, squaredSum };
}

/**
 * Sum of a table over the half-open rectangle {x, y, width, height}; four reads.
 * The caller guarantees the rectangle lies inside the image (not checked: hot path).
 */
export function rectangleSum(table: Float64Array, stride: number, x: number, y: number, width: number, height: number): number {
  const top = y * stride;
  const bottom = (y + height) * stride;
  return table[bottom + x + width]! - table[bottom + x]! - table[top + x + width]! + table[top + x]!;
}
